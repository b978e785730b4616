/**
 * Flow control between the live feed and the log terminal (src/features/live/log-flow.ts) and the
 * remaining-time estimate (src/features/live/remaining-time.ts). Expected numbers are arithmetic on the
 * inputs stated beside them.
 */
import { describe, expect, it } from "vitest";
import { LogFlow } from "@/features/live/log-flow";
import { estimateRemaining, formatDurationSeconds } from "@/features/live/remaining-time";

/** A terminal whose write callbacks run only when the test says so. */
function slowTerminal() {
  const held: (() => void)[] = [];
  const written: number[] = [];
  return {
    held,
    written,
    write(data: Uint8Array, done: () => void) {
      written.push(data.byteLength);
      held.push(done);
    },
    processOne() {
      held.shift()?.();
    },
  };
}

describe("flow control of the log", () => {
  const watermarks = { highBytes: 1000, lowBytes: 200 };

  it("holds chunks back above the high watermark and writes them again below the low one, in order", () => {
    const terminal = slowTerminal();
    const acks: number[] = [];
    let resumes = 0;
    const flow = new LogFlow(terminal, () => resumes++, watermarks);
    for (let seq = 1; seq <= 5; seq += 1) flow.accept(new Uint8Array(400 * seq), () => acks.push(seq));
    // 400 + 800 = 1200 ≥ 1000: the third and later wait.
    expect(terminal.written).toEqual([400, 800]);
    expect(flow.pending()).toBe(1200);
    expect(flow.waitingChunks()).toBe(3);
    terminal.processOne();
    // 800 pending is not below 200: still waiting.
    expect(acks).toEqual([1]);
    expect(terminal.written).toEqual([400, 800]);
    terminal.processOne();
    // 0 pending: the third (1200 bytes) goes, which is past the high watermark again.
    expect(terminal.written).toEqual([400, 800, 1200]);
    expect(flow.waitingChunks()).toBe(2);
    terminal.processOne();
    expect(terminal.written).toEqual([400, 800, 1200, 1600]);
    terminal.processOne();
    terminal.processOne();
    expect(terminal.written).toEqual([400, 800, 1200, 1600, 2000]);
    expect(acks).toEqual([1, 2, 3, 4, 5]);
    expect(resumes).toBe(0);
  });

  it("resumes a paused feed once, after the waiting chunks are written and the terminal is below the high watermark", () => {
    const terminal = slowTerminal();
    let resumes = 0;
    const flow = new LogFlow(terminal, () => resumes++, watermarks);
    flow.accept(new Uint8Array(600), () => {});
    flow.accept(new Uint8Array(600), () => {});
    flow.accept(new Uint8Array(100), () => {});
    flow.paused();
    expect(resumes).toBe(0);
    terminal.processOne();
    expect(resumes).toBe(0);
    terminal.processOne();
    // Pending 0 → the 100-byte chunk is written (100 < 1000, not stalled) and nothing waits: resume.
    expect(terminal.written).toEqual([600, 600, 100]);
    expect(resumes).toBe(1);
    terminal.processOne();
    expect(resumes).toBe(1);
  });

  it("resumes at once when paused with nothing pending", () => {
    const terminal = slowTerminal();
    let resumes = 0;
    const flow = new LogFlow(terminal, () => resumes++, watermarks);
    flow.paused();
    expect(resumes).toBe(1);
  });

  it("ignores the terminal after being disposed", () => {
    const terminal = slowTerminal();
    const acks: number[] = [];
    const flow = new LogFlow(terminal, () => {}, watermarks);
    flow.accept(new Uint8Array(10), () => acks.push(1));
    flow.dispose();
    terminal.processOne();
    flow.accept(new Uint8Array(10), () => acks.push(2));
    expect(acks).toEqual([]);
    expect(terminal.written).toEqual([10]);
  });
});

describe("remaining time of a stage", () => {
  const progress = (done: number | undefined, total: number | undefined) => ({
    stage: "scatter",
    stageIndex: 2,
    stageCount: 2,
    done,
    total,
  });

  it("waits for the first symmetry of the stage (other stages' timings do not count)", () => {
    expect(
      estimateRemaining(progress(0, 4), [{ stage: "orbitals", symmetry: "A1", durationSeconds: 5 }]),
    ).toEqual({
      kind: "after-first",
    });
  });

  it("multiplies the mean time of the done symmetries by those left", () => {
    // (12 + 18) / 2 = 15 s; 8 − 2 = 6 left; 6 × 15 = 90 s.
    const timings = [
      { stage: "scatter", symmetry: "A1", durationSeconds: 12 },
      { stage: "scatter", symmetry: "B1", durationSeconds: 18 },
    ];
    expect(estimateRemaining(progress(2, 8), timings)).toEqual({
      kind: "estimate",
      seconds: 90,
      symmetriesLeft: 6,
      meanSeconds: 15,
    });
    expect(estimateRemaining(progress(2, undefined), timings)).toEqual({ kind: "total-unknown" });
    expect(estimateRemaining(progress(2, 2), timings)).toEqual({ kind: "stage-done" });
    expect(estimateRemaining(null, timings)).toEqual({ kind: "none" });
  });

  it("writes durations in seconds, minutes and hours", () => {
    expect(formatDurationSeconds(42.4)).toBe("42 s");
    expect(formatDurationSeconds(200)).toBe("3 min 20 s");
    expect(formatDurationSeconds(3900)).toBe("1 h 05 min");
  });
});
