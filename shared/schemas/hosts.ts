import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { identifierSchema, remoteDirSchema } from "./names";

export const schedulerKindSchema = z.enum(["direct", "slurm"]);
export type SchedulerKind = z.infer<typeof schedulerKindSchema>;
export const hostStatusSchema = z.enum(["unverified", "ok", "unreachable", "key_mismatch"]);

export const hostSchema = z.object({
  id: uuidSchema,
  groupId: uuidSchema,
  name: z.string(),
  address: z.string(),
  port: z.number().int(),
  scheduler: schedulerKindSchema,
  remoteBaseDir: z.string(),
  maxConcurrentRuns: z.number().int(),
  hostKeyFingerprint: z.string().nullable(),
  hostKeyConfirmed: z.boolean(),
  status: hostStatusSchema,
  statusMessage: z.string().nullable(),
  createdAt: isoDateTimeSchema,
});
export type Host = z.infer<typeof hostSchema>;
export const hostListSchema = z.object({ hosts: z.array(hostSchema) });

export const hostAddressSchema = z
  .string()
  .min(1)
  .max(253)
  .regex(/^[A-Za-z0-9]([A-Za-z0-9.-]*[A-Za-z0-9])?$/, { error: "Give a host name or IPv4 address." });

export const createHostRequestSchema = z.strictObject({
  name: identifierSchema,
  address: hostAddressSchema,
  port: z.number().int().min(1).max(65535).default(22),
  scheduler: schedulerKindSchema,
  remoteBaseDir: remoteDirSchema,
  maxConcurrentRuns: z.number().int().min(1).max(10_000).default(50),
});
export type CreateHostRequest = z.input<typeof createHostRequestSchema>;

/** The admin confirms the fingerprint they were shown; a different key fetched since then is refused. */
export const confirmHostKeyRequestSchema = z.strictObject({ fingerprint: z.string().min(10).max(80) });

const createHostFields = createHostRequestSchema.shape;

/**
 * PATCH body for a host: only the fields given change. It has no defaults (unlike the creation schema,
 * where a missing `port` means 22), so a body without `port` keeps the host's port.
 */
export const patchHostRequestSchema = z.strictObject({
  address: createHostFields.address.optional(),
  port: createHostFields.port.unwrap().optional(),
  scheduler: createHostFields.scheduler.optional(),
  remoteBaseDir: createHostFields.remoteBaseDir.optional(),
  maxConcurrentRuns: createHostFields.maxConcurrentRuns.unwrap().optional(),
});
export type PatchHostRequest = z.infer<typeof patchHostRequestSchema>;
