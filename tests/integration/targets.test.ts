/**
 * Targets through the API: entered as JSON atoms or XYZ text, listed with their isotopologues, read per
 * version; a change makes a new version, an isotopologue has its properties derived again; hostile XYZ
 * text gets a 422 naming the line at fault; other groups see nothing, collaborators only read.
 * The science (point groups, rotational constants) is tested in tests/unit; here the expected values come
 * from calling the science core (`inspectTarget`) on the same atoms, so what is checked is the wiring.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { inspectTarget } from "../../shared/science/geometry";
import { callApi } from "./support/host-test-app";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
let groupId = "";
const tokens = { admin: "", member: "", collaborator: "", otherAdmin: "" };

const call = (who: keyof typeof tokens, method: string, path: string, body?: unknown) =>
  callApi(app.baseUrl, tokens[who], method, path, body);

/*
 * Methane, r(CH) = 1.087 Å, tetrahedral: H at (r/√3)(±1, ±1, ±1) with an even number of minus signs
 * (NIST CCCBDB experimental geometry; from memory).
 */
const CH4_COORD = 1.087 / Math.sqrt(3);
const METHANE_XYZ = [
  "5",
  "methane, r(CH) = 1.087 Å",
  "C 0 0 0",
  `H ${CH4_COORD} ${CH4_COORD} ${CH4_COORD}`,
  `H ${-CH4_COORD} ${-CH4_COORD} ${CH4_COORD}`,
  `H ${-CH4_COORD} ${CH4_COORD} ${-CH4_COORD}`,
  `H ${CH4_COORD} ${-CH4_COORD} ${-CH4_COORD}`,
  "",
].join("\n");
const METHANE_POSITIONS: [number, number, number][] = [
  [0, 0, 0],
  [CH4_COORD, CH4_COORD, CH4_COORD],
  [-CH4_COORD, -CH4_COORD, CH4_COORD],
  [-CH4_COORD, CH4_COORD, -CH4_COORD],
  [CH4_COORD, -CH4_COORD, -CH4_COORD],
];
const methaneForScience = (overrides?: Record<number, number>) =>
  inspectTarget({
    atoms: METHANE_POSITIONS.map((p, i) => ({ symbol: i === 0 ? "C" : "H", positionAngstrom: p })),
    isotopeOverrides: overrides,
  });

/*
 * Water: r(OH) = 0.9578 Å, ∠HOH = 104.48° (NIST CCCBDB experimental geometry; from memory), O at the
 * origin, H at (±r sin(θ/2), 0, r cos(θ/2)).
 */
const WATER_H_X = 0.9578 * Math.sin((104.48 * Math.PI) / 360);
const WATER_H_Z = 0.9578 * Math.cos((104.48 * Math.PI) / 360);
const waterAtoms = (charges?: [number | null, number | null, number | null]) => [
  { symbol: "O", xAngstrom: 0, yAngstrom: 0, zAngstrom: 0, partialChargeE: charges?.[0] ?? null },
  {
    symbol: "H",
    xAngstrom: WATER_H_X,
    yAngstrom: 0,
    zAngstrom: WATER_H_Z,
    partialChargeE: charges?.[1] ?? null,
  },
  {
    symbol: "H",
    xAngstrom: -WATER_H_X,
    yAngstrom: 0,
    zAngstrom: WATER_H_Z,
    partialChargeE: charges?.[2] ?? null,
  },
];

let nameCounter = 0;
const uniqueName = (prefix: string) => `${prefix} ${++nameCounter}`;

beforeAll(async () => {
  database = await createTestDatabase("targets");
  app = await startTestApp(database);
  const db = database.db;
  groupId = (await createGroup(db, "targets")).id;
  const otherGroupId = (await createGroup(db, "elsewhere")).id;
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
  await app?.close();
  await database?.drop();
});

async function enterMethane(name = uniqueName("Methane"), who: keyof typeof tokens = "member") {
  const reply = await call(who, "POST", `/api/groups/${groupId}/targets`, { name, xyz: METHANE_XYZ });
  expect(reply.status, reply.text).toBe(201);
  return reply.body;
}

describe("entering targets", () => {
  it("takes JSON atoms, derives the properties and picks the lowest multiplicity", async () => {
    const reply = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: "Water",
      atoms: waterAtoms(),
      notes: "CCCBDB geometry",
    });
    expect(reply.status, reply.text).toBe(201);
    const expected = inspectTarget({
      atoms: waterAtoms().map((a) => ({
        symbol: a.symbol,
        positionAngstrom: [a.xAngstrom, a.yAngstrom, a.zAngstrom],
      })),
    });
    expect(reply.body).toMatchObject({
      name: "Water",
      groupId,
      parentTargetId: null,
      latestVersion: 1,
      formula: "H2O",
      pointGroup: "C2v",
      abelianSubgroup: "C2v",
      runCount: 0,
      isotopologues: [],
      current: { version: 1, charge: 0, multiplicity: 1, notes: "CCCBDB geometry" },
    });
    expect(reply.body.current.derived.rotationalConstantsCm1).toEqual(expected.rotationalConstantsCm1);
    expect(reply.body.current.derived.atoms).toEqual(expected.atoms);
    expect(reply.body.current.derived.dipole).toBeNull();
    expect(reply.body.versions).toHaveLength(1);
  });

  it("takes the text of an XYZ file, naming elements as the science core writes them", async () => {
    const reply = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Methane from XYZ"),
      xyz: METHANE_XYZ.replace("C 0 0 0", "c 0 0 0"),
    });
    expect(reply.status, reply.text).toBe(201);
    expect(reply.body).toMatchObject({
      formula: "CH4",
      pointGroup: "Td",
      abelianSubgroup: methaneForScience().abelianSubgroup,
    });
    expect(reply.body.current.atoms[0]).toEqual({
      symbol: "C",
      massNumber: null,
      xAngstrom: 0,
      yAngstrom: 0,
      zAngstrom: 0,
      partialChargeE: null,
    });
    expect(reply.body.current.atoms[1].xAngstrom).toBeCloseTo(CH4_COORD, 12);
  });

  it("gives the dipole about the centre of mass from partial charges on every atom", async () => {
    const reply = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Water with charges"),
      atoms: waterAtoms([-0.8, 0.4, 0.4]),
    });
    expect(reply.status, reply.text).toBe(201);
    // Analytic: a neutral point-charge set has d = Σ qᵢ rᵢ about any origin: 2 × 0.4 e × z_H along the C2
    // axis; 1 e·Å = 4.80320 D (e = 1.602176634e-19 C, 1 D = 3.33564e-30 C·m, CODATA 2018).
    const expectedDebye = 2 * 0.4 * WATER_H_Z * 4.80320471;
    expect(reply.body.current.derived.dipole.magnitudeDebye).toBeCloseTo(expectedDebye, 4);
  });

  it("refuses partial charges on some atoms only, and a multiplicity the electron count forbids", async () => {
    const some = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Half charged"),
      atoms: waterAtoms([-0.8, 0.4, null]),
    });
    expect(some.status, some.text).toBe(422);
    expect(some.body.error.message).toMatch(/every atom or for none; atom 3/);
    const doublet = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Doublet water"),
      atoms: waterAtoms(),
      multiplicity: 2,
    });
    expect(doublet.status, doublet.text).toBe(422);
    expect(doublet.body.error.message).toMatch(/Multiplicity 2 is impossible with 10 electrons/);
    const cation = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Water cation"),
      atoms: waterAtoms(),
      charge: 1,
    });
    expect(cation.status, cation.text).toBe(201);
    expect(cation.body.current).toMatchObject({ charge: 1, multiplicity: 2 });
    expect(cation.body.current.derived.electronCount).toBe(9);
  });

  it("refuses a second target of the same name in the group, whatever the case", async () => {
    const name = uniqueName("Twin");
    await enterMethane(name);
    const again = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: name.toUpperCase(),
      xyz: METHANE_XYZ,
    });
    expect(again.status, again.text).toBe(409);
  });
});

describe("hostile XYZ text", () => {
  const cases: { what: string; xyz: string; line: number; message: RegExp }[] = [
    {
      what: "an unknown element",
      xyz: "3\nwater\nO 0 0 0\nH 0.757 0 0.587\nXx -0.757 0 0.587\n",
      line: 5,
      message: /Line 5: unknown element symbol "Xx"/,
    },
    {
      what: "fewer atoms than the count line announces",
      xyz: "4\nwater\nO 0 0 0\nH 0.757 0 0.587\nH -0.757 0 0.587\n",
      line: 1,
      message: /Line 1: the XYZ header announces 4 atoms but only 3/,
    },
    {
      what: "more atom lines than announced",
      xyz: "2\nwater\nO 0 0 0\nH 0.757 0 0.587\nH -0.757 0 0.587\n",
      line: 5,
      message: /Line 5: unexpected text after the 2 atoms/,
    },
    {
      what: "a coordinate that is not a number",
      xyz: "3\nwater\nO 0 0 0\nH 0.757 zero 0.587\nH -0.757 0 0.587\n",
      line: 4,
      message: /Line 4: y coordinate "zero" is not a number/,
    },
    {
      what: "a coordinate that is not finite",
      xyz: "3\nwater\nO 0 0 1e999\nH 0.757 0 0.587\nH -0.757 0 0.587\n",
      line: 3,
      message: /Line 3: z coordinate "1e999" is not finite/,
    },
    {
      what: "a coordinate far outside any molecule",
      xyz: "2\nfar\nH 0 0 0\nH 0 0 20000\n",
      line: 4,
      message: /Line 4: the z coordinate 20000 Å is more than 10000 Å/,
    },
    {
      what: "two atoms on top of each other",
      xyz: "3\nwater\nO 0 0 0\nH 0.757 0 0.587\nH 0.758 0 0.587\n",
      line: 5,
      message: /Line 5: this atom is only 0\.0010 Å from the atom on line 4/,
    },
    {
      what: "an isotope that does not exist",
      xyz: "2\ncarbon monoxide\nC@99 0 0 0\nO 0 0 1.128\n",
      line: 3,
      message: /Line 3: C-99 is not a known isotope/,
    },
    {
      what: "a NUL byte",
      xyz: "2\nhydrogen\nH 0 0 0\nH 0 0\u0000 0.74\n",
      line: 4,
      message: /Line 4: contains a NUL byte; is this a binary file/,
    },
    {
      what: "other control bytes of a binary file",
      xyz: "2\nhydrogen\u0001\u0002\nH 0 0 0\nH 0 0 0.74\n",
      line: 2,
      message: /Line 2: contains the control character U\+0001/,
    },
    {
      what: "a broken Unicode character",
      xyz: "2\nhydrogen \ud800\nH 0 0 0\nH 0 0 0.74\n",
      line: 2,
      message: /Line 2: contains a broken Unicode character/,
    },
  ];
  for (const hostile of cases) {
    it(`answers ${hostile.what} with a 422 naming line ${hostile.line}`, async () => {
      const reply = await call("member", "POST", `/api/groups/${groupId}/targets`, {
        name: uniqueName("Hostile"),
        xyz: hostile.xyz,
      });
      expect(reply.status, reply.text).toBe(422);
      expect(reply.body.error.code).toBe("invalid_xyz");
      expect(reply.body.error.message).toMatch(hostile.message);
      expect(reply.body.error.details.line).toBe(hostile.line);
    });
  }

  it("refuses more atoms than a target may have", async () => {
    const lines = Array.from({ length: 501 }, (_, i) => `He ${i * 3} 0 0`);
    const reply = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Chain"),
      xyz: `501\nchain\n${lines.join("\n")}\n`,
    });
    expect(reply.status, reply.text).toBe(422);
    expect(reply.body.error.message).toMatch(/501 atoms; a target has at most 500/);
  });

  it("refuses XYZ text over 256 KiB with a 422 and a larger body with a 413", async () => {
    const comment = "x".repeat(256 * 1024);
    const long = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Long"),
      xyz: `1\n${comment}\nHe 0 0 0\n`,
    });
    expect(long.status, long.text).toBe(422);
    expect(long.body.error.message).toMatch(/xyz/);
    const huge = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Huge"),
      xyz: `1\n${"x".repeat(1024 * 1024)}\nHe 0 0 0\n`,
    });
    expect(huge.status, huge.text).toBe(413);
    // Multi-byte characters: within the character limit, over the byte limit.
    const wide = await call("member", "POST", `/api/groups/${groupId}/targets`, {
      name: uniqueName("Wide"),
      xyz: `1\n${"é".repeat(140 * 1024)}\nHe 0 0 0\n`,
    });
    expect(wide.status, wide.text).toBe(422);
    expect(wide.body.error.message).toMatch(/at most 262144 bytes/);
  });

  it("refuses a body that is not UTF-8 before reading it (400, as every route)", async () => {
    const body = Buffer.concat([
      Buffer.from(`{"name":"Bytes","xyz":"1\\n`),
      Buffer.from([0xff, 0xfe, 0xc3]),
      Buffer.from(`\\nHe 0 0 0\\n"}`),
    ]);
    const response = await fetch(`${app.baseUrl}/api/groups/${groupId}/targets`, {
      method: "POST",
      headers: { authorization: `Bearer ${tokens.member}`, "content-type": "application/json" },
      body,
    });
    expect(response.status).toBe(400);
    expect((await response.json()).error.code).toBe("invalid_encoding");
  });
});

describe("reading, changing and deriving targets", () => {
  it("makes a new version on a change and keeps the old one readable; a new name alone makes none", async () => {
    const target = await enterMethane();
    const renamed = await call("member", "PATCH", `/api/targets/${target.id}`, {
      name: `${target.name} (renamed)`,
    });
    expect(renamed.status, renamed.text).toBe(200);
    expect(renamed.body).toMatchObject({ name: `${target.name} (renamed)`, latestVersion: 1 });

    const stretched = METHANE_XYZ.replace(`H ${CH4_COORD} ${CH4_COORD} ${CH4_COORD}`, "H 0.8 0.8 0.8");
    const changed = await call("member", "PATCH", `/api/targets/${target.id}`, {
      xyz: stretched,
      notes: "one bond stretched",
    });
    expect(changed.status, changed.text).toBe(200);
    expect(changed.body).toMatchObject({ latestVersion: 2, pointGroup: "C3v", formula: "CH4" });
    expect(changed.body.current).toMatchObject({ version: 2, notes: "one bond stretched" });
    expect(changed.body.versions.map((v: { version: number }) => v.version)).toEqual([1, 2]);

    const first = await call("collaborator", "GET", `/api/targets/${target.id}/versions/1`);
    expect(first.status, first.text).toBe(200);
    expect(first.body).toMatchObject({ version: 1, notes: "" });
    expect(first.body.derived.pointGroup).toBe("Td");
    const missing = await call("collaborator", "GET", `/api/targets/${target.id}/versions/3`);
    expect(missing.status, missing.text).toBe(404);
    const notNumber = await call("collaborator", "GET", `/api/targets/${target.id}/versions/first`);
    expect(notNumber.status, notNumber.text).toBe(422);

    // The multiplicity is kept unless named; null asks for the lowest again.
    const cation = await call("member", "PATCH", `/api/targets/${target.id}`, { charge: 1 });
    expect(cation.status, cation.text).toBe(422);
    const lowest = await call("member", "PATCH", `/api/targets/${target.id}`, {
      charge: 1,
      multiplicity: null,
    });
    expect(lowest.status, lowest.text).toBe(200);
    expect(lowest.body.current).toMatchObject({ version: 3, charge: 1, multiplicity: 2 });
  });

  it("derives CH3D from CH4: C3v, other masses and rotational constants, listed under its parent", async () => {
    const methane = await enterMethane();
    const reply = await call("member", "POST", `/api/targets/${methane.id}/isotopologues`, {
      name: uniqueName("CH3D"),
      isotopes: [{ atom: 2, massNumber: 2 }],
    });
    expect(reply.status, reply.text).toBe(201);
    const expected = methaneForScience({ 2: 2 });
    expect(reply.body).toMatchObject({
      parentTargetId: methane.id,
      formula: "CH3[2H]",
      pointGroup: "C3v",
      abelianSubgroup: "Cs",
      latestVersion: 1,
    });
    expect(reply.body.current.atoms[1].massNumber).toBe(2);
    expect(reply.body.current.atoms[0].massNumber).toBeNull();
    expect(reply.body.current.derived.rotationalConstantsCm1).toEqual(expected.rotationalConstantsCm1);
    expect(reply.body.current.derived.totalMassU).toBeCloseTo(expected.totalMassU, 12);
    // Other rotational constants than the parent's: CH4 is a spherical top (A = B = C); in CH3D the moment
    // about the C–D axis is CH4's (D lies on it), the two perpendicular ones grow, so B and C drop.
    const [parentA, parentB] = methane.current.derived.rotationalConstantsCm1;
    const [a, b, c] = reply.body.current.derived.rotationalConstantsCm1;
    expect(a).toBeCloseTo(parentA, 9);
    expect(b).toBeLessThan(parentB - 1);
    expect(c).toBeCloseTo(b, 9);

    // From an isotopologue: hung under the root, with both deuterium atoms.
    const twice = await call("member", "POST", `/api/targets/${reply.body.id}/isotopologues`, {
      name: uniqueName("CH2D2"),
      isotopes: [{ atom: 3, massNumber: 2 }],
    });
    expect(twice.status, twice.text).toBe(201);
    expect(twice.body).toMatchObject({ parentTargetId: methane.id, formula: "CH2[2H]2", pointGroup: "C2v" });

    const list = await call("collaborator", "GET", `/api/groups/${groupId}/targets`);
    expect(list.status, list.text).toBe(200);
    const ids = list.body.targets.map((t: { id: string }) => t.id);
    expect(ids).toContain(methane.id);
    expect(ids).not.toContain(reply.body.id);
    const listed = list.body.targets.find((t: { id: string }) => t.id === methane.id);
    expect(listed.isotopologues.map((t: { id: string }) => t.id).sort()).toEqual(
      [reply.body.id, twice.body.id].sort(),
    );
    const detail = await call("collaborator", "GET", `/api/targets/${methane.id}`);
    expect(detail.body.isotopologues).toHaveLength(2);
  });

  it("refuses an isotope choice naming no atom, or an isotope the element does not have", async () => {
    const methane = await enterMethane();
    const noAtom = await call("member", "POST", `/api/targets/${methane.id}/isotopologues`, {
      name: uniqueName("Nothing"),
      isotopes: [{ atom: 6, massNumber: 2 }],
    });
    expect(noAtom.status, noAtom.text).toBe(422);
    expect(noAtom.body.error.message).toMatch(/isotopes\.0\.atom: .* has atoms 1 to 5; there is no atom 6/);
    const noIsotope = await call("member", "POST", `/api/targets/${methane.id}/isotopologues`, {
      name: uniqueName("Nothing"),
      isotopes: [{ atom: 1, massNumber: 2 }],
    });
    expect(noIsotope.status, noIsotope.text).toBe(422);
    expect(noIsotope.body.error.message).toMatch(
      /isotopes\.0\.massNumber: Atom 1: C-2 is not a known isotope/,
    );
  });

  it("deletes a target only without isotopologues, and only for admins or its author", async () => {
    const methane = await enterMethane(uniqueName("Methane"), "admin");
    const child = await call("member", "POST", `/api/targets/${methane.id}/isotopologues`, {
      name: uniqueName("CH3D"),
      isotopes: [{ atom: 2, massNumber: 2 }],
    });
    expect(child.status, child.text).toBe(201);
    const byMember = await call("member", "DELETE", `/api/targets/${methane.id}`);
    expect(byMember.status, byMember.text).toBe(403);
    const withChild = await call("admin", "DELETE", `/api/targets/${methane.id}`);
    expect(withChild.status, withChild.text).toBe(409);
    expect(withChild.body.error.message).toMatch(/isotopologues .* were derived from this target/);
    const childGone = await call("member", "DELETE", `/api/targets/${child.body.id}`);
    expect(childGone.status, childGone.text).toBe(204);
    const gone = await call("admin", "DELETE", `/api/targets/${methane.id}`);
    expect(gone.status, gone.text).toBe(204);
    expect((await call("admin", "GET", `/api/targets/${methane.id}`)).status).toBe(404);
    const { rows } = await database.pool.query(
      "select action, details->>'name' as name from audit_log where target_id = $1 order by id",
      [methane.id],
    );
    expect(rows.map((r) => r.action)).toEqual(["target.create", "target.delete"]);
    expect(rows[1].name).toBe(methane.name);
  });

  it("records who entered, changed and derived targets in the audit log", async () => {
    const methane = await enterMethane();
    await call("member", "PATCH", `/api/targets/${methane.id}`, {
      notes: "checked",
      name: `${methane.name}!`,
    });
    const child = await call("member", "POST", `/api/targets/${methane.id}/isotopologues`, {
      name: uniqueName("CH3D"),
      isotopes: [{ atom: 2, massNumber: 2 }],
    });
    const { rows } = await database.pool.query(
      "select action, details from audit_log where target_id = any($1) order by id",
      [[methane.id, child.body.id]],
    );
    expect(rows.map((r) => r.action)).toEqual([
      "target.create",
      "target.update",
      "target.rename",
      "target.isotopologue_create",
    ]);
    expect(rows[1].details).toMatchObject({ version: 2 });
    expect(rows[2].details).toMatchObject({ from: methane.name, name: `${methane.name}!` });
    expect(rows[3].details).toMatchObject({
      parent: `${methane.name}!`,
      isotopes: [{ atom: 2, massNumber: 2 }],
    });
  });
});

describe("who may see and change targets", () => {
  it("hides a group's targets from other groups (404) and lets collaborators only read (403)", async () => {
    const methane = await enterMethane();
    for (const [method, path, body] of [
      ["GET", `/api/targets/${methane.id}`, undefined],
      ["GET", `/api/targets/${methane.id}/versions/1`, undefined],
      ["PATCH", `/api/targets/${methane.id}`, { notes: "mine now" }],
      [
        "POST",
        `/api/targets/${methane.id}/isotopologues`,
        { name: "x", isotopes: [{ atom: 2, massNumber: 2 }] },
      ],
      ["DELETE", `/api/targets/${methane.id}`, undefined],
      ["GET", `/api/groups/${groupId}/targets`, undefined],
      ["POST", `/api/groups/${groupId}/targets`, { name: uniqueName("Intruder"), xyz: METHANE_XYZ }],
    ] as const) {
      const reply = await call("otherAdmin", method, path, body);
      expect(reply.status, `${method} ${path}: ${reply.text}`).toBe(404);
    }
    for (const [method, path, body] of [
      ["PATCH", `/api/targets/${methane.id}`, { notes: "mine now" }],
      [
        "POST",
        `/api/targets/${methane.id}/isotopologues`,
        { name: "x", isotopes: [{ atom: 2, massNumber: 2 }] },
      ],
      ["DELETE", `/api/targets/${methane.id}`, undefined],
      ["POST", `/api/groups/${groupId}/targets`, { name: uniqueName("Reader"), xyz: METHANE_XYZ }],
    ] as const) {
      const reply = await call("collaborator", method, path, body);
      expect(reply.status, `${method} ${path}: ${reply.text}`).toBe(403);
    }
    const read = await call("collaborator", "GET", `/api/targets/${methane.id}`);
    expect(read.status, read.text).toBe(200);
    const after = await call("member", "GET", `/api/targets/${methane.id}`);
    expect(after.body).toMatchObject({ latestVersion: 1, isotopologues: [] });
  });
});
