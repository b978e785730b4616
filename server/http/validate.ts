import type { Request } from "express";
import type { z } from "zod";
import { findExcessDepth } from "../../shared/json-depth";
import { AppError, validationError } from "./errors";

/**
 * Deepest nesting of objects and arrays a request body may have. Real bodies (a code definition with
 * its parameter schema, a run with nested parameters) stay well under it; far deeper ones would
 * overflow the stack of the recursive walks that follow (hashing, cloning, Ajv, JSON.stringify).
 */
export const MAX_BODY_DEPTH = 32;

function requireShallow(body: unknown): void {
  const excess = findExcessDepth(body, MAX_BODY_DEPTH);
  if (!excess) return;
  const path = excess.path.join(".");
  throw new AppError(
    422,
    "validation_failed",
    `The request body is invalid: ${path} is nested more than ${MAX_BODY_DEPTH} levels deep; objects and arrays may nest at most ${MAX_BODY_DEPTH} levels.`,
    [{ path, message: `Nested more than ${MAX_BODY_DEPTH} levels deep.` }],
  );
}

/** Parses `req.body` with a zod schema; a failure becomes a 422 listing each problem. */
export function parseBody<S extends z.ZodType>(schema: S, req: Request): z.infer<S> {
  requireShallow(req.body);
  const result = schema.safeParse(req.body ?? undefined);
  if (!result.success) throw validationError(result.error, "body");
  return result.data;
}

export function parseParams<S extends z.ZodType>(schema: S, req: Request): z.infer<S> {
  const result = schema.safeParse(req.params);
  if (!result.success) throw validationError(result.error, "params");
  return result.data;
}

/** Parses a response with its contract before sending, so the API never answers outside it. */
export function shape<S extends z.ZodType>(schema: S, value: z.input<S>): z.infer<S> {
  return schema.parse(value);
}
