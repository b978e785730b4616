import type { Request } from "express";
import type { z } from "zod";
import { validationError } from "./errors";

/** Parses `req.body` with a zod schema; a failure becomes a 422 listing each problem. */
export function parseBody<S extends z.ZodType>(schema: S, req: Request): z.infer<S> {
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
