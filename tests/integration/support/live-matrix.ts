/**
 * The authorization matrix of the live feed: every way of joining a room × every kind of caller (the
 * callers of authorization-matrix.ts) gets the outcome it should, written as the HTTP status it stands
 * for: 200 a join acknowledged ok; 401 a connection refused for its credential (none, a revoked token, an
 * ended session); 403 a connection refused for its Origin, or a join refused for a role too low; 404 a
 * join of a run or group the caller may not see.
 */
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { hashSecret } from "../../../server/auth/tokens";
import type { Database } from "../../../server/db/client";
import { apiTokens, sessions } from "../../../server/db/schema";
import { createApiToken, revokeApiToken } from "../../../server/services/tokens.service";
import { findPrincipal } from "../../../server/services/users.service";
import { CALLERS, type Caller, type Expected } from "./authorization-matrix";
import { connectLive, emitWithAck, LiveRefusal, sessionCookieFor } from "./live-client";

/** How a caller connects: its API token, one it revoked, or a browser session (current or signed out). */
export type LiveCredential = "token" | "revoked token" | "session" | "ended session";

export type LiveMatrixCase = {
  name: string;
  credential?: LiveCredential;
  /** The Origin a browser sends: Sigmaflow's public URL or another site's; none unless given. */
  origin?: "public" | "foreign";
  event: string;
  payload: () => Promise<unknown> | unknown;
  expected: Expected;
};

const ACK_STATUS: Record<string, number> = {
  not_found: 404,
  forbidden: 403,
  validation_failed: 422,
  unauthenticated: 401,
  invalid_token: 401,
};

type CallerCredentials = Record<LiveCredential, LiveConnectSecret>;
type LiveConnectSecret = { token?: string; cookie?: string };

/**
 * For each caller with an API token: that token, a second one revoked at once, a session cookie, and
 * the cookie of a session that ended (its row deleted, as signing out does).
 */
export async function liveCredentials(
  db: Database,
  tokens: Map<Caller, string>,
  sessionSecret: string,
): Promise<Map<Caller, CallerCredentials>> {
  const credentials = new Map<Caller, CallerCredentials>();
  for (const [caller, token] of tokens) {
    const [row] = await db
      .select({ userId: apiTokens.userId })
      .from(apiTokens)
      .where(eq(apiTokens.tokenHash, hashSecret(token)));
    const principal = await findPrincipal(db, row!.userId, "session");
    const revoked = await createApiToken(db, principal!, { name: "revoked", expiresInDays: 1 }, null);
    await revokeApiToken(db, principal!, revoked.token.id, null);
    const session = await sessionCookieFor(db, row!.userId, sessionSecret);
    const ended = await sessionCookieFor(db, row!.userId, sessionSecret);
    await db.delete(sessions).where(eq(sessions.sid, ended.sid));
    credentials.set(caller, {
      token: { token },
      "revoked token": { token: revoked.secret },
      session: { cookie: session.cookie },
      "ended session": { cookie: ended.cookie },
    });
  }
  return credentials;
}

/** One test per case × caller; callers without credentials connect with none. */
export function describeLiveMatrix(
  title: string,
  cases: LiveMatrixCase[],
  context: () => { baseUrl: string; publicUrl: string; credentials: Map<Caller, CallerCredentials> },
): void {
  describe(title, () => {
    for (const testCase of cases) {
      for (const caller of CALLERS) {
        const expected = testCase.expected[caller];
        it(`${testCase.event} ${testCase.name} as ${caller} → ${expected}`, async () => {
          const { baseUrl, publicUrl, credentials } = context();
          const secret = credentials.get(caller)?.[testCase.credential ?? "token"] ?? {};
          const origin =
            testCase.origin === "public"
              ? new URL(publicUrl).origin
              : testCase.origin === "foreign"
                ? "https://elsewhere.example"
                : undefined;
          let status: number;
          let detail: string;
          try {
            const socket = await connectLive(baseUrl, { ...secret, origin });
            try {
              const ack = await emitWithAck(socket, testCase.event, await testCase.payload());
              status = ack.ok ? 200 : (ACK_STATUS[ack.error.code] ?? 500);
              detail = JSON.stringify(ack);
            } finally {
              socket.disconnect();
            }
          } catch (error) {
            if (!(error instanceof LiveRefusal)) throw error;
            status = error.status;
            detail = `${error.code}: ${error.message}`;
          }
          expect(status, detail).toBe(expected);
        });
      }
    }
  });
}
