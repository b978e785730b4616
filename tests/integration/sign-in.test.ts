/**
 * Browser sign-in through the real OpenID Connect flow: Sigmaflow's server against the development
 * identity provider (oidc-provider), both in-process, driven by fetch with a cookie jar. Checks the
 * session rules Sigmaflow promises: HttpOnly + SameSite=Lax cookie (OWASP Session Management Cheat Sheet),
 * a new session id at sign-in (no fixation), CSRF token required on mutations, no open redirect, sign-out;
 * the request's protections (PKCE S256 per RFC 7636, a nonce checked against the ID token per OpenID
 * Connect Core §3.1.2.1/§3.1.3.7); endpoints found by discovery (OpenID Connect Discovery §4); and what a
 * refused sign-in tells the person and the log.
 */
import { createHash } from "node:crypto";
import { Writable } from "node:stream";
import pino from "pino";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_ACCOUNTS, DEMO_PASSWORD, type DemoAccount } from "../../deploy/demo/accounts";
import { type FakeIdp, startFakeIdp } from "../../deploy/fake-idp/provider";
import { SESSION_COOKIE } from "../../server/auth/session";
import { browse, CookieJar, freePort } from "./support/http-browser";
import { startTestApp } from "./support/test-app";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

const researcher = DEMO_ACCOUNTS.find((a) => a.subject === "demo-researcher")!;
const collaborator = DEMO_ACCOUNTS.find((a) => a.subject === "demo-collaborator")!;
const BROWSER_ACCEPT = "text/html,application/xhtml+xml,application/xml;q=0.9,*/*;q=0.8";
const CLIENT = { clientId: "sigmaflow-test", clientSecret: "sigmaflow-test-secret" };

type TestApp = Awaited<ReturnType<typeof startTestApp>>;
/** One Sigmaflow server and the provider it signs in with. */
type Site = { app: TestApp; idp: FakeIdp };

/** A pino logger that keeps its JSON lines, so tests can read what the server logged. */
function recordingLogger() {
  const lines: Record<string, unknown>[] = [];
  const stream = new Writable({
    write(chunk, _encoding, done) {
      lines.push(JSON.parse(String(chunk)));
      done();
    },
  });
  return { log: pino({ level: "info" }, stream), lines };
}

let database: TestDatabase;
let idp: FakeIdp;
let app: TestApp;
let logLines: Record<string, unknown>[];
/** A second provider whose endpoints are not oidc-provider's default paths, and a server using it. */
let otherIdp: FakeIdp;
let otherApp: TestApp;
let otherLogLines: Record<string, unknown>[];

const OTHER_ROUTES = {
  authorization: "/oauth2/authorize",
  token: "/oauth2/token",
  userinfo: "/oauth2/userinfo",
};

function sessionCookieValue(response: Response): string | undefined {
  const line = response.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`));
  return line?.split(";")[0]?.slice(SESSION_COOKIE.length + 1);
}

/** express-session's cookie is `s:<sid>.<signature>`, URL-encoded. */
function sessionIdOf(jar: CookieJar, site: Site): string {
  const header = jar.headerFor(new URL("/api/me", site.app.baseUrl));
  const value = header
    .split("; ")
    .find((c) => c.startsWith(`${SESSION_COOKIE}=`))!
    .slice(SESSION_COOKIE.length + 1);
  const signed = decodeURIComponent(value);
  return signed.slice(2, signed.lastIndexOf("."));
}

/** The first leg: Sigmaflow's redirect to the provider's authorization endpoint. */
async function startSignIn(jar: CookieJar, site: Site, returnTo: string) {
  const login = await browse(
    jar,
    new URL(`/api/auth/login?returnTo=${encodeURIComponent(returnTo)}`, site.app.baseUrl),
  );
  expect(login.status).toBe(302);
  return { login, authorization: new URL(login.headers.get("location")!) };
}

/** Everything after the redirect: provider → login form → provider → app callback. Returns the last response. */
async function finishSignIn(
  jar: CookieJar,
  site: Site,
  authorization: URL,
  account: DemoAccount,
  accept = "application/json",
) {
  let response = await browse(jar, authorization);
  let interaction: URL | null = null;
  for (let hop = 0; hop < 12; hop += 1) {
    const location = response.headers.get("location");
    if (!location) break;
    const next = new URL(location, response.url || site.idp.issuer);
    if (next.pathname.startsWith("/interaction/")) interaction = next;
    response = await browse(jar, next);
    if (interaction && response.status === 200) break;
  }
  expect(
    interaction,
    `the provider should ask for credentials (last status ${response.status})`,
  ).not.toBeNull();
  const body = new URLSearchParams({ email: account.email, password: DEMO_PASSWORD }).toString();
  response = await browse(jar, interaction!, {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded" },
    body,
  });
  for (let hop = 0; hop < 12; hop += 1) {
    const location = response.headers.get("location");
    if (!location) break;
    const next = new URL(location, interaction!);
    if (next.href.startsWith(`${site.app.baseUrl}/api/auth/callback`)) {
      const callback = await browse(jar, next, { headers: { accept } });
      return { callback, callbackUrl: next };
    }
    response = await browse(jar, next);
  }
  throw new Error("the provider never sent the browser back to Sigmaflow's callback");
}

async function signIn(jar: CookieJar, returnTo: string, site: Site = { app, idp }, account = researcher) {
  const { login, authorization } = await startSignIn(jar, site, returnTo);
  const { callback, callbackUrl } = await finishSignIn(jar, site, authorization, account);
  return { callback, callbackUrl, preLoginSid: sessionCookieValue(login) };
}

async function api(jar: CookieJar, method: string, path: string, body?: unknown, csrf?: string, base = app) {
  const headers: Record<string, string> = { "content-type": "application/json" };
  if (csrf) headers["x-csrf-token"] = csrf;
  const response = await browse(jar, new URL(path, base.baseUrl), {
    method,
    headers,
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await response.text();
  return { status: response.status, body: text ? JSON.parse(text) : null };
}

/** Rewrites one field of the sign-in waiting in the session row, as if the browser had started another. */
async function tamperPendingSignIn(sid: string, field: "nonce" | "codeVerifier", value: string) {
  const updated = await database.pool.query(
    `update sessions set sess = jsonb_set(sess, $2::text[], to_jsonb($3::text))
      where sid = $1 and sess ? 'oidcPendingSignIn'`,
    [sid, `{oidcPendingSignIn,${field}}`, value],
  );
  expect(updated.rowCount, "the session should hold the sign-in in progress").toBe(1);
}

const signInFailures = (lines: Record<string, unknown>[]) =>
  lines.filter((line) => line.msg === "sign-in failed") as Array<{ signIn: Record<string, unknown> }>;

beforeAll(async () => {
  database = await createTestDatabase("signin");
  const [appPort, idpPort, otherAppPort, otherIdpPort] = await Promise.all([
    freePort(),
    freePort(),
    freePort(),
    freePort(),
  ]);
  idp = await startFakeIdp({
    port: idpPort,
    ...CLIENT,
    redirectUris: [`http://127.0.0.1:${appPort}/api/auth/callback`],
  });
  const recorder = recordingLogger();
  logLines = recorder.lines;
  app = await startTestApp(database, { oidcIssuer: idp.issuer, port: appPort, log: recorder.log });

  otherIdp = await startFakeIdp({
    port: otherIdpPort,
    ...CLIENT,
    redirectUris: [`http://127.0.0.1:${otherAppPort}/api/auth/callback`],
    routes: OTHER_ROUTES,
  });
  const otherRecorder = recordingLogger();
  otherLogLines = otherRecorder.lines;
  otherApp = await startTestApp(database, {
    oidcIssuer: otherIdp.issuer,
    port: otherAppPort,
    log: otherRecorder.log,
  });
});

afterAll(async () => {
  await app?.close();
  await otherApp?.close();
  await idp?.close();
  await otherIdp?.close();
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

describe("the authorization request's protections", () => {
  // Regression: the sign-in request sent no PKCE challenge and no nonce, and its scope said `openid` twice.
  it("sends a PKCE S256 challenge of the verifier kept in the session, a nonce, and `openid` once", async () => {
    const jar = new CookieJar();
    const { authorization } = await startSignIn(jar, { app, idp }, "/");
    const query = authorization.searchParams;
    expect(
      query
        .get("scope")!
        .split(" ")
        .filter((s) => s === "openid"),
    ).toHaveLength(1);
    expect(query.get("scope")!.split(" ").sort()).toEqual(["email", "openid", "profile"]);
    expect(query.get("code_challenge_method")).toBe("S256");
    expect(query.get("code_challenge")).toMatch(/^[A-Za-z0-9_-]{43}$/); // base64url of a SHA-256 digest
    expect(query.get("nonce")!.length).toBeGreaterThanOrEqual(22); // ≥ 128 bits in base64url

    const stored = await database.pool.query(
      "select sess->'oidcPendingSignIn' as pending from sessions where sid = $1",
      [sessionIdOf(jar, { app, idp })],
    );
    const pending = stored.rows[0].pending;
    // RFC 7636 §4.2: code_challenge = BASE64URL(SHA256(ASCII(code_verifier))).
    expect(createHash("sha256").update(pending.codeVerifier).digest("base64url")).toBe(
      query.get("code_challenge"),
    );
    expect(pending.codeVerifier).toMatch(/^[A-Za-z0-9_-]{43,128}$/); // RFC 7636 §4.1
    expect(pending.nonce).toBe(query.get("nonce"));
  });

  // Regression: without PKCE a code exchanged by a different verifier (another sign-in's) was accepted.
  it("exchanges the code with the verifier: another verifier is refused by the provider and logged", async () => {
    const jar = new CookieJar();
    const { authorization } = await startSignIn(jar, { app, idp }, "/");
    await tamperPendingSignIn(sessionIdOf(jar, { app, idp }), "codeVerifier", "x".repeat(43));
    const before = signInFailures(logLines).length;
    const { callback, callbackUrl } = await finishSignIn(jar, { app, idp }, authorization, researcher);
    expect(callback.status).toBe(502);
    expect((await callback.json()).error.code).toBe("sign_in_failed");
    expect((await api(jar, "GET", "/api/me")).status).toBe(401);
    const [logged] = signInFailures(logLines).slice(before);
    expect(logged?.signIn).toMatchObject({ step: "provider", providerError: "invalid_grant" });
    // The authorization code and the client secret never reach the log.
    const text = JSON.stringify(logLines);
    expect(text).not.toContain(callbackUrl.searchParams.get("code"));
    expect(text).not.toContain(CLIENT.clientSecret);
  });

  // Regression: no nonce was sent, so an ID token minted for another sign-in was accepted.
  it("refuses an ID token whose nonce is not the one this browser's sign-in sent, and logs why", async () => {
    const jar = new CookieJar();
    const { authorization } = await startSignIn(jar, { app, idp }, "/");
    await tamperPendingSignIn(sessionIdOf(jar, { app, idp }), "nonce", "another-sign-in-nonce-0123456789");
    const before = signInFailures(logLines).length;
    const { callback } = await finishSignIn(jar, { app, idp }, authorization, researcher);
    expect(callback.status).toBe(302);
    expect(callback.headers.get("location")).toBe("/signin?error=sign_in_failed");
    expect((await api(jar, "GET", "/api/me")).status).toBe(401);
    const [logged] = signInFailures(logLines).slice(before);
    expect(logged?.signIn).toMatchObject({
      code: "sign_in_refused",
      reason: "ID token contains invalid nonce.",
    });
  });

  it("refuses a callback replayed after the sign-in completed", async () => {
    const jar = new CookieJar();
    const { callbackUrl } = await signIn(jar, "/");
    const before = signInFailures(logLines).length;
    const replay = await browse(jar, callbackUrl);
    expect(replay.headers.get("location")).toBe("/signin?error=sign_in_failed");
    expect(signInFailures(logLines).slice(before)[0]?.signIn).toMatchObject({ code: "sign_in_refused" });
  });
});

describe("a provider found through discovery", () => {
  // Regression: the endpoints defaulted to one implementation's own paths (`<issuer>/auth`, `/token`,
  // `/me`) instead of those the issuer's discovery document announces.
  it("signs in with the endpoints announced at <issuer>/.well-known/openid-configuration", async () => {
    expect(otherApp.config.oidc.endpointOverrides).toEqual({
      authorizationURL: undefined,
      tokenURL: undefined,
      userInfoURL: undefined,
    });
    const site = { app: otherApp, idp: otherIdp };
    const jar = new CookieJar();
    const { authorization } = await startSignIn(jar, site, "/");
    expect(authorization.href.startsWith(`${otherIdp.issuer}${OTHER_ROUTES.authorization}?`)).toBe(true);
    const { callback } = await finishSignIn(jar, site, authorization, collaborator);
    expect(callback.status).toBe(302);
    const me = await api(jar, "GET", "/api/me", undefined, undefined, otherApp);
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe(collaborator.email);
  });

  it("explains an unreachable provider at sign-in, logs the address it tried, and recovers once it answers", async () => {
    const idpPort = await freePort();
    const appPort = await freePort();
    const recorder = recordingLogger();
    const lateApp = await startTestApp(database, {
      oidcIssuer: `http://127.0.0.1:${idpPort}`,
      port: appPort,
      log: recorder.log,
    });
    let lateIdp: FakeIdp | undefined;
    try {
      const jar = new CookieJar();
      const refused = await browse(jar, new URL("/api/auth/login", lateApp.baseUrl), {
        headers: { accept: "application/json" },
      });
      expect(refused.status).toBe(503);
      expect((await refused.json()).error.code).toBe("sign_in_unavailable");
      const [logged] = signInFailures(recorder.lines);
      expect(logged?.signIn).toMatchObject({ step: "discovery" });
      expect(String(logged?.signIn.reason)).toContain(
        `http://127.0.0.1:${idpPort}/.well-known/openid-configuration`,
      );

      lateIdp = await startFakeIdp({
        port: idpPort,
        ...CLIENT,
        redirectUris: [`http://127.0.0.1:${appPort}/api/auth/callback`],
      });
      const { authorization } = await startSignIn(jar, { app: lateApp, idp: lateIdp }, "/");
      expect(authorization.href.startsWith(`${lateIdp.issuer}/auth?`)).toBe(true);
    } finally {
      await lateApp.close();
      await lateIdp?.close();
    }
  });
});

describe("an e-mail that already belongs to an account from another provider", () => {
  // Regression: this sign-in ended in "Sign-in with the identity provider failed. Try again." (502) and the
  // server log said nothing about why.
  it("answers 409 with what happened and what an admin can do, and logs which accounts are involved", async () => {
    await signIn(new CookieJar(), "/"); // the researcher's account, through the first provider
    const [holder] = (
      await database.pool.query("select id, oidc_issuer from users where lower(email) = lower($1)", [
        researcher.email,
      ])
    ).rows;
    expect(holder.oidc_issuer).toBe(idp.issuer);

    const site = { app: otherApp, idp: otherIdp };
    const jar = new CookieJar();
    const before = signInFailures(otherLogLines).length;
    const { authorization } = await startSignIn(jar, site, "/");
    const { callback, callbackUrl } = await finishSignIn(jar, site, authorization, researcher);
    expect(callback.status).toBe(409);
    const body = await callback.json();
    expect(body.error.code).toBe("email_in_use");
    expect(body.error.message).toContain(idp.issuer);
    expect(body.error.message).toContain(otherIdp.issuer);
    expect(body.error.message).toMatch(/site admin/);
    expect((await api(jar, "GET", "/api/me", undefined, undefined, otherApp)).status).toBe(401);

    const [logged] = signInFailures(otherLogLines).slice(before);
    expect(logged?.signIn).toMatchObject({
      status: 409,
      code: "email_in_use",
      details: {
        existingUserId: holder.id,
        existingIssuer: idp.issuer,
        issuer: otherIdp.issuer,
        subject: researcher.subject,
      },
    });
    expect(JSON.stringify(otherLogLines)).not.toContain(callbackUrl.searchParams.get("code"));
    const accounts = await database.pool.query(
      "select count(*)::int as n from users where lower(email) = lower($1)",
      [researcher.email],
    );
    expect(accounts.rows[0].n).toBe(1);
  });

  it("shows a browser the same explanation as a page", async () => {
    const site = { app: otherApp, idp: otherIdp };
    const jar = new CookieJar();
    const { authorization } = await startSignIn(jar, site, "/");
    const { callback } = await finishSignIn(jar, site, authorization, researcher, BROWSER_ACCEPT);
    expect(callback.status).toBe(409);
    expect(callback.headers.get("content-type")).toMatch(/^text\/html/);
    const page = await callback.text();
    expect(page).toContain("Sign-in did not complete");
    expect(page).toContain(`signs in through ${idp.issuer}, not ${otherIdp.issuer}`);
    expect(page).toContain('href="/signin"');
  });
});
