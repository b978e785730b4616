/**
 * Turns log lines into per-symmetry timings and progress, using a code's declared output rules and the
 * stage markers Sigmaflow's batch script prints (`[sigmaflow] stage 2/3 inner: start …`).
 */
import type { RunPlan } from "./run-plan";

export type ParsedTiming = { stage: string; symmetry: string; elapsedMs: number };
export type ParsedProgress = { stage: string; done?: number; total?: number; percent?: number };
export type LogParseResult = {
  timings: ParsedTiming[];
  progress: ParsedProgress | null;
  stage: string | null;
};

const STAGE_MARKER = /^\[sigmaflow\] stage (\d+)\/(\d+) ([a-z][a-z0-9-]*): (start|exit)/;

type CompiledStage = { name: string; progress: RegExp[]; timings: RegExp[] };

export function compileOutputRules(plan: RunPlan): Map<string, CompiledStage> {
  return new Map(
    plan.stages.map((stage) => [
      stage.name,
      {
        name: stage.name,
        progress: stage.outputRules.progress.map((source) => new RegExp(source)),
        timings: stage.outputRules.timings.map((source) => new RegExp(source)),
      },
    ]),
  );
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
  let progress: ParsedProgress | null = null;
  const timings: ParsedTiming[] = [];
  for (const line of text.split("\n")) {
    const marker = STAGE_MARKER.exec(line);
    if (marker) {
      stage = marker[3]!;
      continue;
    }
    const compiled = stage ? rules.get(stage) : undefined;
    if (!compiled) continue;
    for (const pattern of compiled.timings) {
      const groups = pattern.exec(line)?.groups;
      const seconds = groups ? Number(groups.seconds) : Number.NaN;
      if (groups?.symmetry && Number.isFinite(seconds)) {
        timings.push({
          stage: compiled.name,
          symmetry: groups.symmetry.slice(0, 32),
          elapsedMs: Math.round(seconds * 1000),
        });
      }
    }
    for (const pattern of compiled.progress) {
      const groups = pattern.exec(line)?.groups;
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
        progress = { stage: compiled.name, percent: Math.min(100, Math.max(0, percent)) };
        if (Number.isFinite(done)) progress.done = done;
        if (Number.isFinite(total)) progress.total = total;
      }
    }
  }
  return { timings, progress, stage };
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
