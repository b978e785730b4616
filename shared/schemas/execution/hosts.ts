import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "../common";
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

export const hostAccountSchema = z.object({
  id: uuidSchema,
  hostId: uuidSchema,
  kind: z.enum(["personal", "group"]),
  ownerUserId: uuidSchema.nullable(),
  username: z.string(),
  /** Install this line in ~/.ssh/authorized_keys on the host. */
  publicKey: z.string(),
  /** When it was disabled (new runs skip it; runs that used it keep it); null while enabled. */
  disabledAt: isoDateTimeSchema.nullable(),
  createdAt: isoDateTimeSchema,
});
export type HostAccount = z.infer<typeof hostAccountSchema>;
export const hostAccountListSchema = z.object({ accounts: z.array(hostAccountSchema) });

export const posixUsernameSchema = z.string().regex(/^[a-z_][a-z0-9_-]{0,31}$/, {
  error: "Give the POSIX user name on the host (lowercase, up to 32).",
});

export const createHostAccountRequestSchema = z.strictObject({
  kind: z.enum(["personal", "group"]),
  username: posixUsernameSchema,
  /** Omit to let Sigmaflow generate an ed25519 key pair; or paste an unencrypted OpenSSH private key. */
  privateKey: z.string().max(20_000).optional(),
});
export type CreateHostAccountRequest = z.infer<typeof createHostAccountRequestSchema>;

/** A replacement for an account: same kind and owner, another user name or key. */
export const replaceHostAccountRequestSchema = createHostAccountRequestSchema.omit({ kind: true });
export type ReplaceHostAccountRequest = z.infer<typeof replaceHostAccountRequestSchema>;

/** Disables an account (new runs skip it) or enables it again. */
export const patchHostAccountRequestSchema = z.strictObject({ disabled: z.boolean() });
export type PatchHostAccountRequest = z.infer<typeof patchHostAccountRequestSchema>;
