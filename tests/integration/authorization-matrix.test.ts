/**
 * Every API route × every kind of caller gets exactly the status it should. Callers authenticate with
 * API tokens (the same principal as a browser session; the session path is covered in sign-in.test.ts).
 * Rule being checked (Sigmaflow's access policy): deny by default; a group one does not belong to is a
 * 404; a role too low is a 403; site admins may do everything.
 */
import { randomBytes, randomUUID } from "node:crypto";
import { afterAll, beforeAll } from "vitest";
import { hashSecret } from "../../server/auth/tokens";
import { invitations } from "../../server/db/schema";
import {
  type Caller,
  createMatrixCallers,
  describeMatrix,
  everyone,
  groupAdminOnly,
  groupRead,
  type MatrixCase,
  signedIn,
  siteAdminOnly,
} from "./support/authorization-matrix";
import { addMember, createUser, tokenFor } from "./support/people";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;
let app: Awaited<ReturnType<typeof startTestApp>>;
const tokens = new Map<Caller, string>();
let groupId = "";
let groupAdminId = "";

async function freshMember(): Promise<string> {
  const user = await createUser(database.db, "removable");
  await addMember(database.db, user.id, groupId, "member");
  return user.id;
}

async function freshInvitation(email = `invitee-${randomBytes(3).toString("hex")}@test.example`) {
  const secret = randomBytes(32).toString("base64url");
  const [row] = await database.db
    .insert(invitations)
    .values({
      groupId,
      email,
      role: "member",
      tokenHash: hashSecret(secret),
      invitedBy: groupAdminId,
      expiresAt: new Date(Date.now() + 86_400_000),
    })
    .returning();
  return { id: row!.id, secret };
}

const CASES: MatrixCase[] = [
  { name: "health", method: "GET", path: () => "/api/health", expected: everyone(200) },
  { name: "me", method: "GET", path: () => "/api/me", expected: signedIn(200) },
  { name: "list groups", method: "GET", path: () => "/api/groups", expected: signedIn(200) },
  {
    name: "create group",
    method: "POST",
    path: () => "/api/groups",
    body: () => ({ slug: `new-${randomBytes(3).toString("hex")}`, name: "New group" }),
    expected: siteAdminOnly(201),
  },
  { name: "read group", method: "GET", path: () => `/api/groups/${groupId}`, expected: groupRead(200) },
  {
    name: "list members",
    method: "GET",
    path: () => `/api/groups/${groupId}/members`,
    expected: groupRead(200),
  },
  {
    name: "change a role",
    method: "PATCH",
    path: async () => `/api/groups/${groupId}/members/${await freshMember()}`,
    body: () => ({ role: "collaborator" }),
    expected: groupAdminOnly(200),
  },
  {
    name: "remove a member",
    method: "DELETE",
    path: async () => `/api/groups/${groupId}/members/${await freshMember()}`,
    expected: groupAdminOnly(204),
  },
  {
    name: "list invitations",
    method: "GET",
    path: () => `/api/groups/${groupId}/invitations`,
    expected: groupAdminOnly(200),
  },
  {
    name: "invite",
    method: "POST",
    path: () => `/api/groups/${groupId}/invitations`,
    body: () => ({ email: `new-${randomBytes(3).toString("hex")}@test.example`, role: "member" }),
    expected: groupAdminOnly(201),
  },
  {
    name: "revoke an invitation",
    method: "DELETE",
    path: async () => `/api/groups/${groupId}/invitations/${(await freshInvitation()).id}`,
    expected: groupAdminOnly(204),
  },
  {
    name: "group audit log",
    method: "GET",
    path: () => `/api/groups/${groupId}/audit`,
    expected: groupAdminOnly(200),
  },
  {
    name: "preview an invitation by its secret",
    method: "GET",
    path: async () => `/api/invitations/${(await freshInvitation()).secret}`,
    expected: signedIn(200),
  },
  {
    name: "accept someone else's invitation",
    method: "POST",
    path: async () => `/api/invitations/${(await freshInvitation()).secret}/accept`,
    expected: signedIn(403),
  },
  { name: "list own API tokens", method: "GET", path: () => "/api/tokens", expected: signedIn(200) },
  {
    name: "mint a token with a token",
    method: "POST",
    path: () => "/api/tokens",
    body: () => ({ name: "chained" }),
    expected: signedIn(403),
  },
  {
    name: "revoke another person's token",
    method: "DELETE",
    path: async () => {
      const stranger = await createUser(database.db, "stranger");
      await tokenFor(database.db, stranger);
      const rows = await database.pool.query("select id from api_tokens where user_id = $1", [stranger.id]);
      return `/api/tokens/${rows.rows[0].id}`;
    },
    expected: signedIn(404),
  },
  { name: "list all people", method: "GET", path: () => "/api/admin/users", expected: siteAdminOnly(200) },
  { name: "list runs", method: "GET", path: () => `/api/groups/${groupId}/runs`, expected: groupRead(200) },
  {
    name: "read a run that does not exist",
    method: "GET",
    path: () => `/api/runs/${randomUUID()}`,
    expected: signedIn(404),
  },
  {
    name: "cancel a run that does not exist",
    method: "POST",
    path: () => `/api/runs/${randomUUID()}/cancel`,
    expected: signedIn(404),
  },
  {
    name: "submit a run without a spec",
    method: "POST",
    path: () => `/api/groups/${groupId}/runs`,
    body: () => ({}),
    expected: signedIn(422),
  },
  {
    name: "read a target that does not exist",
    method: "GET",
    path: () => `/api/targets/${randomUUID()}`,
    expected: signedIn(404),
  },
  {
    name: "change a target that does not exist",
    method: "PATCH",
    path: () => `/api/targets/${randomUUID()}`,
    body: () => ({ notes: "nothing" }),
    expected: signedIn(404),
  },
  {
    name: "delete a target that does not exist",
    method: "DELETE",
    path: () => `/api/targets/${randomUUID()}`,
    expected: signedIn(404),
  },
  {
    name: "derive an isotopologue of a target that does not exist",
    method: "POST",
    path: () => `/api/targets/${randomUUID()}/isotopologues`,
    body: () => ({ name: "nothing", isotopes: [{ atom: 1, massNumber: 2 }] }),
    expected: signedIn(404),
  },
  {
    name: "read a version of a target that does not exist",
    method: "GET",
    path: () => `/api/targets/${randomUUID()}/versions/1`,
    expected: signedIn(404),
  },
  {
    name: "list targets",
    method: "GET",
    path: () => `/api/groups/${groupId}/targets`,
    expected: groupRead(200),
  },
  {
    name: "enter a target without atoms",
    method: "POST",
    path: () => `/api/groups/${groupId}/targets`,
    body: () => ({ name: "nothing" }),
    expected: signedIn(422),
  },
  { name: "unknown API route", method: "GET", path: () => "/api/nothing-here", expected: everyone(404) },
];

beforeAll(async () => {
  database = await createTestDatabase("authz");
  app = await startTestApp(database);
  const db = database.db;
  const callers = await createMatrixCallers(db);
  ({ groupId, groupAdminId } = callers);
  for (const [caller, token] of callers.tokens) tokens.set(caller, token);
});

afterAll(async () => {
  await app?.close();
  await database?.drop();
});

describeMatrix("authorization matrix", CASES, () => ({ baseUrl: app.baseUrl, tokens }));
