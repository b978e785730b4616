/**
 * Checks a code's output rules when it is registered: each must compile as an RE2 pattern
 * (user-patterns.ts). The worker compiles the same rules again to read run logs (worker/logs/output-rules.ts).
 */
import type { CodeDefinition } from "../../shared/schemas/codes";
import { compileUserPattern, PatternError } from "./user-patterns";

/** Why each output rule of a code definition cannot be used, with its path; empty when all can. */
export function outputRuleProblems(
  rules: CodeDefinition["outputRules"],
): { path: string; message: string }[] {
  const problems: { path: string; message: string }[] = [];
  for (const kind of ["progress", "timings"] as const) {
    rules[kind].forEach((source, index) => {
      try {
        compileUserPattern(source);
      } catch (error) {
        if (!(error instanceof PatternError)) throw error;
        problems.push({
          path: `outputRules.${kind}.${index}`,
          message: `Not a usable pattern: ${error.reason}`,
        });
      }
    });
  }
  return problems;
}
