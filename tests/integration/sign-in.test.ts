/**
 * Browser sign-in through the real OpenID Connect flow: Sigmaflow's server against the development
 * identity provider (oidc-provider), both in-process, driven by fetch with a cookie jar. Checks the
 * session rules Sigmaflow promises: HttpOnly + SameSite=Lax cookie (OWASP Session Management Cheat Sheet),
 * a new session id at sign-in (no fixation), CSRF token required on mutations, no open redirect, sign-out.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from "../../deploy/demo/accounts";
import { type FakeIdp, startFakeIdp } from "../../deploy/fake-idp/provider";
import { SESSION_COOKIE } from "../../server/auth/session";
import { browse, CookieJar, freePort } from "./support/http-browser";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

const researcher = DEMO_ACCOUNTS.find((a) => a.subject === "demo-researcher")!;

let database: TestDatabase;
let idp: FakeIdp;
let app: Awaited<ReturnType<typeof startTestApp>>;

function sessionCookieValue(response: Response): string | undefined {
  const line = response.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`));
  return line?.split(";")[0]?.slice(SESSION_COOKIE.length + 1);
}

/** Walks the whole sign-in: app → provider → login form → provider → app callback. Returns the last response. */
async function signIn(jar: CookieJar, returnTo: string) {
  const login = await browse(
    jar,
    new URL(`/api/auth/login?returnTo=${encodeURIComponent(returnTo)}`, app.baseUrl),
  );
  expect(login.status).toBe(302);
  const preLoginSid = sessionCookieValue(login);
  let response = await browse(jar, new URL(login.headers.get("location")!));
  let interaction: URL | null = null;
  for (let hop = 0; hop < 12; hop += 1) {
    const location = response.headers.get("location");
    if (!location) break;
    const next = new URL(location, response.url || idp.issuer);
    if (next.pathname.startsWith("/interaction/")) interaction = next;
    response = await browse(jar, next);
    if (interaction && response.status === 200) break;
  }
  expect(interaction, "the provider should ask for credentials").not.toBeNull();
  const body = new URLSearchParams({ email: researcher.email, password: DEMO_PASSWORD }).toString();
  response = await browse(jar, interaction!, {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded" },
    body,
  });
  for (let hop = 0; hop < 12; hop += 1) {
    const location = response.headers.get("location");
    if (!location) break;
    const next = new URL(location, interaction!);
    if (next.href.startsWith(`${app.baseUrl}/api/auth/callback`)) {
      const callback = await browse(jar, next);
      return { callback, preLoginSid };
    }
    response = await browse(jar, next);
  }
  throw new Error("the provider never sent the browser back to Sigmaflow's callback");
}

async function api(jar: CookieJar, method: string, path: string, body?: unknown, csrf?: string) {
  const headers: Record<string, string> = { "content-type": "application/json" };
  if (csrf) headers["x-csrf-token"] = csrf;
  const response = await browse(jar, new URL(path, app.baseUrl), {
    method,
    headers,
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await response.text();
  return { status: response.status, body: text ? JSON.parse(text) : null };
}

beforeAll(async () => {
  database = await createTestDatabase("signin");
  const appPort = await freePort();
  const idpPort = await freePort();
  idp = await startFakeIdp({
    port: idpPort,
    clientId: "sigmaflow-test",
    clientSecret: "sigmaflow-test-secret",
    redirectUris: [`http://127.0.0.1:${appPort}/api/auth/callback`],
  });
  app = await startTestApp(database, { oidcIssuer: idp.issuer, port: appPort });
});

afterAll(async () => {
  await app?.close();
  await idp?.close();
  await database?.drop();
});

describe("sign-in with the identity provider", () => {
  it("creates the user, starts a fresh session and returns to the requested page", async () => {
    const jar = new CookieJar();
    expect((await api(jar, "GET", "/api/me")).status).toBe(401);
    const { callback, preLoginSid } = await signIn(jar, "/groups/somewhere");
    expect(callback.status).toBe(302);
    expect(callback.headers.get("location")).toBe("/groups/somewhere");
    const cookie = callback.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/;\s*Secure/i); // served over plain http on loopback
    expect(preLoginSid).toBeTruthy();
    expect(sessionCookieValue(callback)).not.toBe(preLoginSid);

    const me = await api(jar, "GET", "/api/me");
    expect(me.status).toBe(200);
    expect(me.body.user).toMatchObject({ email: researcher.email, displayName: researcher.displayName });
    expect(me.body.csrfToken.length).toBeGreaterThan(20);
    const rows = await database.pool.query("select count(*)::int as n from sessions");
    expect(rows.rows[0].n).toBeGreaterThanOrEqual(1);
  });

  it("requires the CSRF token on every mutation made with the session cookie", async () => {
    const jar = new CookieJar();
    await signIn(jar, "/");
    const me = await api(jar, "GET", "/api/me");
    const missing = await api(jar, "POST", "/api/tokens", { name: "laptop" });
    expect(missing.status).toBe(403);
    expect(missing.body.error.code).toBe("csrf_invalid");
    const wrong = await api(jar, "POST", "/api/tokens", { name: "laptop" }, "forged-token");
    expect(wrong.status).toBe(403);
    const right = await api(jar, "POST", "/api/tokens", { name: "laptop" }, me.body.csrfToken);
    expect(right.status).toBe(201);
    expect(right.body.secret).toMatch(/^sf_/);
    const stored = await database.pool.query("select token_hash from api_tokens where id = $1", [
      right.body.token.id,
    ]);
    expect(stored.rows[0].token_hash).not.toContain(right.body.secret.slice(3));

    // The new token works for scripts, without cookie or CSRF token.
    const script = await fetch(`${app.baseUrl}/api/me`, {
      headers: { authorization: `Bearer ${right.body.secret}` },
    });
    expect(script.status).toBe(200);
    const revoked = await api(
      jar,
      "DELETE",
      `/api/tokens/${right.body.token.id}`,
      undefined,
      me.body.csrfToken,
    );
    expect(revoked.status).toBe(204);
    const after = await fetch(`${app.baseUrl}/api/me`, {
      headers: { authorization: `Bearer ${right.body.secret}` },
    });
    expect(after.status).toBe(401);
  });

  it("never redirects outside Sigmaflow after sign-in", async () => {
    const jar = new CookieJar();
    const { callback } = await signIn(jar, "//evil.example/steal");
    expect(callback.headers.get("location")).toBe("/");
  });

  it("signs out: the session ends and the cookie is cleared", async () => {
    const jar = new CookieJar();
    await signIn(jar, "/");
    const me = await api(jar, "GET", "/api/me");
    const out = await api(jar, "POST", "/api/auth/logout", undefined, me.body.csrfToken);
    expect(out.status).toBe(204);
    expect((await api(jar, "GET", "/api/me")).status).toBe(401);
  });
});
