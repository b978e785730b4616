import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";

/** A researcher's own account on a host, or the group's (set up by an admin). */
export const hostAccountKindSchema = z.enum(["personal", "group"]);
export type HostAccountKind = z.infer<typeof hostAccountKindSchema>;

export const hostAccountSchema = z.object({
  id: uuidSchema,
  hostId: uuidSchema,
  kind: hostAccountKindSchema,
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
  kind: hostAccountKindSchema,
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
