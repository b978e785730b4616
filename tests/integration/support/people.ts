/** Creates users, groups, memberships and API tokens directly, for tests that need a cast of callers. */
import { randomBytes } from "node:crypto";
import type { Database } from "../../../server/db/client";
import { groups, memberships, users } from "../../../server/db/schema";
import { createApiToken } from "../../../server/services/tokens.service";
import type { GroupRole } from "../../../shared/schemas/groups";

export async function createUser(db: Database, label: string, options: { siteAdmin?: boolean } = {}) {
  const suffix = randomBytes(3).toString("hex");
  const [row] = await db
    .insert(users)
    .values({
      email: `${label}-${suffix}@test.example`,
      displayName: `${label} ${suffix}`,
      oidcIssuer: "http://test-issuer",
      oidcSubject: `${label}-${suffix}`,
      isSiteAdmin: options.siteAdmin ?? false,
    })
    .returning();
  return row!;
}

export async function createGroup(db: Database, slug: string) {
  const [row] = await db
    .insert(groups)
    .values({ slug: `${slug}-${randomBytes(3).toString("hex")}`, name: `Group ${slug}` })
    .returning();
  return row!;
}

export async function addMember(db: Database, userId: string, groupId: string, role: GroupRole) {
  await db.insert(memberships).values({ userId, groupId, role });
}

/** An API token secret for the user, made through the real service. */
export async function tokenFor(db: Database, user: typeof users.$inferSelect): Promise<string> {
  const principal = {
    userId: user.id,
    email: user.email,
    displayName: user.displayName,
    isSiteAdmin: user.isSiteAdmin,
    via: "session" as const,
  };
  const created = await createApiToken(db, principal, { name: "tests", expiresInDays: 1 }, null);
  return created.secret;
}
