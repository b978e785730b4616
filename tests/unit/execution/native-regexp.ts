/**
 * Which patterns JavaScript's own (backtracking) RegExp engine executed while a function ran. Every
 * RegExp operation (test, exec, replace, split, match) goes through `RegExp.prototype.exec` once that
 * method is replaced, so watching it sees them all. Used to check that members' patterns never reach it.
 */
import { vi } from "vitest";

export function regExpSourcesRunDuring(run: () => unknown): string[] {
  const spy = vi.spyOn(RegExp.prototype, "exec");
  try {
    run();
  } catch {
    // What `run` threw is for the caller's other assertions; only the patterns matter here.
  }
  const sources = spy.mock.contexts.map((regExp) => (regExp as RegExp).source);
  spy.mockRestore();
  return sources;
}
