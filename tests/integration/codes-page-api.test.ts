/**
 * The preview of a code's input files (POST /api/codes/:codeId/preview), as the Codes page uses it: the
 * same parameter check, target context and renderer a run's plan uses, for one code, writing nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { codeDefinition, uniqueCodeName } from "./support/code-fixtures";
import { callApi } from "./support/host-test-app";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
let groupId = "";
let otherGroupId = "";
let codeId = "";
let nitrogenId = "";
let theirTargetId = "";
const tokens = { member: "", collaborator: "", otherAdmin: "" };

const call = (who: keyof typeof tokens, method: string, path: string, body?: unknown) =>
  callApi(app.baseUrl, tokens[who], method, path, body);

/** N₂ with a bond length of 1.0977 Å (NIST CCCBDB experimental r_e, value from memory). */
const NITROGEN_XYZ = "2\nnitrogen\nN 0.0 0.0 0.0\nN 0.0 0.0 1.0977\n";

const previewedCode = () =>
  codeDefinition({
    name: uniqueCodeName("preview"),
    inputTemplates: [
      {
        fileName: "scatter.inp",
        format: "text",
        template: [
          "target {{ target.name }} {{ target.abelianSubgroup }}",
          "irreps {{ target.irreps | join(' ') }}",
          "{% for atom in target.atoms %}{{ atom.symbol }} {{ atom.x.toFixed(6) }} {{ atom.y.toFixed(6) }} {{ atom.z.toFixed(6) }}",
          "{% endfor %}energy {{ energyEv }} eV",
          "basis {{ basis }}",
          "",
        ].join("\n"),
      },
      { fileName: "notes.txt", format: "text", template: "basis set {{ basis }}\n" },
    ],
    arguments: ["--basis={{ basis }}", "{% if verbose %}--verbose{% endif %}"],
    parameters: {
      type: "object",
      properties: {
        energyEv: { type: "number", minimum: 0, default: 1.5, unit: "eV" },
        basis: { type: "string", enum: ["cc-pVDZ", "cc-pVTZ"], default: "cc-pVDZ" },
        verbose: { type: "boolean", default: false },
      },
      additionalProperties: false,
    },
  });

beforeAll(async () => {
  database = await createTestDatabase("codes_page_api");
  app = await startTestApp(database);
  const db = database.db;
  groupId = (await createGroup(db, "previews")).id;
  otherGroupId = (await createGroup(db, "elsewhere")).id;
  const member = await createUser(db, "member");
  const collaborator = await createUser(db, "collaborator");
  const otherAdmin = await createUser(db, "other-admin");
  await addMember(db, member.id, groupId, "member");
  await addMember(db, collaborator.id, groupId, "collaborator");
  await addMember(db, otherAdmin.id, otherGroupId, "admin");
  tokens.member = await tokenFor(db, member);
  tokens.collaborator = await tokenFor(db, collaborator);
  tokens.otherAdmin = await tokenFor(db, otherAdmin);

  const code = await call("member", "POST", `/api/groups/${groupId}/codes`, previewedCode());
  expect(code.status, code.text).toBe(201);
  codeId = code.body.id;
  const target = await call("member", "POST", `/api/groups/${groupId}/targets`, {
    name: "nitrogen",
    xyz: NITROGEN_XYZ,
  });
  expect(target.status, target.text).toBe(201);
  nitrogenId = target.body.id;
  const theirs = await call("otherAdmin", "POST", `/api/groups/${otherGroupId}/targets`, {
    name: "their-nitrogen",
    xyz: NITROGEN_XYZ,
  });
  expect(theirs.status, theirs.text).toBe(201);
  theirTargetId = theirs.body.id;
});

afterAll(async () => {
  await app?.close();
  await database?.drop();
});

async function auditCount(): Promise<number> {
  const result = await database.pool.query("select count(*)::int as n from audit_log");
  return result.rows[0].n;
}

describe("previewing a code's input files", () => {
  it("renders every file with the target's context and the schema's defaults, writing nothing", async () => {
    const before = await auditCount();
    const reply = await call("collaborator", "POST", `/api/codes/${codeId}/preview`, {
      targetId: nitrogenId,
      parameters: { basis: "cc-pVTZ" },
    });
    expect(reply.status, reply.text).toBe(200);
    expect(reply.body.parameters).toEqual({ energyEv: 1.5, basis: "cc-pVTZ", verbose: false });
    expect(reply.body.target).toEqual({ id: nitrogenId, name: "nitrogen", version: 1 });
    expect(reply.body.files.map((f: { fileName: string }) => f.fileName)).toEqual([
      "scatter.inp",
      "notes.txt",
    ]);
    const [scatter, notes] = reply.body.files;
    expect(notes).toEqual({
      fileName: "notes.txt",
      sizeBytes: 18,
      text: "basis set cc-pVTZ\n",
      truncated: false,
    });

    const lines: string[] = scatter.text.split("\n");
    // Common practice: a linear homonuclear molecule (D∞h) is handled in its largest Abelian subgroup,
    // D2h, whose irreducible representations are listed in Cotton order.
    expect(lines[0]).toBe("target nitrogen D2h");
    expect(lines[1]).toBe("irreps Ag B1g B2g B3g Au B1u B2u B3u");
    const atoms = lines.slice(2, 4).map((line) => line.split(" "));
    expect(atoms.map((atom) => atom[0])).toEqual(["N", "N"]);
    // Centre of mass at the origin: for two atoms of equal mass each sits half the bond from it.
    for (const atom of atoms) {
      const [x, y, z] = atom.slice(1).map(Number);
      expect(Math.hypot(x!, y!, z!)).toBeCloseTo(1.0977 / 2, 5);
    }
    expect(lines[4]).toBe("energy 1.5 eV");
    expect(lines[5]).toBe("basis cc-pVTZ");
    expect(scatter.sizeBytes).toBe(Buffer.byteLength(scatter.text));
    // The empty `--verbose` argument is left out, as in a run's argument file.
    expect(reply.body.arguments).toEqual(["--basis=cc-pVTZ"]);
    expect(await auditCount()).toBe(before);
  });

  it("answers 422 naming the parameter whose value the schema refuses", async () => {
    const negative = await call("member", "POST", `/api/codes/${codeId}/preview`, {
      targetId: nitrogenId,
      parameters: { energyEv: -2 },
    });
    expect(negative.status, negative.text).toBe(422);
    expect(negative.body.error.code).toBe("invalid_parameters");
    expect(negative.body.error.details).toEqual([{ path: "parameters.energyEv", message: "must be >= 0" }]);
    expect(negative.body.error.message).toContain("parameters.energyEv");

    const unknown = await call("member", "POST", `/api/codes/${codeId}/preview`, {
      targetId: nitrogenId,
      parameters: { basisSet: "cc-pVDZ" },
    });
    expect(unknown.status).toBe(422);
    expect(unknown.body.error.details).toEqual([
      { path: "parameters.basisSet", message: "is not a parameter of this code" },
    ]);
  });

  it("refuses a malformed body naming the field", async () => {
    const reply = await call("member", "POST", `/api/codes/${codeId}/preview`, { targetId: "water" });
    expect(reply.status).toBe(422);
    expect(reply.body.error.details[0].path).toBe("targetId");
    const extra = await call("member", "POST", `/api/codes/${codeId}/preview`, { parameters: {}, host: "x" });
    expect(extra.status).toBe(422);
  });

  it("says the template needs a target when none is chosen", async () => {
    const reply = await call("member", "POST", `/api/codes/${codeId}/preview`, { parameters: {} });
    expect(reply.status).toBe(422);
    expect(reply.body.error.code).toBe("template_failed");
    expect(reply.body.error.message).toMatch(/^scatter\.inp, line 1: the template reads `target`/);
  });

  it("does not render another group's target, and hides this group's code from other groups", async () => {
    const foreignTarget = await call("member", "POST", `/api/codes/${codeId}/preview`, {
      targetId: theirTargetId,
      parameters: {},
    });
    expect(foreignTarget.status).toBe(422);
    expect(foreignTarget.body.error.details).toEqual([{ path: "targetId", message: "Unknown target." }]);

    const stranger = await call("otherAdmin", "POST", `/api/codes/${codeId}/preview`, {
      targetId: theirTargetId,
      parameters: {},
    });
    expect(stranger.status).toBe(404);
    expect(stranger.text).not.toContain("scatter.inp");
  });

  it("stops a template that runs too long with the renderer's time limit", async () => {
    const slow = await call(
      "member",
      "POST",
      `/api/groups/${groupId}/codes`,
      codeDefinition({
        name: uniqueCodeName("slow"),
        inputTemplates: [
          {
            fileName: "slow.txt",
            format: "text",
            template:
              "{% for i in range(0, 20000) %}{% for j in range(0, 20000) %}{% endfor %}{% endfor %}done\n",
          },
        ],
        parameters: { type: "object", properties: {} },
      }),
    );
    expect(slow.status, slow.text).toBe(201);
    const started = Date.now();
    const reply = await call("member", "POST", `/api/codes/${slow.body.id}/preview`, {});
    expect(reply.status).toBe(422);
    expect(reply.body.error.message).toContain("rendering took longer than 2000 ms");
    expect(Date.now() - started).toBeLessThan(10_000);
  });
});
