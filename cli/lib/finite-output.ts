/**
 * The last check before a result leaves the command line: every number must be finite. JSON.stringify
 * writes NaN and ±Infinity as `null`, and the text tables would print them as words, so a result that
 * overflowed somewhere would otherwise look like a successful run. The science core refuses inputs it
 * cannot compute; this guard names the quantity if one slips through anyway.
 */
import { CliError } from "../errors";

/** Exit code when a computed result is not finite (2 stays for input refused before computing). */
export const NON_FINITE_RESULT_EXIT_CODE = 1;

function firstNonFinite(value: unknown, path: string): { path: string; value: number } | null {
  if (typeof value === "number") return Number.isFinite(value) ? null : { path, value };
  if (value === null || typeof value !== "object") return null;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    const numbers = value as unknown as ArrayLike<number>;
    for (let i = 0; i < numbers.length; i++) {
      if (!Number.isFinite(numbers[i]!)) return { path: `${path}[${i}]`, value: numbers[i]! };
    }
    return null;
  }
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const found = firstNonFinite(value[i], `${path}[${i}]`);
      if (found) return found;
    }
    return null;
  }
  for (const [key, item] of Object.entries(value)) {
    const found = firstNonFinite(item, path === "" ? key : `${path}.${key}`);
    if (found) return found;
  }
  return null;
}

/**
 * Checks that every number in a result (nested objects, arrays, typed arrays) is finite; `null` and
 * non-numbers pass.
 *
 * @param result - the document about to be printed
 * @param what - what the document is, for the message ("K-matrix cross sections")
 * @throws CliError (exit code {@link NON_FINITE_RESULT_EXIT_CODE}) naming the first non-finite quantity by
 *   its path in the JSON document, e.g. `rateCm3PerS[2]`
 */
export function assertFiniteResult(result: unknown, what: string): void {
  const found = firstNonFinite(result, "");
  if (!found) return;
  throw new CliError(
    `${what}: ${found.path || "the result"} came out as ${found.value}, not a finite number, so nothing is ` +
      "printed. The inputs lie outside the range Sigmaflow can compute in double precision: check their " +
      "units and magnitudes (an extreme value is usually a units or formatting error).",
    NON_FINITE_RESULT_EXIT_CODE,
  );
}
