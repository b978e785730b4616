import { z } from "zod";
import { isoDateTimeSchema, uuidSchema } from "./common";

export const createAllocationRequestSchema = z
  .strictObject({
    name: z.string().trim().min(1).max(80),
    coreHours: z.number().positive().max(1e9),
    startsAt: isoDateTimeSchema,
    endsAt: isoDateTimeSchema,
  })
  .refine((a) => Date.parse(a.endsAt) > Date.parse(a.startsAt), {
    error: "The period must end after it starts.",
  });

export const allocationSchema = z.object({
  id: uuidSchema,
  groupId: uuidSchema,
  name: z.string(),
  grantedCoreHours: z.number(),
  reservedCoreHours: z.number(),
  chargedCoreHours: z.number(),
  availableCoreHours: z.number(),
  startsAt: isoDateTimeSchema,
  endsAt: isoDateTimeSchema,
});
export type Allocation = z.infer<typeof allocationSchema>;
export const allocationListSchema = z.object({ allocations: z.array(allocationSchema) });

/** What a ledger entry does to an allocation's balance (see server/services/allocations.service.ts). */
export const ledgerKindSchema = z.enum(["reserve", "charge", "release"]);
export type LedgerKind = z.infer<typeof ledgerKindSchema>;

export const ledgerEntrySchema = z.object({
  id: z.number().int(),
  runId: uuidSchema.nullable(),
  kind: ledgerKindSchema,
  coreHours: z.number(),
  note: z.string().nullable(),
  at: isoDateTimeSchema,
});
export type LedgerEntry = z.infer<typeof ledgerEntrySchema>;
export const ledgerSchema = z.object({ entries: z.array(ledgerEntrySchema) });
