import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { resultsStateSchema } from "./results";
import { runResourcesSchema, runSpecRequestSchema } from "./runs";

/** `POST /api/groups/:groupId/runs/preview`: the spec a submission would send; nothing is stored. */
export const runPreviewRequestSchema = z.strictObject({ spec: runSpecRequestSchema });
export type RunPreviewRequest = z.input<typeof runPreviewRequestSchema>;

/** Most characters of one file's text a preview returns; the rest is cut and `truncated` says so. */
export const RUN_PREVIEW_FILE_CHARS = 20_000;

export const runPreviewFileSchema = z.object({
  /** Path inside the run's folder, e.g. `stage-1-orbitals/input.dat`. */
  relativePath: z.string(),
  sizeBytes: z.number().int().min(0),
  sha256: z.string(),
  /** The file as UTF-8 text (bytes that are not UTF-8 show as U+FFFD), at most RUN_PREVIEW_FILE_CHARS. */
  text: z.string(),
  truncated: z.boolean(),
});
export type RunPreviewFile = z.infer<typeof runPreviewFileSchema>;

export const runPreviewStageSchema = z.object({
  index: z.number().int().min(1),
  name: z.string(),
  codeName: z.string(),
  codeVersion: z.string(),
  /** The stage's parameters as the run would store them: the schema's defaults filled in. */
  parameters: z.record(z.string(), z.unknown()),
  files: z.array(runPreviewFileSchema),
  /** The run spec's extra files for this stage, by size and sha256 (their bytes are not echoed). */
  extraFiles: z
    .array(z.object({ fileName: z.string(), sizeBytes: z.number().int().min(0), sha256: z.string() }))
    .optional(),
});

/** Why submitting would be refused by the allocation check (before anything else stops it). */
export const runPreviewRefusalSchema = z.object({
  code: z.enum(["no_allocation", "allocation_exceeded"]),
  message: z.string(),
});

export const runPreviewSchema = z.object({
  /** Resources after the codes' defaults fill what the spec left out. */
  resources: runResourcesSchema,
  /** What submitting reserves: cores × wall-time limit, in core-hours. */
  costCoreHours: z.number().min(0),
  /** The group's allocation for the current period, null when it has none. */
  allocation: z
    .object({
      id: uuidSchema,
      name: z.string(),
      availableCoreHoursBefore: z.number(),
      availableCoreHoursAfter: z.number(),
    })
    .nullable(),
  refusal: runPreviewRefusalSchema.nullable(),
  fingerprint: z.string(),
  stages: z.array(runPreviewStageSchema),
  /** The batch script that runs the stages one after another. */
  script: runPreviewFileSchema,
  /** The latest finished run with the same fingerprint, whose results a submission may reuse. */
  reusable: z
    .object({
      id: uuidSchema,
      name: z.string(),
      finishedAt: isoDateTimeSchema.nullable(),
      resultsState: resultsStateSchema.nullable(),
    })
    .nullable(),
});
export type RunPreview = z.infer<typeof runPreviewSchema>;
