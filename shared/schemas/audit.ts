import { z } from "zod";
import { auditActionSchema, auditTargetTypeSchema } from "./audit-actions";
import { isoDateTimeSchema } from "./common";

/** One line of a group's activity, with the names the activity page shows instead of ids. */
export const auditEntrySchema = z.object({
  id: z.number().int(),
  at: isoDateTimeSchema,
  /** The display name of whoever acted; null when Sigmaflow acted on its own (e.g. holding a host's runs). */
  actor: z.string().nullable(),
  action: auditActionSchema,
  targetType: auditTargetTypeSchema,
  targetId: z.string().nullable(),
  /**
   * The target's name as it is now (a code as "name version", an account as "user@host"); when the target
   * is gone, the name recorded with the log; null when neither is known.
   */
  targetName: z.string().nullable(),
  /** Whether the target still exists (a member: is still in the group), so the page can link to it. */
  targetExists: z.boolean(),
  details: z.record(z.string(), z.unknown()),
});
export const auditListSchema = z.object({ entries: z.array(auditEntrySchema) });
export type AuditEntry = z.infer<typeof auditEntrySchema>;
