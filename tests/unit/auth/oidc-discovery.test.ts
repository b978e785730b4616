/**
 * Endpoint discovery (OpenID Connect Discovery 1.0 §4) with a stand-in for fetch: which endpoints win, when
 * the document is fetched, and what a wrong or missing document says. Expected endpoints are the ones the
 * stand-in document announces; the issuer rule is Discovery §4.3 (exact match).
 */
import { describe, expect, it } from "vitest";
import { redactUrl } from "../../../server/auth/log-redaction";
import { discoverEndpoints, endpointResolver, OidcDiscoveryError } from "../../../server/auth/oidc-discovery";

const ISSUER = "https://login.example.org/realms/lab";
const DOCUMENT = {
  issuer: ISSUER,
  authorization_endpoint: `${ISSUER}/protocol/openid-connect/auth`,
  token_endpoint: `${ISSUER}/protocol/openid-connect/token`,
  userinfo_endpoint: `${ISSUER}/protocol/openid-connect/userinfo`,
};
const NO_OVERRIDES = { authorizationURL: undefined, tokenURL: undefined, userInfoURL: undefined };

/** A fetch that answers the discovery URL with `body` (or fails) and counts its calls. */
function fakeFetch(answer: () => Response | Promise<Response>) {
  const calls: string[] = [];
  const impl = (async (input: string | URL | Request) => {
    calls.push(String(input));
    return answer();
  }) as typeof fetch;
  return { impl, calls };
}

const json = (body: unknown, status = 200) =>
  new Response(JSON.stringify(body), { status, headers: { "content-type": "application/json" } });

describe("OpenID Connect endpoint discovery", () => {
  it("takes the endpoints the issuer's document announces", async () => {
    const fetch = fakeFetch(() => json(DOCUMENT));
    const endpoints = await discoverEndpoints(ISSUER, NO_OVERRIDES, fetch.impl);
    expect(fetch.calls).toEqual([`${ISSUER}/.well-known/openid-configuration`]);
    expect(endpoints).toEqual({
      authorizationURL: DOCUMENT.authorization_endpoint,
      tokenURL: DOCUMENT.token_endpoint,
      userInfoURL: DOCUMENT.userinfo_endpoint,
    });
  });

  it("lets a configured endpoint win over the announced one", async () => {
    const fetch = fakeFetch(() => json(DOCUMENT));
    const endpoints = await discoverEndpoints(
      ISSUER,
      { ...NO_OVERRIDES, tokenURL: "https://internal.example.org/token" },
      fetch.impl,
    );
    expect(endpoints.tokenURL).toBe("https://internal.example.org/token");
    expect(endpoints.authorizationURL).toBe(DOCUMENT.authorization_endpoint);
  });

  it("does not fetch the document when all three endpoints are configured", async () => {
    const fetch = fakeFetch(() => json(DOCUMENT));
    const configured = {
      authorizationURL: "https://a.example/a",
      tokenURL: "https://a.example/t",
      userInfoURL: "https://a.example/u",
    };
    expect(await discoverEndpoints(ISSUER, configured, fetch.impl)).toEqual(configured);
    expect(fetch.calls).toEqual([]);
  });

  it("refuses a document that names another issuer, naming the value to configure", async () => {
    const fetch = fakeFetch(() => json({ ...DOCUMENT, issuer: `${ISSUER}/` }));
    await expect(discoverEndpoints(ISSUER, NO_OVERRIDES, fetch.impl)).rejects.toThrow(
      `names the issuer ${ISSUER}/; set OIDC_ISSUER to exactly that`,
    );
  });

  it("says which address failed and why when the provider cannot be reached or answers an error", async () => {
    const down = fakeFetch(() => {
      throw new TypeError("fetch failed", {
        cause: Object.assign(new Error("connect"), { code: "ECONNREFUSED" }),
      });
    });
    const unreachable = discoverEndpoints(ISSUER, NO_OVERRIDES, down.impl);
    await expect(unreachable).rejects.toBeInstanceOf(OidcDiscoveryError);
    await expect(unreachable).rejects.toThrow(`${ISSUER}/.well-known/openid-configuration: ECONNREFUSED`);

    const missing = fakeFetch(() => json({ error: "not found" }, 404));
    await expect(discoverEndpoints(ISSUER, NO_OVERRIDES, missing.impl)).rejects.toThrow("answered 404");
  });

  it("asks for OIDC_USERINFO_URL when the document announces no userinfo endpoint", async () => {
    const { userinfo_endpoint: _omitted, ...withoutUserinfo } = DOCUMENT;
    const fetch = fakeFetch(() => json(withoutUserinfo));
    await expect(discoverEndpoints(ISSUER, NO_OVERRIDES, fetch.impl)).rejects.toThrow(
      "set OIDC_USERINFO_URL",
    );
  });

  it("keeps a found result for every later sign-in but tries again after a failure", async () => {
    let up = false;
    const fetch = fakeFetch(() => {
      if (!up) throw new TypeError("fetch failed");
      return json(DOCUMENT);
    });
    const resolve = endpointResolver(ISSUER, NO_OVERRIDES, fetch.impl);
    await expect(resolve()).rejects.toBeInstanceOf(OidcDiscoveryError);
    up = true;
    const first = await resolve();
    const second = await resolve();
    expect(second).toBe(first);
    expect(fetch.calls).toHaveLength(2); // the failed attempt and the one that succeeded
  });
});

describe("request log redaction", () => {
  it("hides the authorization code and state of a callback and keeps everything else", () => {
    expect(redactUrl("/api/auth/callback?code=abc123&state=xyz&iss=https%3A%2F%2Fidp")).toBe(
      "/api/auth/callback?code=[redacted]&state=[redacted]&iss=https%3A%2F%2Fidp",
    );
    expect(redactUrl("/api/runs?page=2")).toBe("/api/runs?page=2");
    expect(redactUrl("/api/me")).toBe("/api/me");
  });
});
