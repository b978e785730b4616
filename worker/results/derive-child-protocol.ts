/**
 * Messages between the postprocess step and its derivation child process (`derive-child.ts`). All
 * plain data over IPC with structured-clone serialization: file bytes as Uint8Arrays, the derivation as
 * plain objects.
 * Replies are checked with zod on arrival, like any other boundary.
 */
import { z } from "zod";
import type { ResultReader } from "../../shared/schemas/codes";
import type { RunAnalysis } from "../../shared/schemas/results";
import type { DerivedResult } from "./derive-common";

export interface DeriveRequest {
  files: { stage: string; fileName: string; reader: ResultReader; content: Uint8Array }[];
  analysis: RunAnalysis;
  context: { charge: number | null };
}

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
