import { z } from "zod";
import { isoDateTimeSchema } from "./common";

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
