/**
 * Runs that name a target: the code's templates read it as `target` (standard orientation, masses,
 * irreps), the run keeps the version it used, the fingerprint follows the target version (so a changed
 * target is never served results of the old one), resubmissions keep the target at its latest version or
 * switch it, and a target that runs refer to cannot be deleted. No worker runs here: what is checked is
 * what run creation stores (the plan holds every rendered input file).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hostAccounts, hosts } from "../../server/db/schema";
import { inspectTarget } from "../../shared/science/geometry";
import { codeDefinition } from "./support/code-fixtures";
import { apiClient, registerRecipe, type Sigmaflow, startSigmaflow } from "./support/lifecycle-harness";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let sf: Sigmaflow;
let hostId = "";
let recipeId = "";
let plainRecipeId = "";

/*
 * Water: r(OH) = 0.9578 Å, ∠HOH = 104.48° (NIST CCCBDB experimental geometry; from memory), entered
 * with O at the origin, so the standard orientation (centre of mass at the origin) differs from it.
 */
const WATER_H_X = 0.9578 * Math.sin((104.48 * Math.PI) / 360);
const WATER_H_Z = 0.9578 * Math.cos((104.48 * Math.PI) / 360);
const WATER_XYZ = `3\nwater\nO 0 0 0\nH ${WATER_H_X} 0 ${WATER_H_Z}\nH ${-WATER_H_X} 0 ${WATER_H_Z}\n`;

/** A code whose input file lists the target's atoms in the standard orientation, like a quantum chemistry input. */
const geometryCode = () =>
  codeDefinition({
    inputTemplates: [
      {
        fileName: "geometry.in",
        format: "text",
        template: [
          "{{ target.name }} v{{ target.version }} {{ target.pointGroup }} {{ target.abelianSubgroup }}",
          "charge {{ target.charge }} multiplicity {{ target.multiplicity }} electrons {{ target.electronCount }}",
          "irreps {{ target.irreps }}",
          "{% for atom in target.atoms %}{{ atom.symbol }} {{ atom.massU }} {{ atom.x }} {{ atom.y }} {{ atom.z }}",
          "{% endfor %}",
        ].join("\n"),
      },
    ],
    parameters: { type: "object", properties: {} },
  });

async function enterTarget(name: string, xyz = WATER_XYZ) {
  const reply = await sf.api("POST", `/api/groups/${sf.groupId}/targets`, { name, xyz });
  expect(reply.status, JSON.stringify(reply.body)).toBe(201);
  return reply.body;
}

function runRequest(name: string, targetId: string | undefined, extra: Record<string, unknown> = {}) {
  return {
    spec: {
      name,
      recipeId,
      hostId,
      targetId,
      parameters: {},
      resources: { cores: 1, wallTimeMinutes: 1 },
      ...extra,
    },
    onDuplicate: "run",
  };
}

async function submit(body: unknown) {
  const reply = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, body);
  expect(reply.status, JSON.stringify(reply.body)).toBe(201);
  return reply.body;
}

/** The rendered input file as run creation stored it in the run's plan. */
async function renderedGeometry(runId: string): Promise<string> {
  const { rows } = await database.pool.query("select plan from runs where id = $1", [runId]);
  const file = rows[0].plan.files.find((f: { relativePath: string }) =>
    f.relativePath.endsWith("/geometry.in"),
  );
  return Buffer.from(file.contentBase64, "base64").toString("utf8");
}

beforeAll(async () => {
  database = await createTestDatabase("run_targets");
  sf = await startSigmaflow(database, { inProcessWorker: false });
  // A host with a confirmed key and a group account: run creation never connects to it.
  const [host] = await database.db
    .insert(hosts)
    .values({
      groupId: sf.groupId,
      name: "unreached",
      address: "127.0.0.1",
      port: 9,
      scheduler: "direct",
      remoteBaseDir: "runs",
      hostKey: "ssh-ed25519 AAAAC3NzaC1lZDI1NTE5AAAAIOMqqnkVzrm0SdG6UOoqKLsabgH5C9okWi0dh2l9GKJl",
      hostKeyFingerprint: "SHA256:unused",
      hostKeyConfirmedAt: new Date(),
    })
    .returning();
  hostId = host!.id;
  await database.db.insert(hostAccounts).values({
    hostId,
    ownerUserId: null,
    username: "runner",
    publicKey: "ssh-ed25519 AAAA",
    privateKeyEncrypted: Buffer.from("not used"),
  });
  recipeId = await registerRecipe(sf, "geometry", [{ name: "geometry", code: geometryCode() }]);
  plainRecipeId = await registerRecipe(sf, "plain", [
    {
      name: "plain",
      code: codeDefinition({ parameters: { type: "object", properties: { molecule: { type: "string" } } } }),
    },
  ]);
}, 60_000);

afterAll(async () => {
  await sf?.close();
  await database?.drop();
});

describe("a run about a target", () => {
  it("renders the target's atoms in the standard orientation and reports the target it used", async () => {
    const water = await enterTarget("Water");
    const run = await submit(runRequest("water geometry", water.id));
    expect(run).toMatchObject({
      targetId: water.id,
      targetVersion: 1,
      targetName: "Water",
      resultsState: null,
      resultsMessage: null,
    });
    const { rows } = await database.pool.query("select target_version_id from runs where id = $1", [run.id]);
    expect(rows[0].target_version_id).toBe(water.current.id);

    // Expected: the science core's standard orientation of the same atoms (centre of mass at the origin).
    const expected = inspectTarget({
      atoms: [
        { symbol: "O", positionAngstrom: [0, 0, 0] },
        { symbol: "H", positionAngstrom: [WATER_H_X, 0, WATER_H_Z] },
        { symbol: "H", positionAngstrom: [-WATER_H_X, 0, WATER_H_Z] },
      ],
    });
    const lines = (await renderedGeometry(run.id)).split("\n");
    expect(lines[0]).toBe("Water v1 C2v C2v");
    expect(lines[1]).toBe("charge 0 multiplicity 1 electrons 10");
    expect(lines[2]).toBe(`irreps ${expected.irreps.join(", ")}`);
    const atoms = lines.slice(3, 6).map((line) => line.split(" "));
    expect(atoms.map((a) => a[0])).toEqual(["O", "H", "H"]);
    atoms.forEach((atom, i) => {
      expect(Number(atom[1])).toBe(expected.atoms[i]!.massU);
      const position = atom.slice(2).map(Number);
      expected.atoms[i]!.positionAngstrom.forEach((value, axis) => {
        expect(position[axis]).toBeCloseTo(value, 12);
      });
    });
    // Not the entered frame: O was entered at the origin, the centre of mass is not there.
    expect(Math.hypot(...atoms[0]!.slice(2).map(Number))).toBeGreaterThan(0.05);

    const detail = await sf.api("GET", `/api/runs/${run.id}`);
    expect(detail.body).toMatchObject({
      targetName: "Water",
      targetVersion: 1,
      spec: { targetId: water.id },
    });
    const target = await sf.api("GET", `/api/targets/${water.id}`);
    expect(target.body.runCount).toBe(1);
  });

  it("refuses a run whose templates read target when the run names none (422, naming the file)", async () => {
    const reply = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, runRequest("no target", undefined));
    expect(reply.status, JSON.stringify(reply.body)).toBe(422);
    expect(reply.body.error.code).toBe("template_failed");
    expect(reply.body.error.message).toMatch(
      /^geometry\.in, line 1: the template reads `target`, but the run names no target/,
    );
  });

  it("runs a recipe that does not read target with or without one", async () => {
    const water = await enterTarget("Water for plain");
    const base = {
      name: "plain",
      recipeId: plainRecipeId,
      hostId,
      parameters: { plain: { molecule: "H2O" } },
      resources: { cores: 1, wallTimeMinutes: 1 },
    };
    const without = await submit({ spec: base, onDuplicate: "run" });
    expect(without).toMatchObject({ targetId: null, targetVersion: null, targetName: null });
    const withTarget = await submit({ spec: { ...base, targetId: water.id }, onDuplicate: "run" });
    expect(withTarget.targetName).toBe("Water for plain");
    // Same rendered files, but the target version is part of what the run is about.
    expect(withTarget.fingerprint).not.toBe(without.fingerprint);
  });

  it("refuses a target of another group or one that does not exist (422 on spec.targetId)", async () => {
    const other = await createGroup(database.db, "others");
    const stranger = await createUser(database.db, "stranger");
    await addMember(database.db, stranger.id, other.id, "admin");
    const strangerApi = apiClient(sf.app.baseUrl, await tokenFor(database.db, stranger));
    const theirs = await strangerApi("POST", `/api/groups/${other.id}/targets`, {
      name: "Theirs",
      xyz: WATER_XYZ,
    });
    expect(theirs.status, JSON.stringify(theirs.body)).toBe(201);
    for (const targetId of [theirs.body.id, "00000000-0000-4000-8000-000000000000"]) {
      const reply = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, runRequest("elsewhere", targetId));
      expect(reply.status, JSON.stringify(reply.body)).toBe(422);
      expect(reply.body.error.details).toEqual([{ path: "spec.targetId", message: "Unknown target." }]);
    }
  });

  it("refuses a code declaring a parameter named target at registration", async () => {
    const reply = await sf.api(
      "POST",
      `/api/groups/${sf.groupId}/codes`,
      codeDefinition({
        parameters: { type: "object", properties: { target: { type: "string" } }, required: ["target"] },
      }),
    );
    expect(reply.status, JSON.stringify(reply.body)).toBe(422);
    expect(reply.body.error.code).toBe("invalid_code_definition");
    expect(reply.body.error.details.map((p: { path: string }) => p.path)).toEqual([
      "parameters.properties.target",
      "parameters.required",
    ]);
  });
});

describe("target versions, fingerprints and resubmission", () => {
  it("keeps the version a run used; a resubmission uses the latest one and gets another fingerprint", async () => {
    const water = await enterTarget("Water to change");
    const first = await submit(runRequest("before the change", water.id));
    const twin = await submit(runRequest("same inputs", water.id));
    expect(twin.fingerprint).toBe(first.fingerprint);

    // A finished run with these inputs is offered for reuse …
    await database.pool.query("update runs set state = 'done', finished_at = now() where id = $1", [
      first.id,
    ]);
    const ask = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      ...runRequest("ask", water.id),
      onDuplicate: "ask",
    });
    expect(ask.status, JSON.stringify(ask.body)).toBe(409);
    expect(ask.body.error.details.runId).toBe(first.id);

    // … until the target changes, even when only its notes change (the version is part of the fingerprint).
    const changed = await sf.api("PATCH", `/api/targets/${water.id}`, { notes: "checked again" });
    expect(changed.status, JSON.stringify(changed.body)).toBe(200);
    expect(changed.body.latestVersion).toBe(2);
    const afterChange = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
      ...runRequest("after the change", water.id),
      onDuplicate: "ask",
    });
    expect(afterChange.status, JSON.stringify(afterChange.body)).toBe(201);
    expect(afterChange.body.targetVersion).toBe(2);
    expect(afterChange.body.fingerprint).not.toBe(first.fingerprint);

    const resubmitted = await sf.api("POST", `/api/runs/${first.id}/resubmit`, { changes: {} });
    expect(resubmitted.status, JSON.stringify(resubmitted.body)).toBe(201);
    expect(resubmitted.body).toMatchObject({ targetId: water.id, targetVersion: 2 });
    expect(resubmitted.body.fingerprint).toBe(afterChange.body.fingerprint);
    const original = await sf.api("GET", `/api/runs/${first.id}`);
    expect(original.body).toMatchObject({ targetVersion: 1, fingerprint: first.fingerprint });

    // A new geometry (one O–H bond 0.1 Å longer, so no longer C2v) changes the rendered coordinates too.
    const moved = await sf.api("PATCH", `/api/targets/${water.id}`, {
      xyz: WATER_XYZ.replace(`H ${WATER_H_X} 0 ${WATER_H_Z}`, `H ${WATER_H_X * 1.1} 0 ${WATER_H_Z * 1.1}`),
    });
    expect(moved.status, JSON.stringify(moved.body)).toBe(200);
    const again = await sf.api("POST", `/api/runs/${first.id}/resubmit`, { changes: {} });
    expect(again.body.targetVersion).toBe(3);
    expect(await renderedGeometry(again.body.id)).not.toBe(await renderedGeometry(first.id));
    expect((await renderedGeometry(again.body.id)).split("\n")[0]).toBe("Water to change v3 Cs Cs");
  });

  it("switches the target when the resubmission names another, and merges analysis options per field", async () => {
    const water = await enterTarget("Water to leave");
    const heavy = await enterTarget("Heavy water", WATER_XYZ.replace(/^H /gm, "D "));
    const first = await submit(
      runRequest("light", water.id, { analysis: { temperatureMinK: 500, temperatureMaxK: 20_000 } }),
    );
    const switched = await sf.api("POST", `/api/runs/${first.id}/resubmit`, {
      changes: { targetId: heavy.id, analysis: { temperatureMaxK: 50_000 } },
    });
    expect(switched.status, JSON.stringify(switched.body)).toBe(201);
    expect(switched.body).toMatchObject({ targetId: heavy.id, targetName: "Heavy water", targetVersion: 1 });
    const detail = await sf.api("GET", `/api/runs/${switched.body.id}`);
    expect(detail.body.spec.analysis).toEqual({
      ionizationEnergyMaxEv: 5000,
      temperatureMinK: 500,
      temperatureMaxK: 50_000,
    });
    expect(await renderedGeometry(switched.body.id)).toMatch(/^H 2\.014/m);
  });

  it("refuses to delete a target that runs refer to", async () => {
    const water = await enterTarget("Water in use");
    await submit(runRequest("uses it", water.id));
    const reply = await sf.api("DELETE", `/api/targets/${water.id}`);
    expect(reply.status, JSON.stringify(reply.body)).toBe(409);
    expect(reply.body.error.message).toMatch(/Runs refer to this target \(1 run\)/);
    expect((await sf.api("GET", `/api/targets/${water.id}`)).status).toBe(200);
  });
});
