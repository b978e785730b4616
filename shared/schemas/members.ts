import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";
import { groupRoleSchema } from "./groups";

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
