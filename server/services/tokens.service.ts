import { and, desc, eq, gt, isNull, lt, or } from "drizzle-orm";
import type { ApiToken, CreatedApiToken } from "../../shared/schemas/tokens";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import { hashSecret, newSecret } from "../auth/tokens";
import type { Database } from "../db/client";
import { apiTokens } from "../db/schema";
import { notFound } from "../http/errors";
import { findPrincipal } from "./users.service";

export const API_TOKEN_PREFIX = "sf_";
const DISPLAY_PREFIX_LENGTH = 10;
/** last_used_at is refreshed at most this often, so a busy script does not write on every request. */
const LAST_USED_RESOLUTION_MS = 60_000;

function toApiToken(row: typeof apiTokens.$inferSelect): ApiToken {
  return {
    id: row.id,
    name: row.name,
    prefix: row.prefix,
    createdAt: row.createdAt.toISOString(),
    lastUsedAt: row.lastUsedAt?.toISOString() ?? null,
    expiresAt: row.expiresAt?.toISOString() ?? null,
  };
}

export async function listApiTokens(db: Database, principal: Principal): Promise<ApiToken[]> {
  const rows = await db
    .select()
    .from(apiTokens)
    .where(and(eq(apiTokens.userId, principal.userId), isNull(apiTokens.revokedAt)))
    .orderBy(desc(apiTokens.createdAt));
  return rows.map(toApiToken);
}

export async function createApiToken(
  db: Database,
  principal: Principal,
  input: { name: string; expiresInDays: number | null },
  ip: string | null,
): Promise<CreatedApiToken> {
  const secret = newSecret(API_TOKEN_PREFIX, 32);
  const expiresAt = input.expiresInDays ? new Date(Date.now() + input.expiresInDays * 86_400_000) : null;
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(apiTokens)
      .values({
        userId: principal.userId,
        name: input.name,
        prefix: secret.slice(0, DISPLAY_PREFIX_LENGTH),
        tokenHash: hashSecret(secret),
        expiresAt,
      })
      .returning();
    await recordAudit(tx, {
      actorUserId: principal.userId,
      action: "api_token.create",
      targetType: "api_token",
      targetId: row!.id,
      details: { name: input.name },
      ip,
    });
    return { token: toApiToken(row!), secret };
  });
}

export async function revokeApiToken(db: Database, principal: Principal, tokenId: string, ip: string | null) {
  await db.transaction(async (tx) => {
    const [row] = await tx
      .update(apiTokens)
      .set({ revokedAt: new Date() })
      .where(
        and(eq(apiTokens.id, tokenId), eq(apiTokens.userId, principal.userId), isNull(apiTokens.revokedAt)),
      )
      .returning({ id: apiTokens.id });
    if (!row) throw notFound("API token");
    await recordAudit(tx, {
      actorUserId: principal.userId,
      action: "api_token.revoke",
      targetType: "api_token",
      targetId: row.id,
      ip,
    });
  });
}

/** The principal an API token stands for, or null when it is unknown, revoked or expired. */
export async function authenticateApiToken(db: Database, secret: string): Promise<Principal | null> {
  if (!secret.startsWith(API_TOKEN_PREFIX)) return null;
  const now = new Date();
  const [row] = await db
    .select({ id: apiTokens.id, userId: apiTokens.userId, lastUsedAt: apiTokens.lastUsedAt })
    .from(apiTokens)
    .where(
      and(
        eq(apiTokens.tokenHash, hashSecret(secret)),
        isNull(apiTokens.revokedAt),
        or(isNull(apiTokens.expiresAt), gt(apiTokens.expiresAt, now)),
      ),
    );
  if (!row) return null;
  if (!row.lastUsedAt || now.getTime() - row.lastUsedAt.getTime() > LAST_USED_RESOLUTION_MS) {
    await db
      .update(apiTokens)
      .set({ lastUsedAt: now })
      .where(
        and(
          eq(apiTokens.id, row.id),
          or(
            isNull(apiTokens.lastUsedAt),
            lt(apiTokens.lastUsedAt, new Date(now.getTime() - LAST_USED_RESOLUTION_MS)),
          ),
        ),
      );
  }
  return findPrincipal(db, row.userId, "token");
}
