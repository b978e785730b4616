import { Router } from "express";
import { rateLimit } from "express-rate-limit";
import { safeReturnTo } from "../../shared/return-to";
import { meSchema } from "../../shared/schemas/auth";
import { csrfTokenFor } from "../auth/csrf";
import { OIDC_STRATEGY, type SignIn } from "../auth/oidc";
import { requirePrincipal } from "../auth/principal";
import { SESSION_COOKIE } from "../auth/session";
import { sendSignInFailure, sendSignInRefusal } from "../auth/sign-in-failure";
import { errorBody } from "../http/errors";
import { shape } from "../http/validate";
import { describeMe } from "../services/users.service";
import type { RouteContext } from "./context";

export function authRoutes({ db, config }: RouteContext, signIn: SignIn): Router {
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

  router.get("/auth/login", signInLimiter, async (req, res, next) => {
    try {
      await signIn.ready();
    } catch (error) {
      return sendSignInFailure(req, res, error);
    }
    req.session.returnTo = safeReturnTo(req.query.returnTo);
    signIn.passport.authenticate(OIDC_STRATEGY)(req, res, next);
  });

  router.get("/auth/callback", signInLimiter, async (req, res, next) => {
    try {
      await signIn.ready();
    } catch (error) {
      return sendSignInFailure(req, res, error);
    }
    const returnTo = safeReturnTo(req.session.returnTo);
    signIn.passport.authenticate(
      OIDC_STRATEGY,
      (error: unknown, user: Express.User | false, info: unknown) => {
        if (error) return sendSignInFailure(req, res, error);
        if (!user) return sendSignInRefusal(req, res, info);
        // passport regenerates the session on login, so a session id fixed before sign-in is worthless.
        req.logIn(user, (loginError) => {
          if (loginError) return sendSignInFailure(req, res, loginError);
          res.redirect(returnTo);
        });
      },
    )(req, res, next);
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
