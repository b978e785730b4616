import { z } from "zod";
import { safeFileNameSchema } from "./names";

/**
 * Extra input files a run carries beside the files its codes' templates render (a researcher's own
 * basis file, a geometry, a restart file). Sent and stored as base64 inside the run spec, so they are
 * bounded well below the run routes' JSON body limit (RUN_JSON_BODY_LIMIT in server/app.ts): base64
 * makes 384 KiB into 512 KiB of text.
 */
export const MAX_EXTRA_FILES = 8;
export const MAX_EXTRA_FILE_BYTES = 128 * 1024;
export const MAX_EXTRA_FILES_TOTAL_BYTES = 384 * 1024;

/** Characters of base64 that can hold at most `bytes` bytes (4 characters per 3 bytes, padded). */
const base64Chars = (bytes: number) => Math.ceil(bytes / 3) * 4;
const BASE64 = /^(?:[A-Za-z0-9+/]{4})*(?:[A-Za-z0-9+/]{2}==|[A-Za-z0-9+/]{3}=)?$/;

/** Bytes a well-formed base64 text decodes to. */
export function base64DecodedBytes(text: string): number {
  const padding = text.endsWith("==") ? 2 : text.endsWith("=") ? 1 : 0;
  return (text.length / 4) * 3 - padding;
}

export const extraFileSchema = z.strictObject({
  /** The recipe's stage whose folder receives the file. */
  stage: z.string().min(1).max(64),
  /** Same rules as a code's template file names: one plain name, no folders. */
  fileName: safeFileNameSchema,
  /** The file's exact bytes, base64 (standard alphabet, padded). */
  contentBase64: z
    .string()
    .max(base64Chars(MAX_EXTRA_FILE_BYTES), {
      error: `An extra file may hold at most ${MAX_EXTRA_FILE_BYTES / 1024} KiB.`,
    })
    .regex(BASE64, { error: "Not valid base64 (standard alphabet, padded to a multiple of 4)." })
    .refine((text) => base64DecodedBytes(text) <= MAX_EXTRA_FILE_BYTES, {
      error: `An extra file may hold at most ${MAX_EXTRA_FILE_BYTES / 1024} KiB.`,
    }),
});
export type ExtraFile = z.infer<typeof extraFileSchema>;

/**
 * At most MAX_EXTRA_FILES files of MAX_EXTRA_FILES_TOTAL_BYTES together; a name appears once per stage.
 * Whether the stage exists and whether a name collides with the stage's rendered files is checked
 * against the recipe when the run is planned (server/execution/run-plan.ts).
 */
export const extraFilesSchema = z
  .array(extraFileSchema)
  .max(MAX_EXTRA_FILES, { error: `At most ${MAX_EXTRA_FILES} extra files per run.` })
  .superRefine((files, ctx) => {
    const seen = new Set<string>();
    let total = 0;
    files.forEach((file, i) => {
      const key = `${file.stage}\u0000${file.fileName}`;
      if (seen.has(key)) {
        ctx.addIssue({
          code: "custom",
          path: [i, "fileName"],
          message: `Stage ${file.stage} already has an extra file named ${file.fileName}.`,
        });
      }
      seen.add(key);
      total += base64DecodedBytes(file.contentBase64);
    });
    if (total > MAX_EXTRA_FILES_TOTAL_BYTES) {
      ctx.addIssue({
        code: "custom",
        path: [],
        message: `The extra files hold ${total} bytes together; at most ${MAX_EXTRA_FILES_TOTAL_BYTES} bytes (${MAX_EXTRA_FILES_TOTAL_BYTES / 1024} KiB).`,
      });
    }
  });
