import { csrfSync } from "csrf-sync";
import type { Request } from "express";

/**
 * Synchroniser-token CSRF protection for requests authenticated by the session cookie. The token lives in
 * the session and is handed to the client by `GET /api/me`; mutating requests send it as `x-csrf-token`.
 * Requests without a signed-in session carry no authority to forge, and API-token requests carry no
 * cookie, so both skip the check (their routes still require authentication).
 */
const csrf = csrfSync({
  getTokenFromRequest: (req) => req.get("x-csrf-token") ?? undefined,
  skipCsrfProtection: (req: Request) => req.user?.via !== "session",
  errorConfig: { statusCode: 403, code: "csrf_invalid", message: "csrf token invalid" },
});

export const csrfProtection = csrf.csrfSynchronisedProtection;
export const csrfTokenFor = (req: Request) => csrf.generateToken(req);
