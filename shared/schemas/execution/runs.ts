import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "../common";

export const runStateSchema = z.enum([
  "queued",
  "staging",
  "submitted",
  "running",
  "collecting",
  "done",
  "failed",
  "cancelled",
  "held",
]);
export type RunState = z.infer<typeof runStateSchema>;
export const FINAL_RUN_STATES: readonly RunState[] = ["done", "failed", "cancelled"];

export const runResourcesSchema = z.strictObject({
  cores: z.number().int().min(1).max(4096),
  wallTimeMinutes: z.number().int().min(1).max(43_200),
});

/** What the composer sends: which recipe, where, with which parameters per stage. */
export const runSpecSchema = z.strictObject({
  name: z.string().trim().min(1).max(120),
  recipeId: uuidSchema,
  hostId: uuidSchema,
  /** Parameters per stage name, validated against each stage code's declared JSON schema. */
  parameters: z.record(z.string(), z.record(z.string(), z.unknown())).default({}),
  resources: runResourcesSchema,
  notifyByEmail: z.boolean().default(false),
});
export type RunSpec = z.infer<typeof runSpecSchema>;

export const createRunRequestSchema = z.strictObject({
  spec: runSpecSchema,
  /** When a finished run with the same fingerprint exists: `ask` (409 naming it), `reuse` it, or `run` anyway. */
  onDuplicate: z.enum(["ask", "reuse", "run"]).default("ask"),
});
export type CreateRunRequest = z.input<typeof createRunRequestSchema>;

export const resubmitRunRequestSchema = z.strictObject({
  /** Changes to the original spec; omitted fields keep the original's values. */
  changes: runSpecSchema.partial().default({}),
  onDuplicate: z.enum(["ask", "reuse", "run"]).default("run"),
});

export const runEventSchema = z.object({
  at: isoDateTimeSchema,
  fromState: runStateSchema.nullable(),
  toState: runStateSchema,
  actor: z.string(),
  message: z.string().nullable(),
});

export const runArtifactSchema = z.object({
  id: uuidSchema,
  stage: z.string(),
  name: z.string(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
});

export const runTimingSchema = z.object({ stage: z.string(), symmetry: z.string(), seconds: z.number() });

export const runSummarySchema = z.object({
  id: uuidSchema,
  groupId: uuidSchema,
  name: z.string(),
  recipeId: uuidSchema,
  hostId: uuidSchema,
  state: runStateSchema,
  stateMessage: z.string().nullable(),
  fingerprint: z.string(),
  cores: z.number().int(),
  wallTimeMinutes: z.number().int(),
  reservedCoreHours: z.number(),
  chargedCoreHours: z.number().nullable(),
  schedulerJobId: z.string().nullable(),
  exitCode: z.number().int().nullable(),
  resubmittedFrom: uuidSchema.nullable(),
  reusedFrom: uuidSchema.nullable(),
  submittedBy: z.string().nullable(),
  cancelRequested: z.boolean(),
  createdAt: isoDateTimeSchema,
  startedAt: isoDateTimeSchema.nullable(),
  finishedAt: isoDateTimeSchema.nullable(),
});
export type RunSummary = z.infer<typeof runSummarySchema>;
export const runListSchema = z.object({ runs: z.array(runSummarySchema) });

export const runDetailSchema = runSummarySchema.extend({
  spec: runSpecSchema,
  events: z.array(runEventSchema),
  artifacts: z.array(runArtifactSchema),
  timings: z.array(runTimingSchema),
});
export type RunDetail = z.infer<typeof runDetailSchema>;

export const runLogChunkSchema = z.object({ seq: z.number().int(), text: z.string(), at: isoDateTimeSchema });
export const runLogSchema = z.object({ chunks: z.array(runLogChunkSchema), lastSeq: z.number().int() });
