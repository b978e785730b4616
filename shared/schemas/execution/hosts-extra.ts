import { z } from "zod";
import { createHostRequestSchema } from "./hosts";

const fields = createHostRequestSchema.shape;

/**
 * PATCH body for a host: only the fields given change. (`updateHostRequestSchema` keeps the creation
 * defaults, so a body without `port` would reset the port to 22; this one has no defaults.)
 */
export const patchHostRequestSchema = z.strictObject({
  address: fields.address.optional(),
  port: fields.port.unwrap().optional(),
  scheduler: fields.scheduler.optional(),
  remoteBaseDir: fields.remoteBaseDir.optional(),
  maxConcurrentRuns: fields.maxConcurrentRuns.unwrap().optional(),
});
export type PatchHostRequest = z.infer<typeof patchHostRequestSchema>;
