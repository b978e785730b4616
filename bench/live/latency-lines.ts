/**
 * What one observer of a job's log saw, line by line: the bytes arrive in pieces that need not end at a
 * line's end (the live feed sends the stored chunks as the host's reads cut them), so lines are put back
 * together first; each `line <n> <epoch-ns>` then gives its write time and its arrival time.
 */
import { quantile } from "../engine/stack";

export type LineSample = {
  n: number;
  writtenAtMs: number;
  arrivedAtMs: number;
  /** When Sigmaflow stored the chunk that ended the line (the live feed's `at`); NaN for other observers. */
  storedAtMs: number;
};

/** Wall-clock now with sub-millisecond resolution (Date.now() is whole milliseconds). */
export function wallClockMs(): number {
  return performance.timeOrigin + performance.now();
}

const MEASURED_LINE = /^line (\d+) (\d+)$/;

export class LineClock {
  readonly samples: LineSample[] = [];
  /** Arrival of the first bytes of any line (warm or measured). */
  firstArrivalMs = Number.NaN;
  lastLine = 0;
  private partial = "";

  receive(data: Buffer | Uint8Array, storedAtMs: number): void {
    const arrivedAtMs = wallClockMs();
    if (Number.isNaN(this.firstArrivalMs)) this.firstArrivalMs = arrivedAtMs;
    // The job writes ASCII only, so a chunk boundary never splits a character.
    const lines = (this.partial + Buffer.from(data).toString("latin1")).split("\n");
    this.partial = lines.pop()!;
    for (const text of lines) {
      const match = MEASURED_LINE.exec(text);
      if (!match) continue;
      const n = Number(match[1]);
      // Nanoseconds since the epoch exceed 2^53: split before converting.
      const ns = match[2]!;
      const writtenAtMs = Number(ns.slice(0, -6)) + Number(ns.slice(-6)) / 1e6;
      this.samples.push({ n, writtenAtMs, arrivedAtMs, storedAtMs });
      this.lastLine = Math.max(this.lastLine, n);
    }
  }
}

export type LatencySummary = { count: number; p50: number; p95: number; max: number };

const SPANS = {
  "written → arrived": (s: LineSample) => s.arrivedAtMs - s.writtenAtMs,
  "written → stored": (s: LineSample) => s.storedAtMs - s.writtenAtMs,
  "stored → arrived": (s: LineSample) => s.arrivedAtMs - s.storedAtMs,
};

/** p50/p95/max in ms of one span of the lines' way. */
export function summarize(
  samples: LineSample[],
  span: keyof typeof SPANS = "written → arrived",
): LatencySummary {
  const sorted = samples.map(SPANS[span]).sort((a, b) => a - b);
  return {
    count: sorted.length,
    p50: quantile(sorted, 0.5),
    p95: quantile(sorted, 0.95),
    max: sorted.at(-1) ?? Number.NaN,
  };
}
