/**
 * The callers and expectation shapes of the authorization matrices, and the loop that sends every case
 * as every caller. Rule (Sigmaflow's access policy): deny by default; a group one does not belong to is
 * a 404; a role too low is a 403; site admins may do everything.
 */
import { describe, expect, it } from "vitest";
import type { Database } from "../../../server/db/client";
import { addMember, createGroup, createUser, tokenFor } from "./people";

export const CALLERS = [
  "anonymous",
  "collaborator",
  "member",
  "otherGroupAdmin",
  "groupAdmin",
  "siteAdmin",
] as const;
export type Caller = (typeof CALLERS)[number];
export type Expected = Record<Caller, number>;

export type MatrixCase = {
  name: string;
  method: "GET" | "POST" | "PATCH" | "DELETE";
  path: () => Promise<string> | string;
  body?: () => unknown;
  expected: Expected;
};

export const everyone = (status: number): Expected => ({
  anonymous: status,
  collaborator: status,
  member: status,
  otherGroupAdmin: status,
  groupAdmin: status,
  siteAdmin: status,
});
export const signedIn = (status: number): Expected => ({ ...everyone(status), anonymous: 401 });
export const groupRead = (status: number): Expected => ({ ...signedIn(status), otherGroupAdmin: 404 });
export const groupWrite = (status: number): Expected => ({ ...groupRead(status), collaborator: 403 });
export const groupAdminOnly = (status: number): Expected => ({ ...groupWrite(status), member: 403 });
export const siteAdminOnly = (status: number): Expected => ({ ...signedIn(403), siteAdmin: status });

/** One test per case × caller; callers without a token in `tokens` go anonymous. */
export function describeMatrix(
  title: string,
  cases: MatrixCase[],
  context: () => { baseUrl: string; tokens: Map<Caller, string> },
): void {
  describe(title, () => {
    for (const testCase of cases) {
      for (const caller of CALLERS) {
        it(`${testCase.method} ${testCase.name} as ${caller} → ${testCase.expected[caller]}`, async () => {
          const { baseUrl, tokens } = context();
          const body = testCase.body?.();
          // A FormData body (an upload) is sent as multipart/form-data with the boundary fetch chooses.
          const multipart = body instanceof FormData;
          const headers: Record<string, string> = multipart ? {} : { "content-type": "application/json" };
          const token = tokens.get(caller);
          if (token) headers.authorization = `Bearer ${token}`;
          const response = await fetch(`${baseUrl}${await testCase.path()}`, {
            method: testCase.method,
            headers,
            body: body === undefined ? undefined : multipart ? body : JSON.stringify(body),
          });
          const text = await response.text();
          expect(response.status, text).toBe(testCase.expected[caller]);
          if (response.status >= 400) {
            expect(JSON.parse(text)).toMatchObject({
              error: { code: expect.any(String), message: expect.any(String) },
            });
          }
        });
      }
    }
  });
}

/**
 * The matrix's people: a target group with a collaborator, a member and an admin, an admin of another
 * group, and a site admin; an API token for each caller but the anonymous one.
 */
export async function createMatrixCallers(db: Database) {
  const group = await createGroup(db, "target");
  const other = await createGroup(db, "other");
  const collaborator = await createUser(db, "collaborator");
  const member = await createUser(db, "member");
  const groupAdmin = await createUser(db, "group-admin");
  const otherAdmin = await createUser(db, "other-admin");
  const siteAdmin = await createUser(db, "site-admin", { siteAdmin: true });
  await addMember(db, collaborator.id, group.id, "collaborator");
  await addMember(db, member.id, group.id, "member");
  await addMember(db, groupAdmin.id, group.id, "admin");
  await addMember(db, otherAdmin.id, other.id, "admin");
  const tokens = new Map<Caller, string>([
    ["collaborator", await tokenFor(db, collaborator)],
    ["member", await tokenFor(db, member)],
    ["groupAdmin", await tokenFor(db, groupAdmin)],
    ["otherGroupAdmin", await tokenFor(db, otherAdmin)],
    ["siteAdmin", await tokenFor(db, siteAdmin)],
  ]);
  return { groupId: group.id, groupAdminId: groupAdmin.id, memberId: member.id, tokens };
}
