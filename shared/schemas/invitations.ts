import { z } from "zod";
import { emailSchema, isoDateTimeSchema, uuidSchema } from "./common";
import { groupRoleSchema } from "./groups";

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
