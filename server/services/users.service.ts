import { eq, sql } from "drizzle-orm";
import type { Me } from "../../shared/schemas/auth";
import type { AdminUser } from "../../shared/schemas/users";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import type { DbExecutor } from "../db/client";
import { pgErrorCode } from "../db/pg-errors";
import { groups, memberships, users } from "../db/schema";
import { AppError } from "../http/errors";
import { requireSiteAdmin } from "./access";

export type OidcIdentity = {
  issuer: string;
  subject: string;
  email: string | null;
  displayName: string | null;
};

/**
 * The e-mail of an identity that signs in belongs to an account that signs in as another identity (another
 * provider, or another person at the same one). E-mail addresses are unique among accounts, so Sigmaflow
 * cannot create a second account; `logDetails` says which account and identity a site admin would join.
 */
export class EmailInUseError extends AppError {
  readonly logDetails: { existingUserId: string; existingIssuer: string; issuer: string; subject: string };

  constructor(existing: { id: string; oidcIssuer: string }, identity: OidcIdentity) {
    const how =
      existing.oidcIssuer === identity.issuer
        ? `through ${identity.issuer}, as a different person there`
        : `through ${existing.oidcIssuer}, not ${identity.issuer}`;
    super(
      409,
      "email_in_use",
      `Sigmaflow already has an account for ${identity.email}, and it signs in ${how}. Sign in that way, ` +
        "or ask a site admin to move that account to the sign-in you just used.",
      { existingIssuer: existing.oidcIssuer, issuer: identity.issuer },
    );
    this.logDetails = {
      existingUserId: existing.id,
      existingIssuer: existing.oidcIssuer,
      issuer: identity.issuer,
      subject: identity.subject,
    };
  }
}

/**
 * Finds or creates the user for an identity that just signed in. The identity (issuer, subject) is the
 * key; the e-mail and name are refreshed from the provider at every sign-in. Runs outside a transaction:
 * after a refused insert it looks up who holds the e-mail.
 */
export async function upsertUserFromOidc(db: DbExecutor, identity: OidcIdentity): Promise<Principal> {
  if (!identity.email) {
    throw new AppError(403, "email_missing", "Your identity provider did not share an e-mail address.");
  }
  const email = identity.email.toLowerCase();
  const displayName = identity.displayName?.trim() || email;
  const [row] = await insertOrRefresh(db, identity, email, displayName);
  if (!row) throw new Error("user upsert returned no row");
  await recordAudit(db, {
    actorUserId: row.id,
    action: "user.sign_in",
    targetType: "user",
    targetId: row.id,
  });
  return toPrincipal(row, "session");
}

async function insertOrRefresh(db: DbExecutor, identity: OidcIdentity, email: string, displayName: string) {
  try {
    return await db
      .insert(users)
      .values({
        email,
        displayName,
        oidcIssuer: identity.issuer,
        oidcSubject: identity.subject,
        lastSignInAt: new Date(),
      })
      .onConflictDoUpdate({
        target: [users.oidcIssuer, users.oidcSubject],
        set: { email, displayName, lastSignInAt: new Date() },
      })
      .returning();
  } catch (error) {
    // users_email_key: another account (another issuer or subject) has this e-mail.
    if (pgErrorCode(error) !== "23505") throw error;
    const [holder] = await db
      .select({ id: users.id, oidcIssuer: users.oidcIssuer, oidcSubject: users.oidcSubject })
      .from(users)
      .where(sql`lower(${users.email}) = ${email}`)
      .limit(1);
    if (!holder || (holder.oidcIssuer === identity.issuer && holder.oidcSubject === identity.subject))
      throw error;
    throw new EmailInUseError(holder, identity);
  }
}

export async function findPrincipal(
  db: DbExecutor,
  userId: string,
  via: Principal["via"],
): Promise<Principal | null> {
  const [row] = await db.select().from(users).where(eq(users.id, userId)).limit(1);
  return row ? toPrincipal(row, via) : null;
}

function toPrincipal(row: typeof users.$inferSelect, via: Principal["via"]): Principal {
  return {
    userId: row.id,
    email: row.email,
    displayName: row.displayName,
    isSiteAdmin: row.isSiteAdmin,
    via,
  };
}

export async function describeMe(db: DbExecutor, principal: Principal): Promise<Omit<Me, "csrfToken">> {
  const rows = await db
    .select({ groupId: groups.id, groupSlug: groups.slug, groupName: groups.name, role: memberships.role })
    .from(memberships)
    .innerJoin(groups, eq(groups.id, memberships.groupId))
    .where(eq(memberships.userId, principal.userId))
    .orderBy(groups.name);
  return {
    user: {
      id: principal.userId,
      email: principal.email,
      displayName: principal.displayName,
      isSiteAdmin: principal.isSiteAdmin,
    },
    memberships: rows,
  };
}

export async function listUsersForAdmin(db: DbExecutor, principal: Principal): Promise<AdminUser[]> {
  requireSiteAdmin(principal);
  const rows = await db
    .select({
      id: users.id,
      email: users.email,
      displayName: users.displayName,
      isSiteAdmin: users.isSiteAdmin,
      createdAt: users.createdAt,
      lastSignInAt: users.lastSignInAt,
      groupCount: sql<number>`count(${memberships.groupId})::int`,
    })
    .from(users)
    .leftJoin(memberships, eq(memberships.userId, users.id))
    .groupBy(users.id)
    .orderBy(users.displayName);
  return rows.map((row) => ({
    ...row,
    createdAt: row.createdAt.toISOString(),
    lastSignInAt: row.lastSignInAt?.toISOString() ?? null,
  }));
}
