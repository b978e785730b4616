import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { resultsStateSchema, runAnalysisSchema } from "./results";
import { extraFilesSchema } from "./run-extra-files";

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
/** Every other state: the run still has work ahead of it (a held run too). */
export const UNFINISHED_RUN_STATES: readonly RunState[] = runStateSchema.options.filter(
  (state) => !FINAL_RUN_STATES.includes(state),
);

export const runResourcesSchema = z.strictObject({
  cores: z.number().int().min(1).max(4096),
  wallTimeMinutes: z.number().int().min(1).max(43_200),
});
export type RunResources = z.infer<typeof runResourcesSchema>;

/**
 * Resources as a request gives them: what is left out comes from the defaults of the recipe's codes —
 * the most cores any stage's code asks for, and the sum of their wall times (the stages run one after
 * another in one job), at most the 43,200-minute limit.
 */
export const runResourcesRequestSchema = runResourcesSchema.partial();

/** A run's specification as stored and returned: which recipe, where, with which parameters per stage. */
export const runSpecSchema = z.strictObject({
  name: z.string().trim().min(1).max(120),
  recipeId: uuidSchema,
  hostId: uuidSchema,
  /**
   * The target (or isotopologue) the run is about; its latest version is used and stored with the run.
   * Left out for recipes whose templates do not read `target`.
   */
  targetId: uuidSchema.optional(),
  /** Options of the postprocess step that turns collected files into results. */
  analysis: runAnalysisSchema.optional(),
  /** Parameters per stage name, validated against each stage code's declared JSON schema. */
  parameters: z.record(z.string(), z.record(z.string(), z.unknown())).default({}),
  /** Files staged byte for byte into a stage's folder beside its rendered input files. */
  extraFiles: extraFilesSchema.optional(),
  resources: runResourcesSchema,
  notifyByEmail: z.boolean().default(false),
});
export type RunSpec = z.infer<typeof runSpecSchema>;

/** What the composer sends: a run spec whose resources may be left out (see runResourcesRequestSchema). */
export const runSpecRequestSchema = runSpecSchema.extend({
  resources: runResourcesRequestSchema.optional(),
});
export type RunSpecRequest = z.infer<typeof runSpecRequestSchema>;

/** When a finished run with the same fingerprint exists: `ask` (409 naming it), `reuse` it, or `run` anyway. */
export const onDuplicateSchema = z.enum(["ask", "reuse", "run"]);
export type OnDuplicate = z.infer<typeof onDuplicateSchema>;

export const createRunRequestSchema = z.strictObject({
  spec: runSpecRequestSchema,
  onDuplicate: onDuplicateSchema.default("ask"),
});
export type CreateRunRequest = z.input<typeof createRunRequestSchema>;

/**
 * Changes a resubmission makes to the original spec; everything left out keeps the original's value.
 * Parameters merge per stage and per parameter (RFC 7396 merge patch: a parameter set to null is removed,
 * so the code's default applies); resources merge per field. Nothing here has a default: a default would
 * silently replace the original's value.
 */
export const runSpecChangesSchema = z.strictObject({
  name: z.string().trim().min(1).max(120).optional(),
  recipeId: uuidSchema.optional(),
  hostId: uuidSchema.optional(),
  /** Another target (its latest version); left out: the original's target at its latest version. */
  targetId: uuidSchema.optional(),
  /**
   * Postprocess options; merged per field like resources. Without the defaults of runAnalysisSchema
   * (`.partial()` keeps them), which would silently replace the original's values.
   */
  analysis: z
    .strictObject({
      firstIonizationEnergyEv: runAnalysisSchema.shape.firstIonizationEnergyEv,
      ionizationEnergyMaxEv: runAnalysisSchema.shape.ionizationEnergyMaxEv.removeDefault().optional(),
      temperatureMinK: runAnalysisSchema.shape.temperatureMinK.removeDefault().optional(),
      temperatureMaxK: runAnalysisSchema.shape.temperatureMaxK.removeDefault().optional(),
    })
    .optional(),
  parameters: z.record(z.string(), z.record(z.string(), z.unknown())).optional(),
  /** The whole list of extra files replacing the original's; left out keeps them, `[]` drops them. */
  extraFiles: extraFilesSchema.optional(),
  resources: runResourcesRequestSchema.optional(),
  notifyByEmail: z.boolean().optional(),
});
export type RunSpecChanges = z.infer<typeof runSpecChangesSchema>;

export const resubmitRunRequestSchema = z.strictObject({
  changes: runSpecChangesSchema.default({}),
  onDuplicate: onDuplicateSchema.default("run"),
});
export type ResubmitRunRequest = z.infer<typeof resubmitRunRequestSchema>;

export const runEventSchema = z.object({
  at: isoDateTimeSchema,
  fromState: runStateSchema.nullable(),
  toState: runStateSchema,
  /** `user`, `worker` or `system`. */
  actor: z.string(),
  /** The person who caused the change (who submitted, who cancelled), null for the engine's own steps. */
  actorName: z.string().nullable(),
  message: z.string().nullable(),
});

export const runArtifactSchema = z.object({
  id: uuidSchema,
  stage: z.string(),
  name: z.string(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
});

/** Wall time one symmetry of one stage took, as the code's output rules read it from the log. */
export const runTimingSchema = z.object({
  stage: z.string(),
  symmetry: z.string(),
  durationSeconds: z.number(),
});

/**
 * How far a run's log has got, as the poller stores it: the stage of the last stage marker, and the
 * latest progress line of that stage's code (absent until the stage prints one).
 */
export const runStageProgressSchema = z.object({
  stage: z.string(),
  done: z.number().optional(),
  total: z.number().optional(),
  percent: z.number().min(0).max(100).optional(),
});
export type RunStageProgress = z.infer<typeof runStageProgressSchema>;

/** The same with the stage's place in the recipe (1-based), as the API reports it. */
export const runProgressSchema = runStageProgressSchema.extend({
  stageIndex: z.number().int().min(1),
  stageCount: z.number().int().min(1),
});
export type RunProgress = z.infer<typeof runProgressSchema>;

export const runSummarySchema = z.object({
  id: uuidSchema,
  groupId: uuidSchema,
  name: z.string(),
  recipeId: uuidSchema,
  hostId: uuidSchema,
  targetId: uuidSchema.nullable(),
  /** The target version the run used, and the target's name. */
  targetVersion: z.number().int().nullable(),
  targetName: z.string().nullable(),
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
  /** The run whose results (collected files, timings, log) this one reuses instead of running. */
  reusedFrom: uuidSchema.nullable(),
  /** Who submitted the run; null once their account is deleted. */
  submittedById: uuidSchema.nullable(),
  /** Display name of who submitted the run. */
  submittedByName: z.string().nullable(),
  cancelRequested: z.boolean(),
  /** Display name of the person who asked to cancel the run. */
  cancelRequestedByName: z.string().nullable(),
  /** Null until the log reaches the first stage. */
  progress: runProgressSchema.nullable(),
  /** Whether results were derived from the collected files (null until the run is done). */
  resultsState: resultsStateSchema.nullable(),
  resultsMessage: z.string().nullable(),
  createdAt: isoDateTimeSchema,
  startedAt: isoDateTimeSchema.nullable(),
  finishedAt: isoDateTimeSchema.nullable(),
});
export type RunSummary = z.infer<typeof runSummarySchema>;
/**
 * A page of a group's runs. `total` counts every run the filters match (all pages); `page` and
 * `pageSize` are the ones the server applied.
 */
export const runListSchema = z.object({
  runs: z.array(runSummarySchema),
  total: z.number().int().min(0),
  page: z.number().int().min(1),
  pageSize: z.number().int().min(1),
});
export type RunList = z.infer<typeof runListSchema>;

/** Columns `GET /api/groups/:groupId/runs` sorts by; ties are broken by the run's id. */
export const runListSortSchema = z.enum(
  ["createdAt", "updatedAt", "state", "name", "target", "recipe", "host", "submittedBy"],
  { error: "sort must be one of createdAt, updatedAt, state, name, target, recipe, host, submittedBy" },
);
export type RunListSort = z.infer<typeof runListSortSchema>;
export const RUN_LIST_PAGE_SIZE_DEFAULT = 50;
export const RUN_LIST_PAGE_SIZE_MAX = 200;
/** The deepest page one may ask for: bounds the rows a request makes PostgreSQL skip. */
export const RUN_LIST_PAGE_MAX = 10_000;

/** One value or several, repeated (`?state=a&state=b`) or comma-separated (`?state=a,b`). */
const listOf = <T extends z.ZodType>(item: T, name: string) =>
  z.preprocess(
    (value) => {
      const values = Array.isArray(value) ? value : [value];
      return values.flatMap((entry) => (typeof entry === "string" ? entry.split(",") : [entry]));
    },
    z.array(item).max(20, { error: `${name} takes at most 20 values` }),
  );

const idFilter = (name: string) => z.uuid({ error: `${name} must be a UUID` }).optional();
/** A calendar date (`2026-12-01`, the whole day in UTC) or an instant with its offset. */
const dateBound = (name: string) =>
  z.union([z.iso.date(), z.iso.datetime({ offset: true })], {
    error: `${name} must be a date (YYYY-MM-DD) or a date-time with offset`,
  });
const wholeNumber = (name: string, min: number, max: number) =>
  z.coerce
    .number({ error: `${name} must be a whole number` })
    .int({ error: `${name} must be a whole number` })
    .min(min, { error: `${name} must be at least ${min}` })
    .max(max, { error: `${name} must be at most ${max}` });

/**
 * The query of `GET /api/groups/:groupId/runs`: filters (several states; one target, recipe, host,
 * submitter; created between two dates, both days included), one sort column and direction, and a page.
 * `limit` is the older name of `pageSize` (the command line's `--limit`, up to 500, first page only).
 */
export const runListQuerySchema = z
  .strictObject(
    {
      state: listOf(
        z.enum(runStateSchema.options, {
          error: `state must be among ${runStateSchema.options.join(", ")}`,
        }),
        "state",
      ).optional(),
      targetId: idFilter("targetId"),
      recipeId: idFilter("recipeId"),
      hostId: idFilter("hostId"),
      submittedById: idFilter("submittedById"),
      createdFrom: dateBound("createdFrom").optional(),
      createdTo: dateBound("createdTo").optional(),
      sort: runListSortSchema.default("createdAt"),
      order: z.enum(["asc", "desc"], { error: "order must be asc or desc" }).default("desc"),
      page: wholeNumber("page", 1, RUN_LIST_PAGE_MAX).default(1),
      pageSize: wholeNumber("pageSize", 1, RUN_LIST_PAGE_SIZE_MAX).optional(),
      limit: wholeNumber("limit", 1, 500).optional(),
    },
    {
      error: (issue) =>
        issue.code === "unrecognized_keys" ? `unknown query parameter: ${issue.keys.join(", ")}` : undefined,
    },
  )
  .refine((query) => query.pageSize === undefined || query.limit === undefined, {
    error: "give pageSize or limit, not both",
    path: ["limit"],
  })
  .refine(
    (query) =>
      query.createdFrom === undefined ||
      query.createdTo === undefined ||
      query.createdFrom.slice(0, 10) <= query.createdTo.slice(0, 10),
    { error: "createdFrom must not be after createdTo", path: ["createdFrom"] },
  );
export type RunListQuery = z.infer<typeof runListQuerySchema>;
export type RunListQueryInput = z.input<typeof runListQuerySchema>;

export const runDetailSchema = runSummarySchema.extend({
  spec: runSpecSchema,
  events: z.array(runEventSchema),
  artifacts: z.array(runArtifactSchema),
  timings: z.array(runTimingSchema),
});
export type RunDetail = z.infer<typeof runDetailSchema>;

/** Chunks per page of `GET /api/runs/:runId/log` unless `limit` says otherwise, and the most it allows. */
export const RUN_LOG_PAGE_DEFAULT = 500;
export const RUN_LOG_PAGE_MAX = 2000;

export const runLogQuerySchema = z.object({
  afterSeq: z.coerce
    .number({ error: "afterSeq must be a whole number" })
    .int({ error: "afterSeq must be a whole number" })
    .min(0, { error: "afterSeq must be 0 or more" })
    .default(0),
  limit: z.coerce
    .number({ error: "limit must be a whole number" })
    .int({ error: "limit must be a whole number" })
    .min(1, { error: "limit must be at least 1" })
    .max(RUN_LOG_PAGE_MAX, { error: `limit must be at most ${RUN_LOG_PAGE_MAX}` })
    .default(RUN_LOG_PAGE_DEFAULT),
});

/**
 * One stored chunk of a run's log: the job's log bytes from `offsetBytes` on, exactly as the host holds
 * them (any bytes, not necessarily valid UTF-8), in base64. Decode across chunks with one streaming
 * decoder: a chunk may end inside a line.
 */
export const runLogChunkSchema = z.object({
  seq: z.number().int().min(1),
  offsetBytes: z.number().int().min(0),
  dataBase64: z.base64(),
  at: isoDateTimeSchema,
});
export type RunLogChunk = z.infer<typeof runLogChunkSchema>;
/**
 * A page of the log. `lastSeq`: the last chunk's sequence number (`afterSeq` when the page is empty), to
 * ask from next time. `done`: the run is final and this page reaches the last stored chunk — nothing
 * more will come.
 */
export const runLogSchema = z.object({
  chunks: z.array(runLogChunkSchema),
  lastSeq: z.number().int().min(0),
  done: z.boolean(),
});
export type RunLog = z.infer<typeof runLogSchema>;
