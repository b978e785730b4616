/**
 * The provider's endpoints, read from its discovery document (`<issuer>/.well-known/openid-configuration`,
 * OpenID Connect Discovery 1.0 §4). Endpoints set explicitly in the configuration win over discovered ones;
 * when all three are set the document is never fetched.
 */
import { z } from "zod";
import type { ServerConfig } from "../config";

export type OidcEndpoints = { authorizationURL: string; tokenURL: string; userInfoURL: string };
type Overrides = ServerConfig["oidc"]["endpointOverrides"];

const DISCOVERY_TIMEOUT_MS = 10_000;

const discoveryDocumentSchema = z.object({
  issuer: z.string(),
  authorization_endpoint: z.url(),
  token_endpoint: z.url(),
  userinfo_endpoint: z.url().optional(),
});

/** Discovery failed: the message says what was fetched, what went wrong and which setting to look at. */
export class OidcDiscoveryError extends Error {
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = "OidcDiscoveryError";
  }
}

export function discoveryUrl(issuer: string): string {
  return `${issuer}/.well-known/openid-configuration`;
}

function complete(overrides: Overrides): OidcEndpoints | null {
  const { authorizationURL, tokenURL, userInfoURL } = overrides;
  return authorizationURL && tokenURL && userInfoURL ? { authorizationURL, tokenURL, userInfoURL } : null;
}

/** fetch reports "fetch failed" and keeps the useful part (ECONNREFUSED, ENOTFOUND, …) in its cause. */
function networkReason(error: unknown): string {
  const cause = (error as { cause?: { code?: unknown; message?: unknown } } | null)?.cause;
  if (typeof cause?.code === "string") return cause.code;
  if (typeof cause?.message === "string" && cause.message) return cause.message;
  return error instanceof Error ? error.message : String(error);
}

export async function discoverEndpoints(
  issuer: string,
  overrides: Overrides,
  fetchImpl: typeof fetch = fetch,
): Promise<OidcEndpoints> {
  const configured = complete(overrides);
  if (configured) return configured;
  const url = discoveryUrl(issuer);
  let response: Response;
  try {
    response = await fetchImpl(url, {
      headers: { accept: "application/json" },
      redirect: "error",
      signal: AbortSignal.timeout(DISCOVERY_TIMEOUT_MS),
    });
  } catch (error) {
    throw new OidcDiscoveryError(`Could not reach the identity provider at ${url}: ${networkReason(error)}`, {
      cause: error,
    });
  }
  if (!response.ok) {
    throw new OidcDiscoveryError(
      `The identity provider answered ${response.status} for ${url}; check OIDC_ISSUER.`,
    );
  }
  let body: unknown;
  try {
    body = await response.json();
  } catch (error) {
    throw new OidcDiscoveryError(`${url} is not a JSON discovery document; check OIDC_ISSUER.`, {
      cause: error,
    });
  }
  const parsed = discoveryDocumentSchema.safeParse(body);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new OidcDiscoveryError(
      `The discovery document at ${url} is unusable (${issue?.path.join(".")}: ${issue?.message}).`,
    );
  }
  const document = parsed.data;
  // Discovery §4.3: the document's issuer must be exactly the one it was fetched for.
  if (document.issuer !== issuer) {
    throw new OidcDiscoveryError(
      `The discovery document at ${url} names the issuer ${document.issuer}; set OIDC_ISSUER to exactly that.`,
    );
  }
  const userInfoURL = overrides.userInfoURL ?? document.userinfo_endpoint;
  if (!userInfoURL) {
    throw new OidcDiscoveryError(
      `The identity provider at ${issuer} announces no userinfo endpoint; set OIDC_USERINFO_URL.`,
    );
  }
  return {
    authorizationURL: overrides.authorizationURL ?? document.authorization_endpoint,
    tokenURL: overrides.tokenURL ?? document.token_endpoint,
    userInfoURL,
  };
}

/**
 * Discovers once and keeps the result. Concurrent callers share one request; a failure is not kept, so
 * the next sign-in tries again (the provider may have been down for a moment).
 */
export function endpointResolver(issuer: string, overrides: Overrides, fetchImpl: typeof fetch = fetch) {
  let found: Promise<OidcEndpoints> | null = null;
  return (): Promise<OidcEndpoints> => {
    if (!found) {
      found = discoverEndpoints(issuer, overrides, fetchImpl);
      found.catch(() => {
        found = null;
      });
    }
    return found;
  };
}
