/**
 * Bad input gets a 4xx with a clear message in the one error shape, and writes nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
let adminToken = "";
let siteToken = "";
let groupId = "";

async function rowCounts() {
  const result = await database.pool.query(
    "select (select count(*) from groups)::int as groups, (select count(*) from invitations)::int as invitations, (select count(*) from memberships)::int as memberships, (select count(*) from audit_log)::int as audit",
  );
  return result.rows[0];
}

async function send(
  path: string,
  token: string,
  init: { method?: string; body?: string; contentType?: string },
) {
  const response = await fetch(`${app.baseUrl}${path}`, {
    method: init.method ?? "POST",
    headers: { authorization: `Bearer ${token}`, "content-type": init.contentType ?? "application/json" },
    body: init.body,
  });
  return { status: response.status, body: await response.json() };
}

beforeAll(async () => {
  database = await createTestDatabase("badinput");
  app = await startTestApp(database);
  const group = await createGroup(database.db, "bad");
  groupId = group.id;
  const admin = await createUser(database.db, "admin");
  await addMember(database.db, admin.id, group.id, "admin");
  adminToken = await tokenFor(database.db, admin);
  siteToken = await tokenFor(database.db, await createUser(database.db, "site", { siteAdmin: true }));
});

afterAll(async () => {
  await app?.close();
  await database?.drop();
});

describe("bad input writes nothing", () => {
  const cases = [
    { name: "malformed JSON", body: '{"email": "a@b.example",', status: 400, code: "malformed_json" },
    {
      name: "oversized body",
      body: JSON.stringify({ email: "a@b.example", pad: "x".repeat(200_000) }),
      status: 413,
      code: "payload_too_large",
    },
    {
      name: "unknown field",
      body: JSON.stringify({ email: "a@b.example", role: "member", admin: true }),
      status: 422,
      code: "validation_failed",
    },
    { name: "wrong type", body: JSON.stringify({ email: 42 }), status: 422, code: "validation_failed" },
    {
      name: "unknown role",
      body: JSON.stringify({ email: "a@b.example", role: "owner" }),
      status: 422,
      code: "validation_failed",
    },
    {
      name: "not an e-mail",
      body: JSON.stringify({ email: "not-an-address" }),
      status: 422,
      code: "validation_failed",
    },
    { name: "a JSON array", body: "[1,2]", status: 422, code: "validation_failed" },
  ];
  for (const c of cases) {
    it(`invitation with ${c.name} → ${c.status} ${c.code}`, async () => {
      const before = await rowCounts();
      const result = await send(`/api/groups/${groupId}/invitations`, adminToken, { body: c.body });
      expect(result.status).toBe(c.status);
      expect(result.body.error.code).toBe(c.code);
      expect(result.body.error.message.length).toBeGreaterThan(10);
      expect(await rowCounts()).toEqual(before);
      expect(app.mailer.sent).toHaveLength(0);
    });
  }

  it("names the offending field in the details of a 422", async () => {
    const result = await send(`/api/groups/${groupId}/invitations`, adminToken, {
      body: JSON.stringify({ email: "nobody" }),
    });
    expect(result.body.error.details).toEqual([{ path: "email", message: "Enter a valid e-mail address." }]);
  });

  it("refuses a group slug with path tricks and keeps the table unchanged", async () => {
    const before = await rowCounts();
    const result = await send("/api/groups", siteToken, {
      body: JSON.stringify({ slug: "../etc", name: "Sneaky" }),
    });
    expect(result.status).toBe(422);
    expect(result.body.error.details[0].path).toBe("slug");
    expect(await rowCounts()).toEqual(before);
  });

  it("refuses a duplicate slug with 409 and no second row", async () => {
    const first = await send("/api/groups", siteToken, {
      body: JSON.stringify({ slug: "twin-group", name: "Twin" }),
    });
    expect(first.status).toBe(201);
    const before = await rowCounts();
    const second = await send("/api/groups", siteToken, {
      body: JSON.stringify({ slug: "twin-group", name: "Twin 2" }),
    });
    expect(second.status).toBe(409);
    expect(await rowCounts()).toEqual(before);
  });

  it("rejects a malformed id in the path with 422", async () => {
    const result = await send("/api/groups/not-a-uuid/members", adminToken, { method: "GET" });
    expect(result.status).toBe(422);
    expect(result.body.error.message).toContain("groupId");
  });

  it("keeps nothing when the invitation e-mail cannot be sent", async () => {
    const before = await rowCounts();
    app.mailer.failNext = true;
    const result = await send(`/api/groups/${groupId}/invitations`, adminToken, {
      body: JSON.stringify({ email: "unlucky@test.example" }),
    });
    expect(result.status).toBe(502);
    expect(result.body.error.code).toBe("mail_failed");
    expect(await rowCounts()).toEqual(before);
  });

  it("rejects an unknown bearer token with 401", async () => {
    const result = await send("/api/groups", "sf_not-a-real-token", { method: "GET" });
    expect(result.status).toBe(401);
    expect(result.body.error.code).toBe("invalid_token");
  });
});
