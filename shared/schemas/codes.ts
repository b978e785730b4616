import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { identifierSchema, safeFileNameSchema } from "./names";

/** How parameter values are escaped when a template puts them into a file of this kind. */
export const templateFormatSchema = z.enum(["text", "shell", "json", "namelist"]);
export type TemplateFormat = z.infer<typeof templateFormatSchema>;

export const inputTemplateSchema = z.strictObject({
  fileName: safeFileNameSchema,
  format: templateFormatSchema,
  /** A nunjucks template; parameters are available by name, already escaped for `format`. */
  template: z.string().max(200_000),
});

/**
 * An output rule: a pattern in RE2 syntax (no backreferences or lookaround), matched per log line in
 * linear time. Its syntax is checked by the server when a code is registered
 * (server/execution/user-patterns.ts), not here: the check needs the RE2 parser, which the client has
 * no use for, and JavaScript's RegExp would accept patterns RE2 refuses and refuse some it accepts.
 */
const regexSource = z.string().min(1).max(500);

export const outputRulesSchema = z.strictObject({
  /** Lines giving progress; named groups `done` and `total` (or `percent`). */
  progress: z.array(regexSource).max(10).default([]),
  /** Lines giving the time spent on one symmetry; named groups `symmetry` and `seconds`. */
  timings: z.array(regexSource).max(10).default([]),
});

/**
 * Readers Sigmaflow has for collected files, used by the postprocess step to derive results:
 * `orbital-table` (orbital energies, occupations and kinetic energies by irrep, as the demo psi4 templates
 * write them) and `kmatrix-table` (K-matrices per irrep and energy, the text format of the demo solver).
 */
export const resultReaderSchema = z.enum(["orbital-table", "kmatrix-table"]);
export type ResultReader = z.infer<typeof resultReaderSchema>;

export const resultFileSchema = z.strictObject({ fileName: safeFileNameSchema, reader: resultReaderSchema });

export const codeDefinitionSchema = z.strictObject({
  name: identifierSchema,
  version: z
    .string()
    .min(1)
    .max(64)
    .regex(/^[A-Za-z0-9._+-]+$/, { error: "Use letters, digits, '.', '_', '+', '-' in the version." }),
  description: z.string().max(2000).default(""),
  /** Absolute path or command name of the binary on the host. */
  executable: z
    .string()
    .min(1)
    .max(400)
    .regex(/^[A-Za-z0-9._/+-]+$/, {
      error: "Give the executable as a path without spaces or shell characters.",
    }),
  /** Templates for the command-line arguments (rendered, then each one shell-quoted). */
  arguments: z.array(z.string().max(1000)).max(50).default([]),
  /** An input file fed to the binary on standard input (many scattering codes read their input this way). */
  stdinFile: safeFileNameSchema.optional(),
  /** Environment set-up lines run before the binary (e.g. loading modules). */
  setupLines: z
    .array(
      z
        .string()
        .max(1000)
        .refine((line) => !/[\n\r\0]/.test(line), { error: "One line per entry, without newlines." }),
    )
    .max(50)
    .default([]),
  inputTemplates: z.array(inputTemplateSchema).max(20).default([]),
  /** JSON Schema (draft 2020-12 subset understood by Ajv) of the parameters a run gives this code. */
  parameters: z.record(z.string(), z.unknown()).default({ type: "object", properties: {} }),
  /** Files the code writes that Sigmaflow collects and hands to the next stage. */
  outputFiles: z.array(safeFileNameSchema).max(50).default([]),
  outputRules: outputRulesSchema.default({ progress: [], timings: [] }),
  /** Which of the output files Sigmaflow reads after the run to derive results, and with which reader. */
  resultFiles: z.array(resultFileSchema).max(20).default([]),
  defaults: z
    .strictObject({
      cores: z.number().int().min(1).max(4096).default(1),
      wallTimeMinutes: z.number().int().min(1).max(43_200).default(60),
    })
    .default({ cores: 1, wallTimeMinutes: 60 }),
});
export type CodeDefinition = z.infer<typeof codeDefinitionSchema>;
export type CodeDefinitionInput = z.input<typeof codeDefinitionSchema>;

export const codeSchema = z.object({
  id: uuidSchema,
  groupId: uuidSchema,
  definition: codeDefinitionSchema,
  createdAt: isoDateTimeSchema,
  /**
   * When this version was retired, or null: a retired version keeps its runs and recipes but no new
   * recipe or run may use it until it is brought back. (Optional on input so older documents still read.)
   */
  retiredAt: isoDateTimeSchema.nullable().optional(),
  /**
   * The group's hosts this version is installed on. Empty: not pinned, any of the group's hosts may run
   * it. Runs of a recipe go only to a host where every pinned stage code is installed. (Optional on
   * input so older documents still read.)
   */
  hostIds: z.array(uuidSchema).optional(),
});
export type Code = z.infer<typeof codeSchema>;
export const codeListSchema = z.object({ codes: z.array(codeSchema) });

/** How many hosts one code version can be pinned to. */
export const MAX_CODE_HOSTS = 50;

/**
 * PATCH /api/codes/:codeId: retires a code version (no new recipes or runs with it) or brings it back,
 * and/or sets the hosts it is installed on (the whole list; empty unpins it). At least one of the two.
 */
export const codeUpdateRequestSchema = z
  .strictObject({
    retired: z.boolean({ error: "retired must be true or false" }).optional(),
    hostIds: z
      .array(uuidSchema, { error: "hostIds must be a list of host ids" })
      .max(MAX_CODE_HOSTS, { error: `A code version can be pinned to at most ${MAX_CODE_HOSTS} hosts.` })
      .refine((ids) => new Set(ids).size === ids.length, { error: "Each host may be listed once." })
      .optional(),
  })
  .refine((body) => body.retired !== undefined || body.hostIds !== undefined, {
    error: "Send retired, hostIds or both.",
  });
export type CodeUpdateRequest = z.infer<typeof codeUpdateRequestSchema>;

/** A group's code definitions as exported (a group may have none). */
export const codeExportSchema = z.strictObject({
  format: z.literal("sigmaflow-code-definitions"),
  version: z.literal(1),
  codes: z.array(codeDefinitionSchema),
});

export type CodeExport = z.infer<typeof codeExportSchema>;

/** The same document on import: between 1 and 100 definitions per request. */
export const codeImportSchema = codeExportSchema.extend({
  codes: z.array(codeDefinitionSchema).min(1).max(100),
});

/** Longest text of one rendered file a preview returns; the rest is cut and the file marked truncated. */
export const CODE_PREVIEW_FILE_CHARS = 200_000;

/**
 * A preview of a code's input files: rendered for a target of the group (or none) with the given
 * parameters, which the code's schema checks and completes with its defaults first, as for a run.
 */
export const codePreviewRequestSchema = z.strictObject({
  targetId: uuidSchema.nullable().default(null),
  parameters: z.record(z.string(), z.unknown()).default({}),
});
export type CodePreviewRequest = z.input<typeof codePreviewRequestSchema>;

export const codePreviewSchema = z.object({
  /** The parameters as rendered: the given values with the schema's defaults filled in. */
  parameters: z.record(z.string(), z.unknown()),
  target: z.object({ id: uuidSchema, name: z.string(), version: z.number().int() }).nullable(),
  files: z.array(
    z.object({
      fileName: z.string(),
      sizeBytes: z.number().int().min(0),
      text: z.string(),
      truncated: z.boolean(),
    }),
  ),
  /** The command-line arguments after rendering (empty ones left out, as in a run). */
  arguments: z.array(z.string()),
});
export type CodePreview = z.infer<typeof codePreviewSchema>;
