/**
 * The values of a database enum, in order, taken from the zod enum of shared/schemas that the API
 * parses with, so a state, role or kind is listed once. PostgreSQL compares enum values by their
 * position: append new values, never reorder (a migration adds them with ALTER TYPE … ADD VALUE).
 */
export function enumValues<T extends string>(schema: { options: T[] }): [T, ...T[]] {
  const [first, ...rest] = schema.options;
  if (first === undefined) throw new Error("A database enum needs at least one value.");
  return [first, ...rest];
}
