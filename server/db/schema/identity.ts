/**
 * Sigmaflow's PostgreSQL schema (Drizzle). Column names carry units where they have one.
 * Migrations are generated from this file with `npm run db:generate` into drizzle/.
 */
import { sql } from "drizzle-orm";
import {
  bigserial,
  boolean,
  index,
  inet,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
  varchar,
} from "drizzle-orm/pg-core";
import { groupRoleSchema } from "../../../shared/schemas/groups";
import { enumValues } from "./enum-values";

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();

export const groupRole = pgEnum("group_role", enumValues(groupRoleSchema));

export const users = pgTable(
  "users",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    email: varchar("email", { length: 254 }).notNull(),
    displayName: text("display_name").notNull(),
    /** OpenID Connect issuer and subject: the identity that signs in. */
    oidcIssuer: text("oidc_issuer").notNull(),
    oidcSubject: text("oidc_subject").notNull(),
    isSiteAdmin: boolean("is_site_admin").notNull().default(false),
    createdAt: createdAt(),
    lastSignInAt: timestamp("last_sign_in_at", { withTimezone: true }),
  },
  (t) => [
    uniqueIndex("users_oidc_identity_key").on(t.oidcIssuer, t.oidcSubject),
    uniqueIndex("users_email_key").on(sql`lower(${t.email})`),
  ],
);

export const groups = pgTable("groups", {
  id: uuid("id").primaryKey().defaultRandom(),
  slug: varchar("slug", { length: 48 }).notNull().unique(),
  name: text("name").notNull(),
  description: text("description").notNull().default(""),
  createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
  createdAt: createdAt(),
});

export const memberships = pgTable(
  "memberships",
  {
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    groupId: uuid("group_id")
      .notNull()
      .references(() => groups.id, { onDelete: "cascade" }),
    role: groupRole("role").notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.groupId] }), index("memberships_group_idx").on(t.groupId)],
);

export const invitations = pgTable(
  "invitations",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    groupId: uuid("group_id")
      .notNull()
      .references(() => groups.id, { onDelete: "cascade" }),
    email: varchar("email", { length: 254 }).notNull(),
    role: groupRole("role").notNull(),
    /** sha256 of the secret sent in the e-mail; the secret itself is never stored. */
    tokenHash: varchar("token_hash", { length: 64 }).notNull().unique(),
    invitedBy: uuid("invited_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    acceptedAt: timestamp("accepted_at", { withTimezone: true }),
    acceptedBy: uuid("accepted_by").references(() => users.id, { onDelete: "set null" }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [index("invitations_group_idx").on(t.groupId)],
);

/** express-session rows (connect-pg-simple's layout: sid, sess, expire). */
export const sessions = pgTable(
  "sessions",
  {
    sid: varchar("sid").primaryKey(),
    sess: jsonb("sess").notNull(),
    expire: timestamp("expire", { precision: 6 }).notNull(),
  },
  (t) => [index("sessions_expire_idx").on(t.expire)],
);

export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** First characters of the secret, for recognising a token in lists. */
    prefix: varchar("prefix", { length: 16 }).notNull(),
    /** sha256 of the whole secret. */
    tokenHash: varchar("token_hash", { length: 64 }).notNull().unique(),
    createdAt: createdAt(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    expiresAt: timestamp("expires_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [index("api_tokens_user_idx").on(t.userId)],
);

export const auditLog = pgTable(
  "audit_log",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
    actorUserId: uuid("actor_user_id").references(() => users.id, { onDelete: "set null" }),
    groupId: uuid("group_id").references(() => groups.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    targetType: text("target_type").notNull(),
    targetId: text("target_id"),
    details: jsonb("details").$type<Record<string, unknown>>().notNull().default({}),
    ip: inet("ip"),
  },
  (t) => [index("audit_log_group_at_idx").on(t.groupId, t.at)],
);
