/**
 * The child process that reads and derives a run's results (started by `derive-isolated.ts` through
 * `derive-child-bootstrap.mjs`). It announces itself once its modules are loaded, takes one request (the
 * result files' bytes, the analysis, the target's charge), answers with the derivation as plain data or
 * the reason it was refused, and exits. It also exits when the worker that started it goes away.
 */

import type { DeriveReply, DeriveRequest } from "./derive-child-protocol";
import { deriveRunResults, type ResultFile } from "./derive-run-results";

if (!process.send) throw new Error("derive-child.ts runs only as a child process with an IPC channel");

const send = (reply: DeriveReply) =>
  new Promise<void>((resolve) => {
    process.send?.(reply, undefined, undefined, () => resolve());
  });

process.once("message", async (request: DeriveRequest) => {
  let reply: DeriveReply;
  try {
    const files: ResultFile[] = request.files.map((file) => ({
      stage: file.stage,
      fileName: file.fileName,
      reader: file.reader,
      content: Buffer.from(file.content.buffer, file.content.byteOffset, file.content.byteLength),
    }));
    const start = performance.now();
    const derivation = deriveRunResults(files, request.analysis, request.context);
    const derivationMs = performance.now() - start;
    // maxRSS is in kilobytes: the child's peak resident memory since it started.
    const peakRssMb = process.resourceUsage().maxRSS / 1024;
    reply = { kind: "derived", derivation, usage: { derivationMs, peakRssMb } };
  } catch (error) {
    reply = {
      kind: "refused",
      name: error instanceof Error ? error.name : "Error",
      message: error instanceof Error ? error.message : String(error),
    };
  }
  await send(reply);
  process.disconnect();
});
process.once("disconnect", () => process.exit(0));
void send({ kind: "ready" });
