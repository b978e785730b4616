/**
 * The development OpenID Connect provider: oidc-provider with the demo accounts, one confidential
 * client (Sigmaflow's server) and our own sign-in page. Plain http on 127.0.0.1, in-memory storage,
 * keys generated at each start – a restart signs everybody out, which is fine for development.
 */
import { generateKeyPairSync, randomBytes, randomUUID } from "node:crypto";
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import Provider, { type Configuration } from "oidc-provider";
import { findDemoAccountBySubject, toOidcAccount } from "./demo-directory";
import { renderNoticePage } from "./html";
import { handleInteraction } from "./interactions";
import { providerPages } from "./provider-pages";

export type FakeIdpOptions = {
  port: number;
  /** Interface to listen on; the issuer always names 127.0.0.1. */
  host?: string;
  clientId: string;
  clientSecret: string;
  redirectUris: string[];
  postLogoutRedirectUris?: string[];
  /** Endpoint paths other than oidc-provider's own (`/auth`, `/token`, `/me`, …); discovery announces them. */
  routes?: Configuration["routes"];
};

export type FakeIdp = { issuer: string; close(): Promise<void> };

/** oidc-provider interaction ids are nanoids (URL-safe alphabet). */
const INTERACTION_PATH = /^\/interaction\/([A-Za-z0-9_-]+)\/?$/;

/** A fresh RS256 signing key; RS256 is the algorithm every OpenID Connect client must accept. */
function generateSigningJwk() {
  const { privateKey } = generateKeyPairSync("rsa", { modulusLength: 2048 });
  return { ...privateKey.export({ format: "jwk" }), kid: randomUUID(), alg: "RS256", use: "sig" };
}

function buildConfiguration(options: FakeIdpOptions): Configuration {
  return {
    clients: [
      {
        client_id: options.clientId,
        client_secret: options.clientSecret,
        client_name: "Sigmaflow",
        redirect_uris: options.redirectUris,
        post_logout_redirect_uris: options.postLogoutRedirectUris ?? [],
        grant_types: ["authorization_code"],
        response_types: ["code"],
        // oidc-provider accepts client_secret_post from a client_secret_basic client and vice versa.
        token_endpoint_auth_method: "client_secret_basic",
      },
    ],
    // Only the authorization code flow; nothing implicit.
    responseTypes: ["code"],
    scopes: ["openid", "email", "profile"],
    claims: {
      openid: ["sub"],
      email: ["email", "email_verified"],
      profile: ["name"],
    },
    findAccount: (_ctx, subject) => {
      const account = findDemoAccountBySubject(subject);
      return account ? toOidcAccount(account) : undefined;
    },
    interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
    features: {
      devInteractions: { enabled: false },
      rpInitiatedLogout: {
        enabled: true,
        logoutSource: providerPages.logoutSource,
        postLogoutSuccessSource: providerPages.postLogoutSuccessSource,
      },
    },
    // Sigmaflow sends a PKCE challenge (S256) with every sign-in; refusing requests without one keeps it so.
    pkce: { required: () => true },
    renderError: providerPages.renderError,
    ...(options.routes ? { routes: options.routes } : {}),
    cookies: { keys: [randomBytes(32).toString("base64url"), randomBytes(32).toString("base64url")] },
    jwks: { keys: [generateSigningJwk()] },
    // Seconds. A working day of session so a developer signs in once per day.
    ttl: {
      AccessToken: 60 * 60,
      AuthorizationCode: 60,
      IdToken: 60 * 60,
      Interaction: 60 * 60,
      Session: 8 * 60 * 60,
      Grant: 8 * 60 * 60,
    },
  };
}

function sendServerError(res: ServerResponse, error: unknown): void {
  console.error("fake-idp: interaction failed", error);
  if (res.headersSent) {
    res.end();
    return;
  }
  res.statusCode = 500;
  res.setHeader("Content-Type", "text/html; charset=utf-8");
  res.end(renderNoticePage("Something went wrong", "The sign-in step failed. Please start again."));
}

export async function startFakeIdp(options: FakeIdpOptions): Promise<FakeIdp> {
  const issuer = `http://127.0.0.1:${options.port}`;
  const provider = new Provider(issuer, buildConfiguration(options));
  provider.on("server_error", (_ctx, error) => console.error("fake-idp: server error", error));
  const providerCallback = provider.callback();

  const server = createServer((req: IncomingMessage, res: ServerResponse) => {
    const pathname = new URL(req.url ?? "/", issuer).pathname;
    const match = INTERACTION_PATH.exec(pathname);
    if (!match?.[1]) {
      providerCallback(req, res);
      return;
    }
    handleInteraction(provider, req, res, match[1]).catch((error: unknown) => sendServerError(res, error));
  });

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, options.host ?? "127.0.0.1", () => {
      server.off("error", reject);
      resolve();
    });
  });

  return {
    issuer,
    close: async () => {
      const closed = new Promise<void>((resolve, reject) =>
        server.close((error) => (error ? reject(error) : resolve())),
      );
      // Keep-alive connections (browsers, fetch) would otherwise hold close() open.
      server.closeAllConnections();
      await closed;
    },
  };
}
