/**
 * Entering a target by uploading an XYZ file (multipart/form-data, field "file"): a good file becomes a
 * target with the properties the science core derives; a file over 256 KiB is a 413 naming the limit; a
 * binary file is a 422 naming the line; other groups get a 404 and collaborators a 403, before the file is
 * read. Expected values come from the science core on the same atoms (the science is tested in tests/unit).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { MAX_XYZ_BYTES } from "../../shared/schemas/targets";
import { inspectTarget } from "../../shared/science/geometry";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
let groupId = "";
const tokens = { member: "", collaborator: "", otherAdmin: "" };

// Hydrogen fluoride, r(HF) = 0.917 Å (NIST CCCBDB experimental geometry; from memory).
const HF_XYZ = "2\nhydrogen fluoride\nH 0 0 0\nF 0 0 0.917\n";

async function upload(
  who: keyof typeof tokens,
  file: { bytes: Uint8Array | string; name?: string } | null,
  fields: Record<string, string> = {},
  group = groupId,
) {
  const form = new FormData();
  for (const [key, value] of Object.entries(fields)) form.append(key, value);
  if (file)
    form.append(
      "file",
      new Blob([typeof file.bytes === "string" ? file.bytes : new Uint8Array(file.bytes)]),
      file.name ?? "molecule.xyz",
    );
  const response = await fetch(`${app.baseUrl}/api/groups/${group}/targets/upload`, {
    method: "POST",
    headers: { authorization: `Bearer ${tokens[who]}` },
    body: form,
  });
  const text = await response.text();
  return { status: response.status, text, body: text ? JSON.parse(text) : null };
}

beforeAll(async () => {
  database = await createTestDatabase("targets_upload");
  app = await startTestApp(database);
  const db = database.db;
  groupId = (await createGroup(db, "uploads")).id;
  const otherGroupId = (await createGroup(db, "elsewhere")).id;
  const member = await createUser(db, "member");
  const collaborator = await createUser(db, "collaborator");
  const otherAdmin = await createUser(db, "other-admin");
  await addMember(db, member.id, groupId, "member");
  await addMember(db, collaborator.id, groupId, "collaborator");
  await addMember(db, otherAdmin.id, otherGroupId, "admin");
  tokens.member = await tokenFor(db, member);
  tokens.collaborator = await tokenFor(db, collaborator);
  tokens.otherAdmin = await tokenFor(db, otherAdmin);
});

afterAll(async () => {
  await app?.close();
  await database?.drop();
});

describe("uploading an XYZ file", () => {
  it("enters a good file as a target with derived properties", async () => {
    const reply = await upload("member", { bytes: HF_XYZ }, { name: "Hydrogen fluoride", charge: "0" });
    expect(reply.status, reply.text).toBe(201);
    const expected = inspectTarget({
      atoms: [
        { symbol: "H", positionAngstrom: [0, 0, 0] },
        { symbol: "F", positionAngstrom: [0, 0, 0.917] },
      ],
    });
    expect(reply.body).toMatchObject({
      name: "Hydrogen fluoride",
      formula: "FH",
      pointGroup: "C∞v",
      latestVersion: 1,
    });
    expect(reply.body.current.multiplicity).toBe(1);
    expect(reply.body.current.derived.rotationalConstantsCm1[1]).toBeCloseTo(
      expected.rotationalConstantsCm1[1]!,
      9,
    );
    expect(reply.body.current.atoms.map((a: { symbol: string }) => a.symbol)).toEqual(["H", "F"]);
  });

  it("refuses a file over 256 KiB with a 413 naming the limit", async () => {
    const big = `${HF_XYZ}${"#".repeat(MAX_XYZ_BYTES)}`;
    const reply = await upload("member", { bytes: big }, { name: "Too big" });
    expect(reply.status, reply.text).toBe(413);
    expect(reply.body.error).toMatchObject({
      code: "file_too_large",
      details: { path: "file", maxBytes: MAX_XYZ_BYTES },
    });
    expect(reply.body.error.message).toContain("256 KiB");
  });

  it("refuses a binary file with a 422 naming the line", async () => {
    const bytes = new Uint8Array([
      ...new TextEncoder().encode("2\ncomment\nH 0 0 0\n"),
      0xff,
      0xfe,
      0x00,
      0x01,
    ]);
    const reply = await upload("member", { bytes, name: "molecule.bin" }, { name: "Binary" });
    expect(reply.status, reply.text).toBe(422);
    expect(reply.body.error).toMatchObject({ code: "invalid_xyz", details: { path: "file", line: 4 } });
    expect(reply.body.error.message).toMatch(/Line 4 of molecule\.bin is not UTF-8 text/);

    // Valid UTF-8 with a NUL byte: the XYZ reader names its line.
    const nul = await upload("member", { bytes: "2\ncomment\nH 0 0 0\nF 0 0\u0000 0.9\n" }, { name: "NUL" });
    expect(nul.status, nul.text).toBe(422);
    expect(nul.body.error.details).toMatchObject({ path: "xyz", line: 4 });
  });

  it("names a line the XYZ reader cannot use and a field that is wrong", async () => {
    const short = await upload("member", { bytes: "2\nhf\nH 0 0 0\nF 0 0\n" }, { name: "Short line" });
    expect(short.status, short.text).toBe(422);
    expect(short.body.error.details).toMatchObject({ line: 4 });

    const charge = await upload("member", { bytes: HF_XYZ }, { name: "Bad charge", charge: "one" });
    expect(charge.status, charge.text).toBe(422);
    expect(charge.text).toContain("charge must be a whole number from -10 to 10");

    const none = await upload("member", null, { name: "No file" });
    expect(none.status, none.text).toBe(422);
    expect(none.body.error).toMatchObject({ code: "missing_file", details: { path: "file" } });

    const two = new FormData();
    two.append("name", "Two files");
    two.append("file", new Blob([HF_XYZ]), "a.xyz");
    two.append("file", new Blob([HF_XYZ]), "b.xyz");
    const twoReply = await fetch(`${app.baseUrl}/api/groups/${groupId}/targets/upload`, {
      method: "POST",
      headers: { authorization: `Bearer ${tokens.member}` },
      body: two,
    });
    expect(twoReply.status).toBe(422);

    const json = await fetch(`${app.baseUrl}/api/groups/${groupId}/targets/upload`, {
      method: "POST",
      headers: { authorization: `Bearer ${tokens.member}`, "content-type": "application/json" },
      body: JSON.stringify({ name: "JSON", xyz: HF_XYZ }),
    });
    expect(json.status).toBe(415);
  });

  it("answers another group's admin with 404 and a collaborator with 403, even for a file too big", async () => {
    const big = `${HF_XYZ}${"#".repeat(MAX_XYZ_BYTES)}`;
    const other = await upload("otherAdmin", { bytes: big }, { name: "Elsewhere" });
    expect(other.status, other.text).toBe(404);
    const collaborator = await upload("collaborator", { bytes: HF_XYZ }, { name: "Read only" });
    expect(collaborator.status, collaborator.text).toBe(403);
    const list = await fetch(`${app.baseUrl}/api/groups/${groupId}/targets`, {
      headers: { authorization: `Bearer ${tokens.member}` },
    }).then((r) => r.json());
    // Only the good file of the first test became a target: nothing was saved half-way.
    expect(list.targets.map((t: { name: string }) => t.name)).toEqual(["Hydrogen fluoride"]);
  });
});
