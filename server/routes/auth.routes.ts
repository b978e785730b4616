import { Router } from "express";
import { rateLimit } from "express-rate-limit";
import passport from "passport";
import { meSchema } from "../../shared/schemas/auth";
import { csrfTokenFor } from "../auth/csrf";
import { safeReturnTo } from "../auth/oidc";
import { requirePrincipal } from "../auth/principal";
import { SESSION_COOKIE } from "../auth/session";
import { AppError, errorBody } from "../http/errors";
import { shape } from "../http/validate";
import { describeMe } from "../services/users.service";
import type { RouteContext } from "./context";

export function authRoutes({ db, config }: RouteContext): Router {
  const router = Router();
  const signInLimiter = rateLimit({
    windowMs: 60_000,
    limit: config.authRateLimitPerMinute,
    standardHeaders: "draft-8",
    legacyHeaders: false,
    handler: (_req, res) => {
      res
        .status(429)
        .json(errorBody("rate_limited", "Too many sign-in attempts. Wait a minute and try again."));
    },
  });

  router.get("/auth/login", signInLimiter, (req, res, next) => {
    req.session.returnTo = safeReturnTo(req.query.returnTo);
    passport.authenticate("oidc")(req, res, next);
  });

  router.get("/auth/callback", signInLimiter, (req, res, next) => {
    const returnTo = safeReturnTo(req.session.returnTo);
    passport.authenticate("oidc", (error: unknown, user: Express.User | false) => {
      if (error)
        return next(
          error instanceof AppError
            ? error
            : new AppError(502, "sign_in_failed", "Sign-in with the identity provider failed. Try again."),
        );
      if (!user) return res.redirect("/signin?error=sign_in_failed");
      // passport regenerates the session on login, so a session id fixed before sign-in is worthless.
      req.logIn(user, (loginError) => {
        if (loginError) return next(loginError);
        res.redirect(returnTo);
      });
    })(req, res, next);
  });

  router.post("/auth/logout", (req, res, next) => {
    req.logout((logoutError) => {
      if (logoutError) return next(logoutError);
      req.session.destroy((destroyError) => {
        if (destroyError) return next(destroyError);
        res.clearCookie(SESSION_COOKIE, { path: "/" });
        res.status(204).end();
      });
    });
  });

  router.get("/me", async (req, res) => {
    const principal = requirePrincipal(req);
    const me = await describeMe(db, principal);
    // API-token callers have no session and need no CSRF token.
    const csrfToken = principal.via === "session" ? csrfTokenFor(req) : "";
    res.json(shape(meSchema, { ...me, csrfToken }));
  });

  return router;
}
