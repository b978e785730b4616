/**
 * Targets of a group and their versions. A version holds the atoms as entered, charge, multiplicity and
 * notes, and the properties the science core derived from them; an update adds a version, and runs refer
 * to the version they used. An isotopologue is a target with `parent_target_id` set.
 */
import { sql } from "drizzle-orm";
import {
  type AnyPgColumn,
  index,
  integer,
  jsonb,
  pgTable,
  text,
  timestamp,
  uniqueIndex,
  uuid,
  varchar,
} from "drizzle-orm/pg-core";
import { groups, users } from "./identity";

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();

export const targets = pgTable(
  "targets",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    groupId: uuid("group_id")
      .notNull()
      .references(() => groups.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 120 }).notNull(),
    /** The target this one is an isotopologue of (same geometry, other isotopes). */
    parentTargetId: uuid("parent_target_id").references((): AnyPgColumn => targets.id, {
      onDelete: "restrict",
    }),
    latestVersion: integer("latest_version").notNull().default(1),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("targets_group_name_key").on(t.groupId, sql`lower(${t.name})`),
    index("targets_parent_idx").on(t.parentTargetId),
  ],
);

export const targetVersions = pgTable(
  "target_versions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    targetId: uuid("target_id")
      .notNull()
      .references(() => targets.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    /** The atoms as entered (shared/schemas targetAtomSchema[]): element, mass number, x/y/z in Å. */
    atoms: jsonb("atoms").notNull(),
    charge: integer("charge").notNull(),
    multiplicity: integer("multiplicity").notNull(),
    notes: text("notes").notNull().default(""),
    /** The science core's inspection of this version (shared/schemas targetDerivedSchema). */
    derived: jsonb("derived").notNull(),
    formula: varchar("formula", { length: 200 }).notNull(),
    pointGroup: varchar("point_group", { length: 16 }).notNull(),
    abelianSubgroup: varchar("abelian_subgroup", { length: 8 }).notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("target_versions_target_version_key").on(t.targetId, t.version)],
);
