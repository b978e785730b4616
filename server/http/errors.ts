/**
 * The single error shape of the API, `{ error: { code, message, details? } }`, and the middleware that
 * turns every thrown error into it. Services throw `AppError`; anything else is a 500 that is logged.
 */
import type { ErrorRequestHandler, RequestHandler } from "express";
import type { ZodError } from "zod";
import type { ApiError } from "../../shared/schemas/common";

export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = "AppError";
  }
}

export const unauthenticated = () => new AppError(401, "unauthenticated", "Sign in to continue.");
export const forbidden = (message = "You do not have permission to do this.") =>
  new AppError(403, "forbidden", message);
export const notFound = (what: string) => new AppError(404, "not_found", `${what} was not found.`);
export const conflict = (message: string, details?: unknown) =>
  new AppError(409, "conflict", message, details);

export function validationError(error: ZodError, where: "body" | "query" | "params"): AppError {
  const details = error.issues.map((issue) => ({
    path: issue.path.map(String).join("."),
    message: issue.message,
  }));
  const first = details[0];
  const summary = first ? `${first.path ? `${first.path}: ` : ""}${first.message}` : "Invalid input.";
  return new AppError(422, "validation_failed", `The request ${where} is invalid: ${summary}`, details);
}

export function errorBody(code: string, message: string, details?: unknown): ApiError {
  return { error: details === undefined ? { code, message } : { code, message, details } };
}

export const notFoundRoute: RequestHandler = (req, _res, next) => {
  next(new AppError(404, "not_found", `No API route for ${req.method} ${req.path}.`));
};

type BodyParserError = Error & { type?: string; status?: number; limit?: number };

export function errorHandler(log: { error: (obj: object, msg: string) => void }): ErrorRequestHandler {
  return (err: unknown, _req, res, _next) => {
    if (res.headersSent) return;
    if (err instanceof AppError) {
      res.status(err.status).json(errorBody(err.code, err.message, err.details));
      return;
    }
    const parserError = err as BodyParserError;
    if (parserError.type === "entity.parse.failed") {
      res.status(400).json(errorBody("malformed_json", "The request body is not valid JSON."));
      return;
    }
    if (parserError.type === "entity.too.large") {
      res
        .status(413)
        .json(
          errorBody(
            "payload_too_large",
            `The request body is larger than the ${parserError.limit} bytes allowed.`,
          ),
        );
      return;
    }
    if (parserError.type === "encoding.invalid") {
      res
        .status(400)
        .json(errorBody("invalid_encoding", "The request body is not valid UTF-8; send UTF-8 JSON."));
      return;
    }
    if (parserError.type === "charset.unsupported" || parserError.type === "encoding.unsupported") {
      res.status(415).json(errorBody("unsupported_encoding", "Send the body as UTF-8 JSON."));
      return;
    }
    if (parserError.status === 403 && parserError.message?.includes("csrf")) {
      res
        .status(403)
        .json(errorBody("csrf_invalid", "The form expired or came from another site: reload the page."));
      return;
    }
    log.error({ err }, "unhandled error");
    res.status(500).json(errorBody("internal", "Something went wrong on the server. It has been logged."));
  };
}
