/**
 * Sign-in through the institution's OpenID Connect provider (authorization code flow with PKCE and a
 * nonce, confidential client). The endpoints come from the issuer's discovery document unless set in the
 * configuration. passport-openidconnect does not verify the ID token's signature; the token arrives on the
 * back channel from the token endpoint, which is what we rely on.
 */
import { Passport } from "passport";
import type { Profile, VerifyCallback } from "passport-openidconnect";
import type { ServerConfig } from "../config";
import type { Database } from "../db/client";
import type { Logger } from "../logger";
import { findPrincipal, upsertUserFromOidc } from "../services/users.service";
import { endpointResolver, type OidcEndpoints } from "./oidc-discovery";
import { PkceOpenIdConnectStrategy } from "./oidc-strategy";

export const OIDC_STRATEGY = "oidc";

export type SignIn = {
  /** This app's passport: the session strategy and, once `ready()` resolved, the provider's strategy. */
  passport: InstanceType<typeof Passport>;
  /** Finds the provider's endpoints (once) and registers the strategy; rejects with OidcDiscoveryError. */
  ready(): Promise<void>;
};

function oidcStrategy(db: Database, oidc: ServerConfig["oidc"], endpoints: OidcEndpoints) {
  // The library puts `openid` in front of the scopes it is given.
  const scope = oidc.scope.filter((s) => s !== "openid");
  return new PkceOpenIdConnectStrategy(
    {
      issuer: oidc.issuer,
      authorizationURL: endpoints.authorizationURL,
      tokenURL: endpoints.tokenURL,
      userInfoURL: endpoints.userInfoURL,
      clientID: oidc.clientID,
      clientSecret: oidc.clientSecret,
      callbackURL: oidc.callbackURL,
      scope: scope.length > 0 ? scope : undefined,
      skipUserProfile: false,
    },
    (issuer: string, profile: Profile, done: VerifyCallback) => {
      upsertUserFromOidc(db, {
        issuer,
        subject: profile.id,
        email: profile.emails?.[0]?.value ?? null,
        displayName: profile.displayName ?? null,
      }).then(
        (principal) => done(null, principal),
        (error: Error) => done(error),
      );
    },
  );
}

/**
 * One passport per app (not the module-wide singleton), so two apps in one process, each with its own
 * provider and database, never share strategies or session lookups.
 */
export function configureSignIn(
  db: Database,
  oidc: ServerConfig["oidc"],
  log: Logger,
  fetchImpl: typeof fetch = fetch,
): SignIn {
  const passport = new Passport();
  passport.serializeUser((user, done) => done(null, user.userId));
  passport.deserializeUser((userId: string, done) => {
    findPrincipal(db, userId, "session").then(
      (principal) => done(null, principal ?? false),
      (error: unknown) => done(error),
    );
  });

  const endpoints = endpointResolver(oidc.issuer, oidc.endpointOverrides, fetchImpl);
  let registeredFor: OidcEndpoints | null = null;
  async function ready(): Promise<void> {
    const found = await endpoints();
    if (registeredFor === found) return;
    passport.use(OIDC_STRATEGY, oidcStrategy(db, oidc, found));
    registeredFor = found;
  }

  // Discover at start so a wrong issuer shows in the log before anyone signs in; sign-in retries on failure.
  ready().then(
    () => log.info({ issuer: oidc.issuer, ...registeredFor }, "identity provider endpoints"),
    (error: Error) =>
      log.warn(
        { issuer: oidc.issuer, reason: error.message },
        "identity provider not ready; sign-in will try discovery again",
      ),
  );
  return { passport, ready };
}
