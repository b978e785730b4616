/**
 * Turns log lines into per-symmetry timings and progress, using a code's declared output rules and the
 * stage markers Sigmaflow's batch script prints (`[sigmaflow] stage 2/3 inner: start …`).
 *
 * Output rules are patterns written by group members and run on the worker's event loop, so they are
 * compiled as RE2 (server/execution/user-patterns.ts) and matched in time linear in the line. Parsing is
 * also bounded per chunk: lines longer than MAX_RULE_LINE_CHARS are not matched, and once a chunk has
 * spent RULE_TIME_BUDGET_MS on rules the rest of it is only scanned for stage markers. Either case leaves a
 * note in the result; the log text itself is stored whole regardless.
 */
import type { RunPlan } from "../../server/execution/run-plan";
import { compileUserPattern, PatternError, type UserPattern } from "../../server/execution/user-patterns";

export type ParsedTiming = { stage: string; symmetry: string; elapsedMs: number };
export type ParsedProgress = { stage: string; done?: number; total?: number; percent?: number };
export type LogParseResult = {
  timings: ParsedTiming[];
  progress: ParsedProgress | null;
  stage: string | null;
  /** What was left unparsed and why (long lines, the time budget, unusable rules); empty normally. */
  notes: string[];
};

/** Lines longer than this are not matched against output rules (progress lines are short). */
export const MAX_RULE_LINE_CHARS = 1000;
/** Time one chunk may spend matching output rules before the rest of it is skipped. */
export const RULE_TIME_BUDGET_MS = 100;

const STAGE_MARKER = /^\[sigmaflow\] stage (\d+)\/(\d+) ([a-z][a-z0-9-]*): (start|exit)/;

export type CompiledStage = {
  name: string;
  progress: UserPattern[];
  timings: UserPattern[];
  refused: string[];
};

/**
 * Compiles each stage's rules. Rules are checked when a code is registered
 * (server/execution/output-rule-checks.ts); one that still fails here (stored before a rule changed) is
 * left out and named in the notes rather than failing the poll.
 */
export function compileOutputRules(plan: RunPlan): Map<string, CompiledStage> {
  return new Map(
    plan.stages.map((stage) => {
      const refused: string[] = [];
      const compile = (sources: string[]) =>
        sources.flatMap((source) => {
          try {
            return [compileUserPattern(source)];
          } catch (error) {
            if (!(error instanceof PatternError)) throw error;
            refused.push(
              `output rule ${JSON.stringify(source)} of stage ${stage.name} ignored: ${error.reason}`,
            );
            return [];
          }
        });
      const compiled: CompiledStage = {
        name: stage.name,
        progress: compile(stage.outputRules.progress),
        timings: compile(stage.outputRules.timings),
        refused,
      };
      return [stage.name, compiled];
    }),
  );
}

type Parsed = { timings: ParsedTiming[]; progress: ParsedProgress | null };

/** Matches one line against a stage's rules into `parsed`; false if the time budget ran out first. */
function matchLine(line: string, compiled: CompiledStage, deadlineMs: number, parsed: Parsed): boolean {
  for (const pattern of compiled.timings) {
    if (performance.now() > deadlineMs) return false;
    const groups = pattern.matchGroups(line);
    const seconds = groups ? Number(groups.seconds) : Number.NaN;
    if (groups?.symmetry && Number.isFinite(seconds)) {
      parsed.timings.push({
        stage: compiled.name,
        symmetry: groups.symmetry.slice(0, 32),
        elapsedMs: Math.round(seconds * 1000),
      });
    }
  }
  for (const pattern of compiled.progress) {
    if (performance.now() > deadlineMs) return false;
    const groups = pattern.matchGroups(line);
    if (!groups) continue;
    const done = Number(groups.done);
    const total = Number(groups.total);
    const percent =
      groups.percent !== undefined
        ? Number(groups.percent)
        : done && total
          ? (100 * done) / total
          : Number.NaN;
    if (Number.isFinite(percent)) {
      const progress: ParsedProgress = { stage: compiled.name, percent: Math.min(100, Math.max(0, percent)) };
      if (Number.isFinite(done)) progress.done = done;
      if (Number.isFinite(total)) progress.total = total;
      parsed.progress = progress;
    }
  }
  return true;
}

/**
 * Parses complete log lines. `currentStage` is the stage the previous chunk ended in (null before the
 * first marker); the result says where this chunk ends.
 */
export function parseLogLines(
  text: string,
  rules: Map<string, CompiledStage>,
  currentStage: string | null,
): LogParseResult {
  let stage = currentStage;
  const parsed: Parsed = { timings: [], progress: null };
  const notes = new Set<string>();
  const deadlineMs = performance.now() + RULE_TIME_BUDGET_MS;
  let longLines = 0;
  let stoppedAtLine: number | null = null;
  const lines = text.split("\n");
  for (const [index, line] of lines.entries()) {
    const marker = STAGE_MARKER.exec(line);
    if (marker) {
      stage = marker[3]!;
      continue;
    }
    const compiled = stage ? rules.get(stage) : undefined;
    if (!compiled || stoppedAtLine !== null) continue;
    for (const note of compiled.refused) notes.add(note);
    if (compiled.timings.length + compiled.progress.length === 0) continue;
    if (line.length > MAX_RULE_LINE_CHARS) {
      longLines += 1;
      continue;
    }
    if (!matchLine(line, compiled, deadlineMs, parsed)) stoppedAtLine = index + 1;
  }
  if (longLines > 0) {
    notes.add(
      `${longLines} line(s) longer than ${MAX_RULE_LINE_CHARS} characters were not matched against the output rules`,
    );
  }
  if (stoppedAtLine !== null) {
    notes.add(
      `output rules took longer than ${RULE_TIME_BUDGET_MS} ms; lines ${stoppedAtLine} to ${lines.length} of this chunk were not matched`,
    );
  }
  return { ...parsed, stage, notes: [...notes] };
}

/** The stage a log ends in, from its last stage marker. */
export function lastStageIn(text: string): string | null {
  let stage: string | null = null;
  for (const line of text.split("\n")) {
    const marker = STAGE_MARKER.exec(line);
    if (marker) stage = marker[3]!;
  }
  return stage;
}
