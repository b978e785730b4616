import { z } from "zod";
import { emailSchema, isoDateTimeSchema, uuidSchema } from "./common";

/**
 * Roles inside a group. `collaborator` reads results only, `member` (a researcher) may submit work,
 * `admin` also manages members, invitations and quotas. Site administration is a flag on the user.
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

export const memberSchema = z.object({
  userId: uuidSchema,
  email: z.string(),
  displayName: z.string(),
  role: groupRoleSchema,
  joinedAt: isoDateTimeSchema,
});
export type Member = z.infer<typeof memberSchema>;

export const memberListSchema = z.object({ members: z.array(memberSchema) });
export type MemberList = z.infer<typeof memberListSchema>;

export const updateMemberRequestSchema = z.strictObject({ role: groupRoleSchema });
export type UpdateMemberRequest = z.infer<typeof updateMemberRequestSchema>;

export const invitationStatusSchema = z.enum(["pending", "accepted", "revoked", "expired"]);

export const invitationSchema = z.object({
  id: uuidSchema,
  groupId: uuidSchema,
  email: z.string(),
  role: groupRoleSchema,
  status: invitationStatusSchema,
  invitedBy: z.string(),
  createdAt: isoDateTimeSchema,
  expiresAt: isoDateTimeSchema,
});
export type Invitation = z.infer<typeof invitationSchema>;

export const invitationListSchema = z.object({ invitations: z.array(invitationSchema) });
export type InvitationList = z.infer<typeof invitationListSchema>;

export const createInvitationRequestSchema = z.strictObject({
  email: emailSchema,
  role: groupRoleSchema.default("member"),
});
export type CreateInvitationRequest = z.input<typeof createInvitationRequestSchema>;

/** What the invitee sees before accepting (looked up by the secret token from the e-mail). */
export const invitationPreviewSchema = z.object({
  groupName: z.string(),
  groupSlug: z.string(),
  email: z.string(),
  role: groupRoleSchema,
  status: invitationStatusSchema,
  invitedBy: z.string(),
  expiresAt: isoDateTimeSchema,
});
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>;

export const acceptInvitationResponseSchema = z.object({ groupId: uuidSchema, role: groupRoleSchema });
