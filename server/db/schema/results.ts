/**
 * Results derived from a run's collected files by the postprocess step: one row per kind, process,
 * irrep and label, with equal-length numeric columns whose names carry their units.
 */
import { sql } from "drizzle-orm";
import { index, jsonb, pgTable, text, timestamp, uniqueIndex, uuid, varchar } from "drizzle-orm/pg-core";
import { runs } from "./execution";

export const runResults = pgTable(
  "run_results",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    runId: uuid("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    kind: varchar("kind", { length: 32 }).notNull(),
    process: varchar("process", { length: 32 }).notNull(),
    /** Null for a sum over all irreducible representations. */
    irrep: varchar("irrep", { length: 32 }),
    label: varchar("label", { length: 64 }).notNull().default(""),
    /** { "energy_eV": [...], "cross_section_A2": [...] } — arrays of equal length, units in the names. */
    columns: jsonb("columns").notNull(),
    columnOrder: jsonb("column_order").notNull(),
    /** Modified-Arrhenius fit of a rate coefficient (shared/schemas arrheniusFitResultSchema). */
    fit: jsonb("fit"),
    method: text("method").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("run_results_key").on(t.runId, t.kind, t.process, sql`coalesce(${t.irrep}, '')`, t.label),
    index("run_results_run_idx").on(t.runId),
  ],
);
