/**
 * Messages between the postprocess step and its derivation child process (`derive-child.ts`), plain data
 * over IPC with structured-clone serialization. The child says `ready`; the worker sends a
 * {@link DeriveRequest} (the files' names and sizes, the analysis, the charge), then each file's bytes in
 * {@link DeriveChunk}s of at most {@link CHUNK_BYTES} (one large message would stall the worker's event
 * loop while it is serialized), then `{ kind: "end" }`; the child answers with one reply. Replies are
 * checked with zod on arrival, like any other boundary.
 */
import { z } from "zod";
import type { ResultReader } from "../../shared/schemas/codes";
import type { RunAnalysis } from "../../shared/schemas/results";
import type { DerivedResult } from "./derive-common";

/** Largest piece of a file in one message. */
export const CHUNK_BYTES = 1024 * 1024;

export interface DeriveRequest {
  kind: "request";
  files: { stage: string; fileName: string; reader: ResultReader; byteLength: number }[];
  analysis: RunAnalysis;
  context: { charge: number | null };
}

/** Bytes of file `file` (index in the request) from `offset`. */
export interface DeriveChunk {
  kind: "chunk";
  file: number;
  offset: number;
  bytes: Uint8Array;
}

export type DeriveMessage = DeriveRequest | DeriveChunk | { kind: "end" };

const derivedRowSchema = z.custom<DerivedResult>(
  (value) =>
    typeof value === "object" &&
    value !== null &&
    typeof (value as { kind?: unknown }).kind === "string" &&
    typeof (value as { columns?: unknown }).columns === "object",
  "a derived result row",
);

export const deriveReplySchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("ready") }),
  z.object({
    kind: z.literal("derived"),
    derivation: z.object({ results: z.array(derivedRowSchema), notes: z.array(z.string()) }),
    /** What the derivation cost in the child: for logs and benchmarks. */
    usage: z.object({ derivationMs: z.number(), peakRssMb: z.number() }),
  }),
  /** The readers or the science core refused the files: `message` is the reason for the run's results. */
  z.object({ kind: z.literal("refused"), name: z.string(), message: z.string() }),
]);

export type DeriveReply = z.infer<typeof deriveReplySchema>;
