/**
 * passport-openidconnect 0.1.2 with what it lacks for a safe code flow: a PKCE challenge (RFC 7636, S256)
 * on every authorization request with its verifier sent to the token endpoint, and a nonce per request
 * that the library checks against the ID token's `nonce` claim. Both live in the session next to the
 * state handle until the provider sends the browser back.
 */
import { createHash, randomBytes } from "node:crypto";
import type { Request } from "express";
import type { OAuth2 } from "oauth";
import { type AuthenticateOptions, Strategy as OpenIDConnectStrategy } from "passport-openidconnect";

/** What waits in the session between the redirect to the provider and its answer. */
type PendingSignIn = { handle: string; nonce: string; codeVerifier: string; appState?: unknown };

declare module "express-session" {
  interface SessionData {
    oidcPendingSignIn?: PendingSignIn;
  }
}

type RestoredContext = { nonce: string };

/** The state-store interface passport-openidconnect calls (`store` before the redirect, `verify` after). */
type StateStore = {
  store(
    req: Request,
    ctx: { nonce?: string },
    appState: unknown,
    meta: unknown,
    done: (error: Error | null, handle?: string) => void,
  ): void;
  verify(
    req: Request,
    handle: unknown,
    done: (error: Error | null, ctx: RestoredContext | false, stateOrInfo?: unknown) => void,
  ): void;
};

/** One request's PKCE verifier: a new one on the way out, the stored one once the provider answers. */
type Pkce = { verifier: string };

const newSecret = () => randomBytes(32).toString("base64url");
export const codeChallengeS256 = (verifier: string) =>
  createHash("sha256").update(verifier, "ascii").digest("base64url");

class PendingSignInStore implements StateStore {
  constructor(private readonly pkce: Pkce) {}

  store(...[req, ctx, appState, , done]: Parameters<StateStore["store"]>) {
    if (!req.session) return done(new Error("sign-in needs the session middleware"));
    if (!ctx.nonce) return done(new Error("the authorization request carries no nonce"));
    const handle = newSecret();
    req.session.oidcPendingSignIn = { handle, nonce: ctx.nonce, codeVerifier: this.pkce.verifier, appState };
    done(null, handle);
  }

  verify(...[req, handle, done]: Parameters<StateStore["verify"]>) {
    const pending = req.session?.oidcPendingSignIn;
    // One answer per sign-in: a replayed or second callback finds nothing.
    if (req.session) delete req.session.oidcPendingSignIn;
    if (!pending?.handle || !pending.nonce || !pending.codeVerifier) {
      return done(null, false, { message: "No sign-in was waiting in this browser session." });
    }
    if (typeof handle !== "string" || handle !== pending.handle) {
      return done(null, false, {
        message: "The state parameter does not match the sign-in this browser started.",
      });
    }
    this.pkce.verifier = pending.codeVerifier;
    done(null, { nonce: pending.nonce }, pending.appState);
  }
}

/** The library's OAuth2 client, sending this request's verifier with the authorization code. */
function withCodeVerifier(base: OAuth2, pkce: Pkce): OAuth2 {
  type Exchange = (code: string, params: Record<string, string>, callback: unknown) => void;
  const exchange = base.getOAuthAccessToken as Exchange;
  const client = Object.create(base) as OAuth2;
  const withVerifier: Exchange = (code, params, callback) =>
    exchange.call(client, code, { ...params, code_verifier: pkce.verifier }, callback);
  client.getOAuthAccessToken = withVerifier as OAuth2["getOAuthAccessToken"];
  return client;
}

export class PkceOpenIdConnectStrategy extends OpenIDConnectStrategy {
  declare private _stateStore: StateStore;
  declare private pkce: Pkce;

  override authenticate(req: Request, options?: AuthenticateOptions) {
    // passport runs each request on its own Object.create() of the registered strategy, so these
    // properties belong to this request alone.
    this.pkce = { verifier: newSecret() };
    this._stateStore = new PendingSignInStore(this.pkce);
    this._oauth2 = withCodeVerifier(this._oauth2, this.pkce);
    return super.authenticate(req, options);
  }

  /** Extra authorization parameters; the library keeps `nonce` for the ID token check. */
  override authorizationParams() {
    return {
      code_challenge: codeChallengeS256(this.pkce.verifier),
      code_challenge_method: "S256",
      nonce: randomBytes(24).toString("base64url"),
    };
  }
}
