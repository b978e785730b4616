/**
 * The child process that reads and derives a run's results (started by `derive-isolated.ts` through
 * `derive-child-bootstrap.mjs`). It announces itself once its modules are loaded, takes one request (the
 * result files' names and sizes, then their bytes in pieces, the analysis, the target's charge), answers
 * with the derivation as plain data or the reason it was refused, and exits. It also exits when the
 * worker that started it goes away.
 */
import type { DeriveMessage, DeriveReply, DeriveRequest } from "./derive-child-protocol";
import { deriveRunResults, type ResultFile } from "./derive-run-results";

if (!process.send) throw new Error("derive-child.ts runs only as a child process with an IPC channel");

const send = (reply: DeriveReply) =>
  new Promise<void>((resolve) => {
    process.send?.(reply, undefined, undefined, () => resolve());
  });

let request: DeriveRequest | null = null;
let contents: Buffer[] = [];

process.on("message", async (message: DeriveMessage) => {
  if (message.kind === "request") {
    request = message;
    contents = message.files.map((file) => Buffer.alloc(file.byteLength));
  } else if (message.kind === "chunk") {
    const target = contents[message.file];
    if (!target || message.offset + message.bytes.byteLength > target.byteLength) {
      throw new Error("a piece of a result file does not fit the announced size");
    }
    target.set(message.bytes, message.offset);
  } else if (message.kind === "end" && request) {
    await send(derive(request));
    process.disconnect();
  }
});
process.once("disconnect", () => process.exit(0));
void send({ kind: "ready" });

function derive(request: DeriveRequest): DeriveReply {
  try {
    const files: ResultFile[] = request.files.map((file, i) => ({
      stage: file.stage,
      fileName: file.fileName,
      reader: file.reader,
      content: contents[i]!,
    }));
    const start = performance.now();
    const derivation = deriveRunResults(files, request.analysis, request.context);
    const derivationMs = performance.now() - start;
    // maxRSS is in kilobytes: the child's peak resident memory since it started.
    const peakRssMb = process.resourceUsage().maxRSS / 1024;
    return { kind: "derived", derivation, usage: { derivationMs, peakRssMb } };
  } catch (error) {
    return {
      kind: "refused",
      name: error instanceof Error ? error.name : "Error",
      message: error instanceof Error ? error.message : String(error),
    };
  }
}
