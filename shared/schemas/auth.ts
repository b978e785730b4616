import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { groupRoleSchema } from "./groups";

export const membershipSummarySchema = z.object({
  groupId: uuidSchema,
  groupSlug: z.string(),
  groupName: z.string(),
  role: groupRoleSchema,
});
export type MembershipSummary = z.infer<typeof membershipSummarySchema>;

/** `GET /api/me`: the signed-in person, their groups, and the CSRF token for mutating requests. */
export const meSchema = z.object({
  user: z.object({
    id: uuidSchema,
    email: z.string(),
    displayName: z.string(),
    isSiteAdmin: z.boolean(),
  }),
  memberships: z.array(membershipSummarySchema),
  /** Send back as the `x-csrf-token` header on every POST/PATCH/PUT/DELETE made with the session cookie. */
  csrfToken: z.string(),
});
export type Me = z.infer<typeof meSchema>;

export const apiTokenSchema = z.object({
  id: uuidSchema,
  name: z.string(),
  /** First characters of the secret, enough to recognise it; the secret itself is shown once. */
  prefix: z.string(),
  createdAt: isoDateTimeSchema,
  lastUsedAt: isoDateTimeSchema.nullable(),
  expiresAt: isoDateTimeSchema.nullable(),
});
export type ApiToken = z.infer<typeof apiTokenSchema>;

export const apiTokenListSchema = z.object({ tokens: z.array(apiTokenSchema) });
export type ApiTokenList = z.infer<typeof apiTokenListSchema>;

export const createApiTokenRequestSchema = z.strictObject({
  name: z.string().trim().min(1, { error: "Name the token after the script that will use it." }).max(80),
  expiresInDays: z.number().int().min(1).max(365).nullable().default(90),
});
export type CreateApiTokenRequest = z.input<typeof createApiTokenRequestSchema>;

export const createdApiTokenSchema = z.object({
  token: apiTokenSchema,
  /** The full secret, returned only in this response. */
  secret: z.string(),
});
export type CreatedApiToken = z.infer<typeof createdApiTokenSchema>;

export const healthSchema = z.object({
  status: z.enum(["ok", "degraded"]),
  database: z.object({ ok: z.boolean(), latencyMs: z.number().nullable(), error: z.string().optional() }),
  version: z.string(),
});
export type Health = z.infer<typeof healthSchema>;

export const adminUserSchema = z.object({
  id: uuidSchema,
  email: z.string(),
  displayName: z.string(),
  isSiteAdmin: z.boolean(),
  createdAt: isoDateTimeSchema,
  lastSignInAt: isoDateTimeSchema.nullable(),
  groupCount: z.number().int().nonnegative(),
});
export const adminUserListSchema = z.object({ users: z.array(adminUserSchema) });
export type AdminUser = z.infer<typeof adminUserSchema>;

export const auditEntrySchema = z.object({
  id: z.number().int(),
  at: isoDateTimeSchema,
  actor: z.string().nullable(),
  action: z.string(),
  targetType: z.string(),
  targetId: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
});
export const auditListSchema = z.object({ entries: z.array(auditEntrySchema) });
export type AuditEntry = z.infer<typeof auditEntrySchema>;
