/**
 * Codes and recipes through the API: definitions are refused when their parameter schema or a template
 * cannot be compiled (naming where), import is all-or-nothing, and deletions respect what refers to them.
 */
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { codeDefinition } from "./support/code-fixtures";
import { callApi, insertRun, startTestCluster, type TestCluster } from "./support/host-test-app";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
let cluster: TestCluster;
let groupId = "";
let otherGroupId = "";
const tokens = { admin: "", member: "", collaborator: "", otherAdmin: "" };

const call = (who: keyof typeof tokens, method: string, path: string, body?: unknown) =>
  callApi(app.baseUrl, tokens[who], method, path, body);

async function counts() {
  const result = await database.pool.query(
    "select (select count(*) from codes)::int as codes, (select count(*) from recipes)::int as recipes, (select count(*) from audit_log)::int as audit",
  );
  return result.rows[0];
}

beforeAll(async () => {
  database = await createTestDatabase("codes_recipes");
  app = await startTestApp(database);
  cluster = await startTestCluster();
  const db = database.db;
  groupId = (await createGroup(db, "codes")).id;
  otherGroupId = (await createGroup(db, "elsewhere")).id;
  const admin = await createUser(db, "admin");
  const member = await createUser(db, "member");
  const collaborator = await createUser(db, "collaborator");
  const otherAdmin = await createUser(db, "other-admin");
  await addMember(db, admin.id, groupId, "admin");
  await addMember(db, member.id, groupId, "member");
  await addMember(db, collaborator.id, groupId, "collaborator");
  await addMember(db, otherAdmin.id, otherGroupId, "admin");
  tokens.admin = await tokenFor(db, admin);
  tokens.member = await tokenFor(db, member);
  tokens.collaborator = await tokenFor(db, collaborator);
  tokens.otherAdmin = await tokenFor(db, otherAdmin);
});

afterAll(async () => {
  await cluster?.stop();
  await app?.close();
  await database?.drop();
});

describe("registering codes", () => {
  it("accepts a definition from a member and applies the contract's defaults", async () => {
    const reply = await call(
      "member",
      "POST",
      `/api/groups/${groupId}/codes`,
      codeDefinition({ name: "scatter", version: "2.1" }),
    );
    expect(reply.status, reply.text).toBe(201);
    expect(reply.body.definition).toMatchObject({
      name: "scatter",
      version: "2.1",
      arguments: [],
      outputFiles: [],
      defaults: { cores: 1, wallTimeMinutes: 60 },
    });
    const detail = await call("collaborator", "GET", `/api/codes/${reply.body.id}`);
    expect(detail.body).toEqual(reply.body);
  });

  it("refuses the same name and version twice (409)", async () => {
    const before = await counts();
    const reply = await call(
      "member",
      "POST",
      `/api/groups/${groupId}/codes`,
      codeDefinition({ name: "scatter", version: "2.1" }),
    );
    expect(reply.status).toBe(409);
    expect(await counts()).toEqual(before);
  });

  const broken: [string, object, RegExp, string][] = [
    [
      "an invalid parameter schema",
      { parameters: { type: "object", properties: { n: { type: "integr" } } } },
      /not valid JSON Schema/,
      "parameters",
    ],
    [
      "a misspelt schema keyword",
      { parameters: { type: "object", maxProperty: 3 } },
      /unknown keyword/,
      "parameters",
    ],
    [
      "a malformed input template",
      {
        inputTemplates: [
          { fileName: "good.txt", format: "text", template: "fine" },
          { fileName: "bad.nml", format: "namelist", template: "&in\n  x = {{ x + }}\n/" },
        ],
      },
      /^bad\.nml, line 2: /,
      "inputTemplates.1.template",
    ],
    ["a malformed argument", { arguments: ["--ok", "{% for %}"] }, /^argument 2/, "arguments.1"],
    [
      "an include",
      { inputTemplates: [{ fileName: "a.txt", format: "text", template: "{% include '/etc/passwd' %}" }] },
      /cannot include/,
      "inputTemplates.0.template",
    ],
    [
      "two templates for one file",
      {
        inputTemplates: [
          { fileName: "a.txt", format: "text", template: "1" },
          { fileName: "a.txt", format: "text", template: "2" },
        ],
      },
      /Two input templates write a\.txt/,
      "inputTemplates.1.fileName",
    ],
  ];
  for (const [label, change, message, path] of broken) {
    it(`refuses ${label} with 422 naming ${path}, writing nothing`, async () => {
      const before = await counts();
      const reply = await call("member", "POST", `/api/groups/${groupId}/codes`, {
        ...codeDefinition(),
        ...change,
      });
      expect(reply.status, reply.text).toBe(422);
      expect(reply.body.error.code).toBe("invalid_code_definition");
      const detail = reply.body.error.details.find((d: { path: string }) => d.path === path);
      expect(detail?.message).toMatch(message);
      expect(await counts()).toEqual(before);
    });
  }

  it("refuses input files whose names would leave the run folder", async () => {
    const reply = await call("member", "POST", `/api/groups/${groupId}/codes`, {
      ...codeDefinition(),
      inputTemplates: [{ fileName: "../escape.txt", format: "text", template: "x" }],
    });
    expect(reply.status).toBe(422);
    expect(reply.body.error.code).toBe("validation_failed");
  });

  // Regression: a template file could be named sigmaflow.args, the file Sigmaflow writes with each
  // stage's arguments, and replace it; every name Sigmaflow writes into run folders is refused.
  it("refuses input and output files named like Sigmaflow's own run-folder files (422), writing nothing", async () => {
    const before = await counts();
    const reply = await call("member", "POST", `/api/groups/${groupId}/codes`, {
      ...codeDefinition(),
      inputTemplates: [
        { fileName: "input.txt", format: "text", template: "x" },
        { fileName: "sigmaflow.args", format: "text", template: "--evil" },
      ],
      outputFiles: ["result.dat", "job.sh", "job.exit.tmp"],
    });
    expect(reply.status, reply.text).toBe(422);
    expect(reply.body.error.code).toBe("invalid_code_definition");
    expect(reply.body.error.message).toBe(
      "The code definition cannot be used: inputTemplates.1.fileName: sigmaflow.args is a file Sigmaflow writes into run folders itself; give the file another name.",
    );
    expect(reply.body.error.details.map((d: { path: string }) => d.path)).toEqual([
      "inputTemplates.1.fileName",
      "outputFiles.1",
      "outputFiles.2",
    ]);
    const imported = await call("member", "POST", `/api/groups/${groupId}/codes/import`, {
      format: "sigmaflow-code-definitions",
      version: 1,
      codes: [{ ...codeDefinition(), outputFiles: ["job.log"] }],
    });
    expect(imported.status, imported.text).toBe(422);
    expect(imported.body.error.details[0].path).toBe("codes.0.outputFiles.0");
    expect(await counts()).toEqual(before);
  });

  it("does not let collaborators register codes", async () => {
    expect(
      (await call("collaborator", "POST", `/api/groups/${groupId}/codes`, codeDefinition())).status,
    ).toBe(403);
  });
});

describe("export and import", () => {
  it("exports the group's definitions in the import format", async () => {
    const reply = await call("collaborator", "GET", `/api/groups/${groupId}/codes/export`);
    expect(reply.status).toBe(200);
    expect(reply.body.format).toBe("sigmaflow-code-definitions");
    expect(reply.body.version).toBe(1);
    expect(reply.body.codes.map((c: { name: string }) => c.name)).toEqual(["scatter"]);
  });

  it("exports an empty document from a group without codes, and refuses to import one", async () => {
    const empty = await call("otherAdmin", "GET", `/api/groups/${otherGroupId}/codes/export`);
    expect(empty.status, JSON.stringify(empty.body)).toBe(200);
    expect(empty.body).toEqual({ format: "sigmaflow-code-definitions", version: 1, codes: [] });
    const refused = await call("otherAdmin", "POST", `/api/groups/${otherGroupId}/codes/import`, empty.body);
    expect(refused.status).toBe(422);
  });

  it("imports a document into another group as it was exported", async () => {
    const exported = (await call("member", "GET", `/api/groups/${groupId}/codes/export`)).body;
    const reply = await call("otherAdmin", "POST", `/api/groups/${otherGroupId}/codes/import`, exported);
    expect(reply.status, reply.text).toBe(201);
    expect(reply.body.codes.map((c: { definition: unknown }) => c.definition)).toEqual(exported.codes);
    expect(reply.body.codes[0].groupId).toBe(otherGroupId);
  });

  it("imports nothing when one version is already registered, listing the clash", async () => {
    const before = await counts();
    const document = {
      format: "sigmaflow-code-definitions",
      version: 1,
      codes: [
        codeDefinition({ name: "fresh", version: "1" }),
        codeDefinition({ name: "scatter", version: "2.1" }),
        codeDefinition({ name: "fresher", version: "1" }),
      ],
    };
    const reply = await call("member", "POST", `/api/groups/${groupId}/codes/import`, document);
    expect(reply.status).toBe(409);
    expect(reply.body.error.details).toEqual([{ name: "scatter", version: "2.1" }]);
    expect(await counts()).toEqual(before);
  });

  it("imports nothing when one definition is broken, naming it by index", async () => {
    const before = await counts();
    const document = {
      format: "sigmaflow-code-definitions",
      version: 1,
      codes: [
        codeDefinition({ name: "fine", version: "1" }),
        { ...codeDefinition({ name: "broken", version: "1" }), arguments: ["{{ x"] },
      ],
    };
    const reply = await call("member", "POST", `/api/groups/${groupId}/codes/import`, document);
    expect(reply.status).toBe(422);
    expect(reply.body.error.details[0].path).toBe("codes.1.arguments.0");
    expect(await counts()).toEqual(before);
  });

  it("refuses a document listing one version twice", async () => {
    const document = {
      format: "sigmaflow-code-definitions",
      version: 1,
      codes: [codeDefinition({ name: "twin", version: "1" }), codeDefinition({ name: "twin", version: "1" })],
    };
    const reply = await call("member", "POST", `/api/groups/${groupId}/codes/import`, document);
    expect(reply.status).toBe(409);
    expect(reply.body.error.details).toEqual([{ name: "twin", version: "1" }]);
  });

  it("imports all of a clean document in one audited step", async () => {
    const names = ["alpha", "beta"].map((n) => `${n}-${randomBytes(2).toString("hex")}`);
    const document = {
      format: "sigmaflow-code-definitions",
      version: 1,
      codes: names.map((n) => codeDefinition({ name: n })),
    };
    const reply = await call("member", "POST", `/api/groups/${groupId}/codes/import`, document);
    expect(reply.status).toBe(201);
    expect(reply.body.codes.map((c: { definition: { name: string } }) => c.definition.name)).toEqual(names);
    const audit = await database.pool.query(
      "select details from audit_log where action = 'code.import' and group_id = $1",
      [groupId],
    );
    expect(audit.rows).toHaveLength(1);
    expect(audit.rows[0].details.codes).toHaveLength(2);
  });
});

describe("recipes", () => {
  let codeId = "";
  let recipeId = "";
  beforeAll(async () => {
    codeId = (
      await call(
        "member",
        "POST",
        `/api/groups/${groupId}/codes`,
        codeDefinition({ name: "target", version: "1" }),
      )
    ).body.id;
  });

  it("creates a recipe whose stages name their codes", async () => {
    const reply = await call("member", "POST", `/api/groups/${groupId}/recipes`, {
      name: "elastic",
      stages: [
        { name: "integrals", codeId },
        { name: "scattering", codeId },
      ],
    });
    expect(reply.status, reply.text).toBe(201);
    expect(reply.body.stages).toEqual([
      { name: "integrals", codeId, codeName: "target", codeVersion: "1" },
      { name: "scattering", codeId, codeName: "target", codeVersion: "1" },
    ]);
    recipeId = reply.body.id;
    const listed = await call("collaborator", "GET", `/api/groups/${groupId}/recipes`);
    expect(listed.body.recipes).toEqual([reply.body]);
    expect((await call("collaborator", "GET", `/api/recipes/${recipeId}`)).body).toEqual(reply.body);
  });

  it("refuses a stage whose code belongs to another group (422), writing nothing", async () => {
    const foreign = await call(
      "otherAdmin",
      "POST",
      `/api/groups/${otherGroupId}/codes`,
      codeDefinition({ name: "theirs" }),
    );
    const before = await counts();
    const reply = await call("member", "POST", `/api/groups/${groupId}/recipes`, {
      name: "borrowed",
      stages: [
        { name: "mine", codeId },
        { name: "theirs", codeId: foreign.body.id },
      ],
    });
    expect(reply.status).toBe(422);
    expect(reply.body.error.details).toEqual([
      { path: "stages.1.codeId", message: "is not a code of this group" },
    ]);
    expect(await counts()).toEqual(before);
  });

  it("refuses a second recipe of the same name (409)", async () => {
    const reply = await call("member", "POST", `/api/groups/${groupId}/recipes`, {
      name: "elastic",
      stages: [{ name: "one", codeId }],
    });
    expect(reply.status).toBe(409);
  });

  it("keeps a code while a recipe uses it (409) and a recipe while a run uses it (409)", async () => {
    const codeDelete = await call("admin", "DELETE", `/api/codes/${codeId}`);
    expect(codeDelete.status).toBe(409);
    expect(codeDelete.body.error.message).toContain("elastic");

    const host = await call("admin", "POST", `/api/groups/${groupId}/hosts`, {
      name: "runner",
      address: "127.0.0.1",
      port: cluster.port,
      scheduler: "direct",
      remoteBaseDir: "/scratch",
    });
    expect(host.status, host.text).toBe(201);
    await insertRun(database.db, { groupId, hostId: host.body.id, recipeId });
    expect((await call("admin", "DELETE", `/api/recipes/${recipeId}`)).status).toBe(409);
  });

  it("lets the author or an admin delete an unused recipe, then its code", async () => {
    const made = await call("member", "POST", `/api/groups/${groupId}/recipes`, {
      name: "disposable",
      stages: [{ name: "one", codeId }],
    });
    expect((await call("collaborator", "DELETE", `/api/recipes/${made.body.id}`)).status).toBe(403);
    expect((await call("member", "DELETE", `/api/recipes/${made.body.id}`)).status).toBe(204);

    const lone = await call(
      "admin",
      "POST",
      `/api/groups/${groupId}/codes`,
      codeDefinition({ name: "lone" }),
    );
    expect((await call("member", "DELETE", `/api/codes/${lone.body.id}`)).status).toBe(403);
    expect((await call("admin", "DELETE", `/api/codes/${lone.body.id}`)).status).toBe(204);
    expect((await call("admin", "GET", `/api/codes/${lone.body.id}`)).status).toBe(404);
  });

  // Regression: a member could delete their own recipes but not a code they registered (403).
  it("lets the member who registered an unused code delete it, as with recipes", async () => {
    const own = await call("member", "POST", `/api/groups/${groupId}/codes`, codeDefinition({ name: "own" }));
    expect(own.status, own.text).toBe(201);
    const refused = await call("collaborator", "DELETE", `/api/codes/${own.body.id}`);
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toBe(
      "Only the group's admins or the member who registered the code can delete it.",
    );
    expect((await call("member", "DELETE", `/api/codes/${own.body.id}`)).status).toBe(204);
    expect((await call("member", "GET", `/api/codes/${own.body.id}`)).status).toBe(404);
    const audit = await database.pool.query("select action from audit_log where target_id = $1 order by id", [
      own.body.id,
    ]);
    expect(audit.rows.map((r) => r.action)).toEqual(["code.create", "code.delete"]);
    // The group's activity names the code although it is gone: from the name recorded with its entries.
    const activity = await call("admin", "GET", `/api/groups/${groupId}/audit`);
    expect(activity.status).toBe(200);
    const entries = activity.body.entries.filter(
      (entry: { targetId: string }) => entry.targetId === own.body.id,
    );
    expect(entries).toEqual([
      expect.objectContaining({ action: "code.delete", targetName: "own 1.0", targetExists: false }),
      expect.objectContaining({ action: "code.create", targetName: "own 1.0", targetExists: false }),
    ]);
  });
});
