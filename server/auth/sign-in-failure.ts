/**
 * What a failed sign-in tells the person and what it leaves in the server log. The log gets the cause
 * (provider error codes, the refused step, the accounts involved) but never tokens, codes or secrets.
 */
import type { Request, Response } from "express";
import { escapeHtml } from "../../shared/html";
import { AppError, errorBody } from "../http/errors";
import { EmailInUseError } from "../services/users.service";
import { OidcDiscoveryError } from "./oidc-discovery";

export type SignInFailure = {
  status: number;
  code: string;
  message: string;
  /** Fields for the log line. */
  cause: Record<string, unknown>;
};

/** passport-openidconnect's errors: TokenError/AuthorizationError carry the provider's OAuth error code. */
type OAuthLibraryError = Error & {
  code?: unknown;
  oauthError?: { statusCode?: unknown; code?: unknown; message?: unknown };
};

const PROVIDER_FAILED =
  "Sign-in with the identity provider failed. Start again from the sign-in page; if it keeps failing, " +
  "tell a site admin (the server log has the cause).";

const SERVER_FAILED =
  "Something went wrong on the server while signing you in. It has been logged; start again from the " +
  "sign-in page.";

/** Errors passport-openidconnect raises for what the provider answered (or failed to answer). */
const PROVIDER_ERRORS = new Set(["TokenError", "AuthorizationError", "InternalOAuthError"]);

export function describeSignInError(error: unknown): SignInFailure {
  if (error instanceof OidcDiscoveryError) {
    return {
      status: 503,
      code: "sign_in_unavailable",
      message:
        "Sign-in is unavailable: Sigmaflow cannot use your institution's identity provider right now. " +
        "Try again in a few minutes; if it keeps failing, tell a site admin.",
      cause: { step: "discovery", reason: error.message },
    };
  }
  if (error instanceof AppError) {
    const details = error instanceof EmailInUseError ? error.logDetails : error.details;
    return {
      status: error.status,
      code: error.code,
      message: error.message,
      cause: { step: "account", code: error.code, ...(details ? { details } : {}) },
    };
  }
  const libraryError = (error ?? {}) as OAuthLibraryError;
  const cause: Record<string, unknown> = {
    step: PROVIDER_ERRORS.has(libraryError.name) ? "provider" : "callback",
    error: libraryError.name ?? typeof error,
    reason: libraryError.message ?? String(error),
  };
  if (typeof libraryError.code === "string") {
    cause[cause.step === "provider" ? "providerError" : "code"] = libraryError.code;
  }
  const inner = libraryError.oauthError;
  if (inner) {
    // Only the status and the network error: the response body of a token or userinfo request stays out.
    if (inner.statusCode !== undefined) cause.httpStatus = inner.statusCode;
    if (typeof inner.code === "string") cause.networkError = inner.code;
    else if (typeof inner.message === "string") cause.networkError = inner.message;
  }
  if (cause.step === "provider") {
    return { status: 502, code: "sign_in_failed", message: PROVIDER_FAILED, cause };
  }
  return { status: 500, code: "internal", message: SERVER_FAILED, cause };
}

function failurePage(message: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>Sign-in did not complete · Sigmaflow</title></head>
<body style="font-family: system-ui, sans-serif; max-width: 36rem; margin: 4rem auto; padding: 0 1.5rem; line-height: 1.5">
<h1 style="font-size: 1.5rem">Sign-in did not complete</h1>
<p>${escapeHtml(message)}</p>
<p><a href="/signin">Back to the sign-in page</a></p>
</body></html>`;
}

/**
 * Logs the cause and answers with the failure. The callback is a browser navigation, so a browser gets a
 * short page with the message; API clients get the usual `{ error: { code, message } }`.
 */
export function sendSignInFailure(req: Request, res: Response, error: unknown): void {
  const failure = describeSignInError(error);
  const level = failure.code === "internal" ? "error" : "warn";
  req.log[level](
    { signIn: { status: failure.status, code: failure.code, ...failure.cause } },
    "sign-in failed",
  );
  const body = errorBody(failure.code, failure.message);
  res.status(failure.status).format({
    json: () => res.json(body),
    html: () => res.type("html").send(failurePage(failure.message)),
    default: () => res.json(body),
  });
}

/** The provider or the state check turned the sign-in down (passport's `fail`): log why, send back. */
export function sendSignInRefusal(req: Request, res: Response, info: unknown): void {
  const reason =
    typeof (info as { message?: unknown } | null)?.message === "string"
      ? (info as { message: string }).message
      : "no reason given";
  req.log.warn(
    { signIn: { status: 302, code: "sign_in_refused", step: "provider", reason } },
    "sign-in failed",
  );
  res.redirect("/signin?error=sign_in_failed");
}
