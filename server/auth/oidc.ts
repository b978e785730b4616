/**
 * Sign-in through the institution's OpenID Connect provider (authorization code flow, confidential client).
 * passport-openidconnect has no discovery, so the endpoints come from configuration. It does not verify the
 * ID token's signature; the token arrives on the back channel from the token endpoint over the configured
 * URL, which is what we rely on.
 */
import passport from "passport";
import { Strategy as OpenIDConnectStrategy, type Profile, type VerifyCallback } from "passport-openidconnect";
import type { ServerConfig } from "../config";
import type { Database } from "../db/client";
import { findPrincipal, upsertUserFromOidc } from "../services/users.service";

export function configurePassport(db: Database, oidc: ServerConfig["oidc"]) {
  passport.use(
    "oidc",
    new OpenIDConnectStrategy(
      {
        issuer: oidc.issuer,
        authorizationURL: oidc.authorizationURL,
        tokenURL: oidc.tokenURL,
        userInfoURL: oidc.userInfoURL,
        clientID: oidc.clientID,
        clientSecret: oidc.clientSecret,
        callbackURL: oidc.callbackURL,
        scope: oidc.scope,
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
    ),
  );
  passport.serializeUser((user, done) => done(null, user.userId));
  passport.deserializeUser((userId: string, done) => {
    findPrincipal(db, userId, "session").then(
      (principal) => done(null, principal ?? false),
      (error: unknown) => done(error),
    );
  });
  return passport;
}

/** Only same-site relative paths may be a destination after sign-in (no open redirects). */
export function safeReturnTo(value: unknown): string {
  if (typeof value !== "string" || !value.startsWith("/") || value.startsWith("//") || value.includes("\\")) {
    return "/";
  }
  return value.slice(0, 500);
}
