/**
 * The development identity provider and mail sink, started in-process on free ports and driven the
 * way Sigmaflow's server and a browser use them: plain fetch with a hand-kept cookie jar for the
 * authorization code flow, nodemailer for mail.
 *
 * Expected values come from the OpenID Connect / OAuth 2.0 specifications (cited per check), from
 * deploy/demo/accounts.ts (the demo people) and from oidc-provider's documented default routes
 * (/auth, /token, /me, /jwks, /session/end). All comparisons are exact; there is no tolerance.
 */
import { createHash, createPublicKey, verify } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from "../../deploy/demo/accounts";
import { type FakeIdp, startFakeIdp } from "../../deploy/fake-idp/provider";
import { type FakeSmtp, startFakeSmtp } from "../../deploy/fake-smtp/sink";
import { browse, CookieJar, freePort } from "./support/http-browser";

const CLIENT_ID = "sigmaflow-test";
const CLIENT_SECRET = "sigmaflow-test-secret";
// Never contacted: the flow stops once the provider redirects here.
const REDIRECT_URI = "http://127.0.0.1:5180/api/auth/callback";
const researcher = DEMO_ACCOUNTS.find((account) => account.subject === "demo-researcher")!;
const newcomer = DEMO_ACCOUNTS.find((account) => account.subject === "demo-newcomer")!;

/** Follows redirects until one points at the client's redirect_uri, which is returned unvisited. */
async function followToRedirectUri(jar: CookieJar, start: Response, base: URL): Promise<URL> {
  let response = start;
  for (let hop = 0; hop < 10; hop += 1) {
    const location = response.headers.get("location");
    expect(response.status, `hop ${hop} should redirect`).toBeGreaterThanOrEqual(300);
    expect(location).not.toBeNull();
    const next = new URL(location!, base);
    if (next.href.startsWith(REDIRECT_URI)) return next;
    response = await browse(jar, next);
  }
  throw new Error("no redirect back to the client after 10 hops");
}

function postForm(fields: Record<string, string>): RequestInit {
  return {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams(fields).toString(),
  };
}

function decodeJwtPart(part: string): Record<string, unknown> {
  return JSON.parse(Buffer.from(part, "base64url").toString("utf8")) as Record<string, unknown>;
}

describe("fake identity provider", () => {
  let idp: FakeIdp;
  let issuer: URL;
  const jar = new CookieJar();

  beforeAll(async () => {
    idp = await startFakeIdp({
      port: await freePort(),
      clientId: CLIENT_ID,
      clientSecret: CLIENT_SECRET,
      redirectUris: [REDIRECT_URI],
      postLogoutRedirectUris: ["http://127.0.0.1:5180/"],
    });
    issuer = new URL(idp.issuer);
  });
  afterAll(async () => {
    await idp?.close();
  });

  /** RFC 7636 §4.1: 43–128 unreserved characters; one per authorization request. */
  const verifierFor = (state: string) => `verifier-${state}-${"0123456789".repeat(4)}`;

  function authorizeUrl(state: string, nonce: string, { pkce = true } = {}): URL {
    const url = new URL("/auth", issuer);
    const params: Record<string, string> = {
      client_id: CLIENT_ID,
      response_type: "code",
      scope: "openid email profile",
      redirect_uri: REDIRECT_URI,
      state,
      nonce,
    };
    if (pkce) {
      // RFC 7636 §4.2: S256 challenge = BASE64URL(SHA256(ASCII(code_verifier))).
      params.code_challenge = createHash("sha256").update(verifierFor(state)).digest("base64url");
      params.code_challenge_method = "S256";
    }
    url.search = new URLSearchParams(params).toString();
    return url;
  }

  it("publishes a discovery document for exactly its issuer", async () => {
    expect(idp.issuer).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/);
    const response = await fetch(new URL("/.well-known/openid-configuration", issuer));
    expect(response.status).toBe(200);
    const discovery = (await response.json()) as Record<string, unknown>;
    // OpenID Connect Discovery 1.0 §4.3: "issuer" must be identical to the issuer URL.
    expect(discovery.issuer).toBe(idp.issuer);
    // oidc-provider's default route paths.
    expect(discovery.authorization_endpoint).toBe(`${idp.issuer}/auth`);
    expect(discovery.token_endpoint).toBe(`${idp.issuer}/token`);
    expect(discovery.userinfo_endpoint).toBe(`${idp.issuer}/me`);
    expect(discovery.jwks_uri).toBe(`${idp.issuer}/jwks`);
    expect(discovery.end_session_endpoint).toBe(`${idp.issuer}/session/end`);
    expect(discovery.scopes_supported).toEqual(expect.arrayContaining(["openid", "email", "profile"]));
    expect(discovery.response_types_supported).toContain("code");
  });

  it("signs a demo account in through the code flow and serves its claims", async () => {
    const state = "state-kestrel-1";
    const nonce = "nonce-kestrel-1";
    const start = await browse(jar, authorizeUrl(state, nonce));
    expect(start.status).toBe(303);
    const interactionUrl = new URL(start.headers.get("location")!, issuer);
    expect(interactionUrl.pathname).toMatch(/^\/interaction\/[^/]+$/);

    const form = await browse(jar, interactionUrl);
    expect(form.status).toBe(200);
    const formHtml = await form.text();
    expect(formHtml).toContain("Halvorsen Institute");
    expect(formHtml).toContain('name="email"');
    expect(formHtml).toMatch(
      /<input[^>]*name="password"[^>]*type="password"|type="password"[^>]*name="password"/,
    );
    expect(formHtml).toContain(researcher.email);
    expect(formHtml).toContain(DEMO_PASSWORD);

    const wrong = await browse(
      jar,
      interactionUrl,
      postForm({ email: researcher.email, password: `${DEMO_PASSWORD}-wrong` }),
    );
    expect(wrong.status).toBe(200);
    expect(wrong.headers.get("location")).toBeNull();
    const wrongHtml = await wrong.text();
    expect(wrongHtml).toContain('role="alert"');
    expect(wrongHtml).toContain(`value="${researcher.email}"`);

    // Whatever was typed comes back escaped, never as markup.
    const hostile = await browse(
      jar,
      interactionUrl,
      postForm({ email: '"><script>x</script>', password: DEMO_PASSWORD }),
    );
    const hostileHtml = await hostile.text();
    expect(hostileHtml).toContain('role="alert"');
    expect(hostileHtml).toContain("&quot;&gt;&lt;script&gt;x&lt;/script&gt;");
    expect(hostileHtml).not.toContain("<script>");

    const right = await browse(
      jar,
      interactionUrl,
      postForm({ email: researcher.email, password: DEMO_PASSWORD }),
    );
    expect(right.status).toBe(303);
    const callback = await followToRedirectUri(jar, right, issuer);
    // RFC 6749 §4.1.2: code and the unchanged state in the redirect query; RFC 9207: iss = issuer.
    expect(callback.searchParams.get("state")).toBe(state);
    expect(callback.searchParams.get("iss")).toBe(idp.issuer);
    const code = callback.searchParams.get("code");
    expect(code).toMatch(/^\S+$/);

    const tokenUrl = new URL("/token", issuer);
    const exchange = {
      grant_type: "authorization_code",
      code: code!,
      redirect_uri: REDIRECT_URI,
      code_verifier: verifierFor(state),
    };
    // RFC 6749 §5.2: a wrong client secret is invalid_client with HTTP 401.
    const rejected = await fetch(
      tokenUrl,
      postForm({ ...exchange, client_id: CLIENT_ID, client_secret: "not-the-secret" }),
    );
    expect(rejected.status).toBe(401);
    expect(((await rejected.json()) as { error: string }).error).toBe("invalid_client");

    // client_secret_post, as Sigmaflow's server sends it.
    const tokenResponse = await fetch(
      tokenUrl,
      postForm({ ...exchange, client_id: CLIENT_ID, client_secret: CLIENT_SECRET }),
    );
    expect(tokenResponse.status).toBe(200);
    const tokens = (await tokenResponse.json()) as {
      access_token: string;
      id_token: string;
      token_type: string;
    };
    // RFC 6750 / RFC 6749 §5.1: a Bearer token.
    expect(tokens.token_type).toBe("Bearer");

    // OpenID Connect Core 1.0 §3.1.3.7: iss, aud and nonce of the ID token; RS256 signature over the
    // first two parts, checked against the published key set.
    const [headerPart = "", payloadPart = "", signaturePart = ""] = tokens.id_token.split(".");
    const header = decodeJwtPart(headerPart);
    const claims = decodeJwtPart(payloadPart);
    expect(header.alg).toBe("RS256");
    expect(claims.iss).toBe(idp.issuer);
    expect(claims.aud).toBe(CLIENT_ID);
    expect(claims.nonce).toBe(nonce);
    expect(claims.sub).toBe(researcher.subject);
    const jwks = (await (await fetch(new URL("/jwks", issuer))).json()) as {
      keys: Array<Record<string, unknown>>;
    };
    const jwk = jwks.keys.find((key) => key.kid === header.kid);
    expect(jwk).toBeTruthy();
    expect(jwk).not.toHaveProperty("d");
    const signatureValid = verify(
      "RSA-SHA256",
      Buffer.from(`${headerPart}.${payloadPart}`),
      createPublicKey({ key: jwk as never, format: "jwk" }),
      Buffer.from(signaturePart, "base64url"),
    );
    expect(signatureValid).toBe(true);

    // OpenID Connect Core 1.0 §5.3.2; values from deploy/demo/accounts.ts.
    const userinfo = await fetch(new URL("/me", issuer), {
      headers: { authorization: `Bearer ${tokens.access_token}` },
    });
    expect(userinfo.status).toBe(200);
    expect(await userinfo.json()).toEqual({
      sub: researcher.subject,
      email: researcher.email,
      email_verified: true,
      name: researcher.displayName,
    });
  });

  it("sends a signed-in browser straight back with a new code, and accepts client_secret_basic", async () => {
    // Relies on the session cookie the previous test's sign-in left in the jar.
    const start = await browse(jar, authorizeUrl("state-kestrel-2", "nonce-kestrel-2"));
    const callback = await followToRedirectUri(jar, start, issuer);
    expect(callback.searchParams.get("state")).toBe("state-kestrel-2");
    const code = callback.searchParams.get("code");
    expect(code).toMatch(/^\S+$/);

    // RFC 6749 §2.3.1: form-encoded id and secret in HTTP Basic.
    const basic = Buffer.from(`${CLIENT_ID}:${CLIENT_SECRET}`).toString("base64");
    const tokenResponse = await fetch(new URL("/token", issuer), {
      ...postForm({
        grant_type: "authorization_code",
        code: code!,
        redirect_uri: REDIRECT_URI,
        code_verifier: verifierFor("state-kestrel-2"),
      }),
      headers: { "content-type": "application/x-www-form-urlencoded", authorization: `Basic ${basic}` },
    });
    expect(tokenResponse.status).toBe(200);
    const tokens = (await tokenResponse.json()) as { id_token: string };
    expect(decodeJwtPart(tokens.id_token.split(".")[1] ?? "").sub).toBe(researcher.subject);
  });

  it("requires PKCE: no challenge is refused, and a code is exchanged only with its own verifier", async () => {
    // RFC 7636 §4.4.1: a server that requires PKCE answers a request without a challenge with invalid_request.
    const bare = await browse(jar, authorizeUrl("state-kestrel-bare", "nonce-kestrel-bare", { pkce: false }));
    const refused = await followToRedirectUri(jar, bare, issuer);
    expect(refused.searchParams.get("error")).toBe("invalid_request");
    expect(refused.searchParams.get("code")).toBeNull();

    // Still signed in from the first test, so the provider sends a code at once.
    const start = await browse(jar, authorizeUrl("state-kestrel-pkce", "nonce-kestrel-pkce"));
    const callback = await followToRedirectUri(jar, start, issuer);
    const exchange = {
      grant_type: "authorization_code",
      code: callback.searchParams.get("code")!,
      redirect_uri: REDIRECT_URI,
      client_id: CLIENT_ID,
      client_secret: CLIENT_SECRET,
    };
    // RFC 7636 §4.6: the verifier must hash to the challenge, otherwise invalid_grant (RFC 6749 §5.2).
    const wrong = await fetch(
      new URL("/token", issuer),
      postForm({ ...exchange, code_verifier: verifierFor("state-kestrel-other") }),
    );
    expect(wrong.status).toBe(400);
    expect(((await wrong.json()) as { error: string }).error).toBe("invalid_grant");
  });

  it("signs out on request and asks for the password again afterwards", async () => {
    // OpenID Connect RP-Initiated Logout 1.0 §2–3: client_id plus a registered post_logout_redirect_uri.
    const endUrl = new URL("/session/end", issuer);
    endUrl.search = new URLSearchParams({
      client_id: CLIENT_ID,
      post_logout_redirect_uri: "http://127.0.0.1:5180/",
      state: "bye",
    }).toString();
    const confirmPage = await browse(jar, endUrl);
    expect(confirmPage.status).toBe(200);
    const confirmHtml = await confirmPage.text();
    expect(confirmHtml).toContain("Yes, sign me out");
    const action = /<form[^>]*action="([^"]+)"/.exec(confirmHtml)?.[1];
    const xsrf = /name="xsrf" value="([^"]+)"/.exec(confirmHtml)?.[1];
    expect(action).toBe(`${idp.issuer}/session/end/confirm`);

    const confirmed = await browse(jar, new URL(action!), postForm({ xsrf: xsrf!, logout: "yes" }));
    expect(confirmed.status).toBe(303);
    expect(confirmed.headers.get("location")).toBe("http://127.0.0.1:5180/?state=bye");

    const again = await browse(jar, authorizeUrl("state-kestrel-3", "nonce-kestrel-3"));
    expect(new URL(again.headers.get("location")!, issuer).pathname).toMatch(/^\/interaction\//);
  });

  it("answers an interaction without its cookie with an error page, not a sign-in", async () => {
    const response = await fetch(new URL("/interaction/not-a-real-interaction", issuer), {
      ...postForm({ email: researcher.email, password: DEMO_PASSWORD }),
      redirect: "manual",
    });
    expect(response.status).toBe(400);
    expect(response.headers.get("location")).toBeNull();
    expect(await response.text()).toContain("expired");
  });
});

describe("fake mail sink", () => {
  let sink: FakeSmtp;
  let smtpPort: number;
  let inbox: URL;

  async function send(to: string, subject: string, text: string, html?: string): Promise<void> {
    const transport = nodemailer.createTransport({ host: "127.0.0.1", port: smtpPort, secure: false });
    // Resolves after the sink's 250 reply, which it gives only once the message is stored.
    await transport.sendMail({ from: "Sigmaflow <no-reply@sigmaflow.example>", to, subject, text, html });
    transport.close();
  }

  async function listMessages(to?: string) {
    const url = new URL("/api/messages", inbox);
    if (to) url.searchParams.set("to", to);
    const response = await fetch(url);
    expect(response.status).toBe(200);
    return ((await response.json()) as { messages: Array<Record<string, unknown>> }).messages;
  }

  beforeAll(async () => {
    smtpPort = await freePort();
    const httpPort = await freePort();
    sink = await startFakeSmtp({ smtpPort, httpPort });
    inbox = new URL(`http://127.0.0.1:${httpPort}/`);
  });
  afterAll(async () => {
    await sink?.close();
  });
  beforeEach(async () => {
    expect((await fetch(new URL("/api/messages", inbox), { method: "DELETE" })).status).toBe(200);
  });

  it("keeps a sent message and finds it by recipient, case-insensitively", async () => {
    const subject = "Invitation to <Kestrel Plasma Collisions> & friends";
    const link = "http://127.0.0.1:5180/invitations/accept?token=abc&group=kestrel";
    await send(newcomer.email, subject, `Hello Mei,\n\nJoin the group: ${link}.\n`);

    const found = await listMessages(newcomer.email.toUpperCase());
    expect(found).toHaveLength(1);
    expect(found[0]).toMatchObject({ subject, to: [newcomer.email], html: null });
    expect(found[0]?.text).toContain(link);
    expect(await listMessages("someone.else@halvorsen.example")).toEqual([]);

    const page = await (await fetch(inbox)).text();
    expect(page).toContain("Invitation to &lt;Kestrel Plasma Collisions&gt; &amp; friends");
    expect(page).not.toContain("<Kestrel");

    const detail = await fetch(new URL(`/messages/${String(found[0]?.id)}`, inbox));
    expect(detail.status).toBe(200);
    const escapedLink = link.replace("&", "&amp;");
    // The trailing full stop belongs to the sentence, not to the link.
    expect(await detail.text()).toContain(`<a href="${escapedLink}" target="_blank"`);
  });

  it("shows an HTML body only inside a sandboxed iframe, escaped into srcdoc", async () => {
    await send(newcomer.email, "Job finished", "Done.", '<p>Done.</p><script>alert("x")</script>');
    const [message] = await listMessages();
    expect(message?.html).toContain("<script>");
    const detailHtml = await (await fetch(new URL(`/messages/${String(message?.id)}`, inbox))).text();
    expect(detailHtml).toContain('sandbox="allow-popups allow-popups-to-escape-sandbox"');
    expect(detailHtml).toContain("&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;");
    expect(detailHtml).not.toContain("<script>");
  });

  it("lists newest first, clears on DELETE and then shows the empty state", async () => {
    await send(researcher.email, "First", "one");
    await send(researcher.email, "Second", "two");
    expect((await listMessages()).map((message) => message.subject)).toEqual(["Second", "First"]);

    const cleared = await fetch(new URL("/api/messages", inbox), { method: "DELETE" });
    expect(await cleared.json()).toEqual({ deleted: 2 });
    expect(await listMessages()).toEqual([]);
    expect(await (await fetch(inbox)).text()).toContain("No messages yet.");
  });

  it("keeps messages across a restart when given a store directory", async () => {
    const storeDir = await mkdtemp(path.join(tmpdir(), "sigmaflow-fake-smtp-"));
    const ports = { smtpPort: await freePort(), httpPort: await freePort() };
    try {
      const first = await startFakeSmtp({ ...ports, storeDir });
      const transport = nodemailer.createTransport({
        host: "127.0.0.1",
        port: ports.smtpPort,
        secure: false,
      });
      await transport.sendMail({
        from: "no-reply@sigmaflow.example",
        to: newcomer.email,
        subject: "Kept",
        text: "x",
      });
      transport.close();
      await first.close();

      const second = await startFakeSmtp({ ...ports, storeDir });
      try {
        const response = await fetch(`http://127.0.0.1:${ports.httpPort}/api/messages`);
        const { messages } = (await response.json()) as { messages: Array<{ subject: string }> };
        expect(messages.map((message) => message.subject)).toEqual(["Kept"]);
      } finally {
        await second.close();
      }
    } finally {
      await rm(storeDir, { recursive: true, force: true });
    }
  });
});
