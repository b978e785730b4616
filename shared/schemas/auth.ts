import { z } from "zod";
import { uuidSchema } from "./common";
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
