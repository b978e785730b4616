/**
 * Deriving results from a large K-matrix table: in a child process (as the postprocess step does) vs
 * directly on the event loop (as it did before), and what the worker's event loop notices meanwhile.
 *
 * Run: node --import tsx bench/results/derive.bench.ts [energies=2000] [irreps=8] [channels=16]
 *
 * The default table (2 000 energies × 8 irreps × 16 channels, ≈ 47 MB) is close to the reader's 50 MB
 * limit; 30 channels at 2 000 energies would be ≈ 145 MB, which the reader refuses before deriving.
 * Prints for each way: wall-clock time (the child's includes start-up and handing the bytes over), the
 * derivation's own time, peak memory (child: its peak RSS; direct: the bench process's peak RSS and heap),
 * and the event loop's delay meanwhile: the latest a 10 ms setInterval tick came, and the p99/max of
 * perf_hooks' event-loop-delay histogram.
 */
import { monitorEventLoopDelay } from "node:perf_hooks";
import { runAnalysisSchema } from "../../shared/schemas/results";
import { syntheticKMatrixText } from "../../tests/unit/results/support/synthetic-kmatrix";
import { deriveIsolated } from "../../worker/results/derive-isolated";
import { deriveRunResults, type ResultFile } from "../../worker/results/derive-run-results";

const argument = (i: number, fallback: number) => Number(process.argv[2 + i] ?? fallback);
const [energies, irreps, channels] = [argument(0, 2000), argument(1, 8), argument(2, 16)];
const analysis = runAnalysisSchema.parse({});
const mb = (bytes: number) => (bytes / (1024 * 1024)).toFixed(0);

/** Runs `work` while a 10 ms interval and the event-loop-delay histogram watch the loop. */
async function watched<T>(work: () => Promise<T> | T) {
  const histogram = monitorEventLoopDelay({ resolution: 10 });
  let lastTick = performance.now();
  let worstLateMs = 0;
  const interval = setInterval(() => {
    const now = performance.now();
    worstLateMs = Math.max(worstLateMs, now - lastTick - 10);
    lastTick = now;
  }, 10);
  histogram.enable();
  // Let the interval start ticking before the work begins.
  await new Promise((resolve) => setTimeout(resolve, 30));
  const workStart = performance.now();
  const value = await work();
  const wallMs = performance.now() - workStart;
  // One more tick, so a loop blocked until now is counted.
  await new Promise((resolve) => setTimeout(resolve, 30));
  clearInterval(interval);
  histogram.disable();
  return {
    value,
    wallMs,
    worstLateMs,
    p99Ms: histogram.percentile(99) / 1e6,
    maxMs: histogram.max / 1e6,
  };
}

const generated = performance.now();
const text = syntheticKMatrixText({ energies, irreps, channels });
const files: ResultFile[] = [
  { stage: "scatter", fileName: "kmatrices.txt", reader: "kmatrix-table", content: Buffer.from(text) },
];
console.log(
  `K-matrix table: ${energies} energies × ${irreps} irreps × ${channels} channels, ${mb(files[0]!.content.byteLength)} MB ` +
    `(made in ${(performance.now() - generated).toFixed(0)} ms)`,
);

const isolated = await watched(() =>
  deriveIsolated(files, analysis, { charge: null }, { timeoutMs: 600_000, maxHeapMb: 512 }),
);
console.log(
  `child process: ${isolated.wallMs.toFixed(0)} ms wall (deriving ${isolated.value.usage.derivationMs.toFixed(0)} ms), ` +
    `child peak RSS ${isolated.value.usage.peakRssMb.toFixed(0)} MB, ${isolated.value.derivation.results.length} rows; ` +
    `event loop meanwhile: latest tick ${isolated.worstLateMs.toFixed(1)} ms late, ` +
    `delay p99 ${isolated.p99Ms.toFixed(1)} ms, max ${isolated.maxMs.toFixed(1)} ms`,
);

const rssBefore = process.resourceUsage().maxRSS * 1024;
const heapBefore = process.memoryUsage().heapUsed;
const direct = await watched(() => deriveRunResults(files, analysis, { charge: null }));
console.log(
  `direct (event loop): ${direct.wallMs.toFixed(0)} ms, bench peak RSS ${mb(process.resourceUsage().maxRSS * 1024)} MB ` +
    `(was ${mb(rssBefore)} MB; heap ${mb(heapBefore)} → ${mb(process.memoryUsage().heapUsed)} MB after), ` +
    `${direct.value.results.length} rows; event loop meanwhile: latest tick ${direct.worstLateMs.toFixed(1)} ms late, ` +
    `delay p99 ${direct.p99Ms.toFixed(1)} ms, max ${direct.maxMs.toFixed(1)} ms`,
);
const same = JSON.stringify(direct.value) === JSON.stringify(isolated.value.derivation);
console.log(`same rows both ways: ${same ? "yes" : "NO"}`);
process.exitCode = same ? 0 : 1;
