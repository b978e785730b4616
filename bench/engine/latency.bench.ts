/**
 * Engine latency at light load: one trivial run at a time, N times (default 100), each timed from just
 * before its submission until its process starts on the development host (the code records the
 * moment with `date +%s.%N`; the host shares this machine's clock). Goal (Sigmaflow's): p95 under one
 * poll interval + 0.5 s. Production settings: poll interval 2 s, queue polling 0.5 s.
 *
 *   node --import tsx bench/engine/latency.bench.ts [runs=100] [--fsync=off]
 */
import { readFileSync } from "node:fs";
import { quantile, startEngineStack, waitUntilFinished } from "./stack";

const args = process.argv.slice(2);
const runCount = Number(args.find((a) => /^\d+$/.test(a)) ?? 100);
const durable = !args.includes("--fsync=off");
const POLL_INTERVAL_MS = 2000;

const stack = await startEngineStack({
  durable,
  workerEnv: { WORKER_POLL_INTERVAL_MS: String(POLL_INTERVAL_MS) },
  code: {
    name: "start-stamp",
    version: "1.0",
    executable: "/bin/sh",
    arguments: ["-c", "date +%s.%N > started.at"],
    outputFiles: ["started.at"],
  },
});
try {
  const warm = await stack.submit("warm-up");
  await waitUntilFinished(stack, [warm], 60_000);
  const latenciesMs: number[] = [];
  for (let i = 0; i < runCount; i += 1) {
    const submittedAt = Date.now();
    const id = await stack.submit(`latency-${i}`);
    const states = await waitUntilFinished(stack, [id], 60_000);
    if (states.done !== 1) throw new Error(`run ${id} did not finish: ${JSON.stringify(states)}`);
    const startedAt = Number.parseFloat(readFileSync(stack.hostPath(id, "stage-1-main/started.at"), "utf8"));
    latenciesMs.push(startedAt * 1000 - submittedAt);
  }
  const sorted = [...latenciesMs].sort((a, b) => a - b);
  const p95 = quantile(sorted, 0.95);
  const goal = POLL_INTERVAL_MS + 500;
  console.log(
    `latency, submit → process started on the host, ${runCount} runs one at a time (fsync ${durable ? "on" : "off"}): ` +
      `p50 ${quantile(sorted, 0.5).toFixed(0)} ms, p95 ${p95.toFixed(0)} ms, max ${sorted.at(-1)!.toFixed(0)} ms ` +
      `(goal p95 < poll interval ${POLL_INTERVAL_MS} ms + 500 ms = ${goal} ms: ${p95 < goal ? "met" : "missed"})`,
  );
} finally {
  await stack.stop();
}
