import { z } from "zod";
import { createHostRequestSchema } from "./hosts";

const fields = createHostRequestSchema.shape;

/**
 * PATCH body for a host: only the fields given change. It has no defaults (unlike the creation schema,
 * where a missing `port` means 22), so a body without `port` keeps the host's port.
 */
export const patchHostRequestSchema = z.strictObject({
  address: fields.address.optional(),
  port: fields.port.unwrap().optional(),
  scheduler: fields.scheduler.optional(),
  remoteBaseDir: fields.remoteBaseDir.optional(),
  maxConcurrentRuns: fields.maxConcurrentRuns.unwrap().optional(),
});
export type PatchHostRequest = z.infer<typeof patchHostRequestSchema>;
