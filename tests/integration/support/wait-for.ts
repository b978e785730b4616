/**
 * The one way the integration tests (and the engine benchmarks) wait: read a value until it is
 * acceptable or the time is up. Nothing sleeps for a fixed time; a wait that gives up says what it
 * waited for and the last value it saw. Free of vitest, so benchmarks use it too.
 */
import { inspect } from "node:util";

export type WaitOptions = {
  /** How long to keep reading before failing; 20 s unless given. */
  timeoutMs?: number;
  /** Pause between two reads; 100 ms unless given. */
  intervalMs?: number;
  /** More to say when the wait fails (e.g. a process's output so far). */
  context?: () => string;
};

/**
 * Reads `read()` until `accept(value)` holds, then returns that value. A read that throws fails the
 * wait at once (with that error), so a broken probe is not mistaken for a condition not met yet.
 *
 * @param description what is awaited, as it reads after "waiting for" (e.g. "run X to reach done")
 */
export async function waitFor<T, S extends T>(
  description: string,
  read: () => T | Promise<T>,
  accept: (value: T) => value is S,
  options?: WaitOptions,
): Promise<S>;
export async function waitFor<T>(
  description: string,
  read: () => T | Promise<T>,
  accept: (value: T) => boolean,
  options?: WaitOptions,
): Promise<T>;
export async function waitFor<T>(
  description: string,
  read: () => T | Promise<T>,
  accept: (value: T) => boolean,
  { timeoutMs = 20_000, intervalMs = 100, context }: WaitOptions = {},
): Promise<T> {
  const started = Date.now();
  let last = await read();
  while (!accept(last)) {
    if (Date.now() - started > timeoutMs) {
      const seen = inspect(last, { depth: 6, breakLength: Number.POSITIVE_INFINITY, maxStringLength: 800 });
      const more = context ? `\n${context()}` : "";
      throw new Error(
        `timed out after ${timeoutMs} ms waiting for ${description}; last seen: ${seen}${more}`,
      );
    }
    await new Promise((resolve) => setTimeout(resolve, intervalMs));
    last = await read();
  }
  return last;
}
