/**
 * Group rules end to end through the API: invitations by e-mail, accepting them, role changes and the
 * guarantee that a group always keeps an admin.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { addMember, createGroup, createUser, tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;

async function call(token: string, method: string, path: string, body?: unknown) {
  const response = await fetch(`${app.baseUrl}${path}`, {
    method,
    headers: { authorization: `Bearer ${token}`, "content-type": "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await response.text();
  return { status: response.status, body: text ? JSON.parse(text) : null };
}

beforeAll(async () => {
  database = await createTestDatabase("groups");
  app = await startTestApp(database);
});
afterAll(async () => {
  await app?.close();
  await database?.drop();
});

describe("invitations", () => {
  it("sends a link that the invitee, and only the invitee, can accept once", async () => {
    const group = await createGroup(database.db, "inv");
    const admin = await createUser(database.db, "admin");
    await addMember(database.db, admin.id, group.id, "admin");
    const invitee = await createUser(database.db, "invitee");
    const bystander = await createUser(database.db, "bystander");
    const adminToken = await tokenFor(database.db, admin);

    const created = await call(adminToken, "POST", `/api/groups/${group.id}/invitations`, {
      email: invitee.email.toUpperCase(),
      role: "collaborator",
    });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ email: invitee.email, role: "collaborator", status: "pending" });
    const mail = app.mailer.sent.at(-1)!;
    expect(mail.to).toBe(invitee.email);
    const secret = /\/invitations\/([A-Za-z0-9_-]+)/.exec(mail.text)![1]!;

    const wrongPerson = await call(
      await tokenFor(database.db, bystander),
      "POST",
      `/api/invitations/${secret}/accept`,
    );
    expect(wrongPerson.status).toBe(403);
    expect(wrongPerson.body.error.message).toContain(invitee.email);

    const inviteeToken = await tokenFor(database.db, invitee);
    const accepted = await call(inviteeToken, "POST", `/api/invitations/${secret}/accept`);
    expect(accepted).toEqual({ status: 200, body: { groupId: group.id, role: "collaborator" } });
    const again = await call(inviteeToken, "POST", `/api/invitations/${secret}/accept`);
    expect(again.status).toBe(409);

    const members = await call(adminToken, "GET", `/api/groups/${group.id}/members`);
    expect(members.body.members.map((m: { email: string }) => m.email)).toContain(invitee.email);
    const audit = await call(adminToken, "GET", `/api/groups/${group.id}/audit`);
    expect(audit.body.entries.map((e: { action: string }) => e.action)).toEqual(
      expect.arrayContaining(["invitation.create", "invitation.accept"]),
    );
  });

  it("replaces a pending invitation to the same address, so the old link stops working", async () => {
    const group = await createGroup(database.db, "resend");
    const admin = await createUser(database.db, "admin");
    await addMember(database.db, admin.id, group.id, "admin");
    const invitee = await createUser(database.db, "invitee");
    const adminToken = await tokenFor(database.db, admin);
    await call(adminToken, "POST", `/api/groups/${group.id}/invitations`, { email: invitee.email });
    const firstSecret = /\/invitations\/([A-Za-z0-9_-]+)/.exec(app.mailer.sent.at(-1)!.text)![1]!;
    await call(adminToken, "POST", `/api/groups/${group.id}/invitations`, { email: invitee.email });
    const result = await call(
      await tokenFor(database.db, invitee),
      "POST",
      `/api/invitations/${firstSecret}/accept`,
    );
    expect(result.status).toBe(410);
    expect(result.body.error.code).toBe("invitation_revoked");
  });

  it("refuses to invite someone who is already a member", async () => {
    const group = await createGroup(database.db, "dup");
    const admin = await createUser(database.db, "admin");
    await addMember(database.db, admin.id, group.id, "admin");
    const result = await call(
      await tokenFor(database.db, admin),
      "POST",
      `/api/groups/${group.id}/invitations`,
      {
        email: admin.email,
      },
    );
    expect(result.status).toBe(409);
  });
});

describe("roles", () => {
  it("never leaves a group without an admin", async () => {
    const group = await createGroup(database.db, "last");
    const admin = await createUser(database.db, "admin");
    await addMember(database.db, admin.id, group.id, "admin");
    const token = await tokenFor(database.db, admin);
    const demote = await call(token, "PATCH", `/api/groups/${group.id}/members/${admin.id}`, {
      role: "member",
    });
    expect(demote.status).toBe(409);
    const remove = await call(token, "DELETE", `/api/groups/${group.id}/members/${admin.id}`);
    expect(remove.status).toBe(409);

    const second = await createUser(database.db, "second");
    await addMember(database.db, second.id, group.id, "member");
    const promote = await call(token, "PATCH", `/api/groups/${group.id}/members/${second.id}`, {
      role: "admin",
    });
    expect(promote.body).toMatchObject({ userId: second.id, role: "admin" });
    const demoteSelf = await call(token, "PATCH", `/api/groups/${group.id}/members/${admin.id}`, {
      role: "member",
    });
    expect(demoteSelf.status).toBe(200);
  });

  it("lists role changes and removals in the group's activity by name, not by id", async () => {
    const group = await createGroup(database.db, "activity");
    const admin = await createUser(database.db, "admin");
    const promoted = await createUser(database.db, "promoted");
    const removed = await createUser(database.db, "removed");
    await addMember(database.db, admin.id, group.id, "admin");
    await addMember(database.db, promoted.id, group.id, "member");
    await addMember(database.db, removed.id, group.id, "member");
    const token = await tokenFor(database.db, admin);
    const promote = await call(token, "PATCH", `/api/groups/${group.id}/members/${promoted.id}`, {
      role: "admin",
    });
    expect(promote.status).toBe(200);
    const remove = await call(token, "DELETE", `/api/groups/${group.id}/members/${removed.id}`);
    expect(remove.status).toBe(204);

    const audit = await call(token, "GET", `/api/groups/${group.id}/audit`);
    expect(audit.status).toBe(200);
    // Contract (shared/schemas/audit.ts): the actor's display name and the target's name; a member who
    // left the group keeps their name but no longer counts as an existing target.
    expect(audit.body.entries).toEqual([
      expect.objectContaining({
        action: "member.remove",
        actor: admin.displayName,
        targetType: "user",
        targetId: removed.id,
        targetName: removed.displayName,
        targetExists: false,
      }),
      expect.objectContaining({
        action: "member.role_change",
        actor: admin.displayName,
        targetType: "user",
        targetId: promoted.id,
        targetName: promoted.displayName,
        targetExists: true,
        details: { from: "member", to: "admin" },
      }),
    ]);
  });

  it("keeps one admin when two admins demote each other at the same moment", async () => {
    const group = await createGroup(database.db, "race");
    const a = await createUser(database.db, "a");
    const b = await createUser(database.db, "b");
    await addMember(database.db, a.id, group.id, "admin");
    await addMember(database.db, b.id, group.id, "admin");
    const [ra, rb] = await Promise.all([
      call(await tokenFor(database.db, a), "PATCH", `/api/groups/${group.id}/members/${b.id}`, {
        role: "member",
      }),
      call(await tokenFor(database.db, b), "PATCH", `/api/groups/${group.id}/members/${a.id}`, {
        role: "member",
      }),
    ]);
    // One demotion wins. The other either finds its caller no longer an admin (403, when the first had
    // committed before its role check) or, under the row lock, the group down to its last admin (409).
    const statuses = [ra.status, rb.status].sort();
    expect(statuses[0]).toBe(200);
    expect([403, 409]).toContain(statuses[1]);
    const admins = await database.pool.query(
      "select count(*)::int as n from memberships where group_id = $1 and role = 'admin'",
      [group.id],
    );
    expect(admins.rows[0].n).toBe(1);
  });

  it("lists only the caller's groups, and every group for a site admin", async () => {
    const mine = await createGroup(database.db, "mine");
    await createGroup(database.db, "theirs");
    const user = await createUser(database.db, "scoped");
    await addMember(database.db, user.id, mine.id, "member");
    const listed = await call(await tokenFor(database.db, user), "GET", "/api/groups");
    expect(listed.body.groups.map((g: { id: string }) => g.id)).toEqual([mine.id]);
    expect(listed.body.groups[0].myRole).toBe("member");
    const site = await createUser(database.db, "site", { siteAdmin: true });
    const all = await call(await tokenFor(database.db, site), "GET", "/api/groups");
    const total = await database.pool.query("select count(*)::int as n from groups");
    expect(all.body.groups).toHaveLength(total.rows[0].n);
  });
});
