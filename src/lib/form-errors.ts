import type { z } from "zod";
import { isApiRequestError } from "./api-error";
import { type FieldErrors, fieldErrorsFromError, fieldErrorsFromZod } from "./field-errors";

/** Text fields of a submitted form, by name. */
export function readTextFields(form: HTMLFormElement): Record<string, string> {
  const values: Record<string, string> = {};
  for (const [key, value] of new FormData(form)) {
    if (typeof value === "string") values[key] = value;
  }
  return values;
}

/** Runs the request's zod schema in the browser so obvious slips are caught before a round trip. */
export function validateWith<S extends z.ZodType>(
  schema: S,
  input: unknown,
): { ok: true; data: z.output<S> } | { ok: false; errors: FieldErrors } {
  const parsed = schema.safeParse(input);
  return parsed.success
    ? { ok: true, data: parsed.data }
    : { ok: false, errors: fieldErrorsFromZod(parsed.error) };
}

/**
 * Field errors to show: the browser's own check if it failed, else the server's 422 details, else a
 * conflict (409) pinned to the field it is about. `unplaced` is true when the server's error has no field.
 */
export function visibleFieldErrors(
  clientErrors: FieldErrors | null,
  serverError: unknown,
  conflictField?: string,
): { errors: FieldErrors; unplaced: boolean } {
  if (clientErrors) return { errors: clientErrors, unplaced: false };
  if (!serverError) return { errors: {}, unplaced: false };
  const fromServer = fieldErrorsFromError(serverError);
  if (Object.keys(fromServer).length > 0) return { errors: fromServer, unplaced: false };
  if (conflictField && isApiRequestError(serverError) && serverError.status === 409) {
    return { errors: { [conflictField]: serverError.message }, unplaced: false };
  }
  return { errors: {}, unplaced: true };
}
