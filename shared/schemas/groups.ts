import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";

/**
 * Roles inside a group, from least to most access (access checks rank them by this order; the
 * database enum is built from this list). `collaborator` reads results only, `member` (a researcher)
 * may submit work, `admin` also manages members, invitations and quotas. Site administration is a flag
 * on the user.
 */
export const groupRoleSchema = z.enum(["collaborator", "member", "admin"]);
export type GroupRole = z.infer<typeof groupRoleSchema>;

export const groupSlugSchema = z
  .string()
  .min(3, { error: "A group slug needs at least 3 characters." })
  .max(48)
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, {
    error: "Use lowercase letters, digits and single hyphens (for example plasma-collisions).",
  });

export const groupSchema = z.object({
  id: uuidSchema,
  slug: z.string(),
  name: z.string(),
  description: z.string(),
  createdAt: isoDateTimeSchema,
  memberCount: z.number().int().nonnegative(),
  /** The caller's role in this group, or null for a site admin who is not a member. */
  myRole: groupRoleSchema.nullable(),
});
export type Group = z.infer<typeof groupSchema>;

export const groupListSchema = z.object({ groups: z.array(groupSchema) });
export type GroupList = z.infer<typeof groupListSchema>;

export const createGroupRequestSchema = z.strictObject({
  slug: groupSlugSchema,
  name: z.string().trim().min(2, { error: "Give the group a name." }).max(120),
  description: z.string().trim().max(2000).default(""),
});
export type CreateGroupRequest = z.input<typeof createGroupRequestSchema>;
