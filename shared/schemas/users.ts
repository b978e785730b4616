import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";

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
