/**
 * Execution engine tables: hosts and the accounts used to reach them, registered codes, recipes,
 * allocations with their ledger, and runs with their events, log chunks, timings and artefacts.
 * Core-hours are stored as whole core-seconds (bigint) so sums and balances are exact.
 */

import { sql } from "drizzle-orm";
import {
  bigint,
  bigserial,
  boolean,
  customType,
  index,
  integer,
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
import { ledgerKindSchema } from "../../../shared/schemas/allocations";
import { hostStatusSchema, schedulerKindSchema } from "../../../shared/schemas/hosts";
import { resultsStateSchema } from "../../../shared/schemas/results";
import { runStateSchema } from "../../../shared/schemas/runs";
import { enumValues } from "./enum-values";
import { groups, users } from "./identity";
import { targets, targetVersions } from "./targets";

const bytea = customType<{ data: Buffer }>({ dataType: () => "bytea" });
const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();
const coreSeconds = (name: string) => bigint(name, { mode: "number" });

export const schedulerKind = pgEnum("scheduler_kind", enumValues(schedulerKindSchema));
export const hostStatus = pgEnum("host_status", enumValues(hostStatusSchema));
export const runState = pgEnum("run_state", enumValues(runStateSchema));
export const ledgerKind = pgEnum("ledger_kind", enumValues(ledgerKindSchema));
export const resultsState = pgEnum("results_state", enumValues(resultsStateSchema));

export const hosts = pgTable(
  "hosts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    groupId: uuid("group_id")
      .notNull()
      .references(() => groups.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 64 }).notNull(),
    address: varchar("address", { length: 253 }).notNull(),
    port: integer("port").notNull().default(22),
    scheduler: schedulerKind("scheduler").notNull(),
    remoteBaseDir: text("remote_base_dir").notNull(),
    maxConcurrentRuns: integer("max_concurrent_runs").notNull().default(50),
    /** Pinned host key ("ssh-ed25519 AAAA…"), fetched once and confirmed by an admin. */
    hostKey: text("host_key"),
    hostKeyFingerprint: varchar("host_key_fingerprint", { length: 80 }),
    hostKeyConfirmedAt: timestamp("host_key_confirmed_at", { withTimezone: true }),
    status: hostStatus("status").notNull().default("unverified"),
    statusMessage: text("status_message"),
    statusChangedAt: timestamp("status_changed_at", { withTimezone: true }),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("hosts_group_name_key").on(t.groupId, t.name)],
);

export const hostAccounts = pgTable(
  "host_accounts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    hostId: uuid("host_id")
      .notNull()
      .references(() => hosts.id, { onDelete: "cascade" }),
    /** The researcher this account belongs to; null for the group account an admin set up. */
    ownerUserId: uuid("owner_user_id").references(() => users.id, { onDelete: "cascade" }),
    username: varchar("username", { length: 64 }).notNull(),
    publicKey: text("public_key").notNull(),
    /** AES-256-GCM: iv (12 bytes) ‖ tag (16 bytes) ‖ ciphertext of the OpenSSH private key. */
    privateKeyEncrypted: bytea("private_key_encrypted").notNull(),
    /**
     * Set while the account is disabled (by its owner or an admin, or by replacing it): new runs skip
     * it, runs that used it keep pointing at it and still finish with it.
     */
    disabledAt: timestamp("disabled_at", { withTimezone: true }),
    disabledBy: uuid("disabled_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [
    // One enabled personal account per person and one enabled group account (owner null) per host;
    // disabled ones stay as the record of the runs that used them.
    uniqueIndex("host_accounts_enabled_owner_key")
      .on(t.hostId, sql`coalesce(${t.ownerUserId}, '00000000-0000-0000-0000-000000000000'::uuid)`)
      .where(sql`${t.disabledAt} is null`),
    index("host_accounts_host_idx").on(t.hostId),
  ],
);

export const codes = pgTable(
  "codes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    groupId: uuid("group_id")
      .notNull()
      .references(() => groups.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 64 }).notNull(),
    version: varchar("version", { length: 64 }).notNull(),
    /** The whole validated code definition (executable, set-up lines, templates, parameters, outputs, rules). */
    definition: jsonb("definition").notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    /** When this version was retired: no new recipe or run may use it until it is brought back. */
    retiredAt: timestamp("retired_at", { withTimezone: true }),
    retiredBy: uuid("retired_by").references(() => users.id, { onDelete: "set null" }),
  },
  (t) => [uniqueIndex("codes_group_name_version_key").on(t.groupId, t.name, t.version)],
);

/**
 * The hosts a code version is installed on. A version with no rows here is not pinned: any of the
 * group's hosts may run it.
 */
export const codeHosts = pgTable(
  "code_hosts",
  {
    codeId: uuid("code_id")
      .notNull()
      .references(() => codes.id, { onDelete: "cascade" }),
    hostId: uuid("host_id")
      .notNull()
      .references(() => hosts.id, { onDelete: "cascade" }),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.codeId, t.hostId] }), index("code_hosts_host_idx").on(t.hostId)],
);

export const recipes = pgTable(
  "recipes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    groupId: uuid("group_id")
      .notNull()
      .references(() => groups.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 64 }).notNull(),
    description: text("description").notNull().default(""),
    /** Ordered stages: [{ name, codeId }]. */
    stages: jsonb("stages").notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("recipes_group_name_key").on(t.groupId, t.name)],
);

export const allocations = pgTable(
  "allocations",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    groupId: uuid("group_id")
      .notNull()
      .references(() => groups.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 80 }).notNull(),
    grantedCoreSeconds: coreSeconds("granted_core_seconds").notNull(),
    startsAt: timestamp("starts_at", { withTimezone: true }).notNull(),
    endsAt: timestamp("ends_at", { withTimezone: true }).notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [index("allocations_group_idx").on(t.groupId, t.startsAt)],
);

export const runs = pgTable(
  "runs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    groupId: uuid("group_id")
      .notNull()
      .references(() => groups.id, { onDelete: "cascade" }),
    recipeId: uuid("recipe_id")
      .notNull()
      .references(() => recipes.id),
    hostId: uuid("host_id")
      .notNull()
      .references(() => hosts.id),
    hostAccountId: uuid("host_account_id")
      .notNull()
      .references(() => hostAccounts.id),
    allocationId: uuid("allocation_id")
      .notNull()
      .references(() => allocations.id),
    submittedBy: uuid("submitted_by").references(() => users.id, { onDelete: "set null" }),
    /** The target the run is about and the version of it the run used (null for runs without a target). */
    targetId: uuid("target_id").references(() => targets.id),
    targetVersionId: uuid("target_version_id").references(() => targetVersions.id),
    name: varchar("name", { length: 120 }).notNull(),
    /** The validated run spec as submitted (target, recipe, parameters per stage, resources). */
    spec: jsonb("spec").notNull(),
    /** Everything the remote job needs, rendered at creation: stage scripts and input files. */
    plan: jsonb("plan").notNull(),
    fingerprint: varchar("fingerprint", { length: 64 }).notNull(),
    state: runState("state").notNull().default("queued"),
    stateMessage: text("state_message"),
    /**
     * Set while a queued run waits because its host already runs its `max_concurrent_runs`; the poller
     * hands such runs back to staging, oldest first, as slots free up.
     */
    waitingForSlotSince: timestamp("waiting_for_slot_since", { withTimezone: true }),
    cores: integer("cores").notNull(),
    wallTimeMinutes: integer("wall_time_minutes").notNull(),
    reservedCoreSeconds: coreSeconds("reserved_core_seconds").notNull(),
    chargedCoreSeconds: coreSeconds("charged_core_seconds"),
    remoteDir: text("remote_dir").notNull(),
    /** Written into the scheduler job's name before submission, so a restarted worker finds the job. */
    submitToken: varchar("submit_token", { length: 64 }).notNull(),
    schedulerJobId: varchar("scheduler_job_id", { length: 64 }),
    exitCode: integer("exit_code"),
    logOffsetBytes: bigint("log_offset_bytes", { mode: "number" }).notNull().default(0),
    logSeq: integer("log_seq").notNull().default(0),
    transportAttempts: integer("transport_attempts").notNull().default(0),
    /** The step to repeat and the state to return to when a held run resumes. */
    heldStep: varchar("held_step", { length: 16 }),
    heldFromState: runState("held_from_state"),
    /** Files staged on the host with the sha256 the host computed: [{ path, sha256 }]. */
    stagedFiles: jsonb("staged_files"),
    /**
     * How far the log has got (shared/schemas runStageProgressSchema): the stage of the last stage marker and
     * that stage's latest progress line. The poller reads the next log bytes with this stage's output rules.
     */
    progress: jsonb("progress"),
    nextRetryAt: timestamp("next_retry_at", { withTimezone: true }),
    cancelRequestedAt: timestamp("cancel_requested_at", { withTimezone: true }),
    /** The person who asked to cancel; the run's `cancelled` event is theirs, whichever step records it. */
    cancelRequestedBy: uuid("cancel_requested_by").references(() => users.id, { onDelete: "set null" }),
    resubmittedFrom: uuid("resubmitted_from"),
    reusedFrom: uuid("reused_from"),
    notifyByEmail: boolean("notify_by_email").notNull().default(false),
    /** Set by `collect` for a done run (`pending`), then by `postprocess` (`derived`, `none` or `failed`). */
    resultsState: resultsState("results_state"),
    /** Why no results were derived, or why deriving them failed. */
    resultsMessage: text("results_message"),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [
    // The group's runs list (server/services/run-list.service.ts): one index per sort column and per
    // filter with the default sort, each ending in id for the tiebreak, so a page is an index range scan.
    index("runs_group_created_id_idx").on(t.groupId, t.createdAt.desc(), t.id.desc()),
    index("runs_group_updated_id_idx").on(t.groupId, t.updatedAt.desc(), t.id.desc()),
    index("runs_group_state_created_idx").on(t.groupId, t.state, t.createdAt.desc(), t.id.desc()),
    index("runs_group_name_id_idx").on(t.groupId, t.name, t.id),
    index("runs_group_target_created_idx").on(t.groupId, t.targetId, t.createdAt.desc(), t.id.desc()),
    index("runs_group_recipe_created_idx").on(t.groupId, t.recipeId, t.createdAt.desc(), t.id.desc()),
    index("runs_group_host_created_idx").on(t.groupId, t.hostId, t.createdAt.desc(), t.id.desc()),
    index("runs_group_submitter_created_idx").on(t.groupId, t.submittedBy, t.createdAt.desc(), t.id.desc()),
    index("runs_host_state_idx").on(t.hostId, t.state),
    index("runs_waiting_for_slot_idx")
      .on(t.hostId, t.waitingForSlotSince)
      .where(sql`${t.waitingForSlotSince} is not null`),
    index("runs_fingerprint_idx").on(t.groupId, t.fingerprint),
    index("runs_target_idx").on(t.targetId),
    uniqueIndex("runs_submit_token_key").on(t.submitToken),
  ],
);

export const ledgerEntries = pgTable(
  "ledger_entries",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    allocationId: uuid("allocation_id")
      .notNull()
      .references(() => allocations.id, { onDelete: "cascade" }),
    runId: uuid("run_id").references(() => runs.id, { onDelete: "set null" }),
    kind: ledgerKind("kind").notNull(),
    coreSeconds: coreSeconds("core_seconds").notNull(),
    note: text("note"),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("ledger_allocation_idx").on(t.allocationId), index("ledger_run_idx").on(t.runId)],
);

export const runEvents = pgTable(
  "run_events",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    runId: uuid("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
    fromState: runState("from_state"),
    toState: runState("to_state").notNull(),
    /** A person (user id) or null for the worker. */
    actorUserId: uuid("actor_user_id").references(() => users.id, { onDelete: "set null" }),
    actor: varchar("actor", { length: 32 }).notNull(),
    message: text("message"),
  },
  (t) => [index("run_events_run_idx").on(t.runId, t.id)],
);

export const runLogChunks = pgTable(
  "run_log_chunks",
  {
    runId: uuid("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    seq: integer("seq").notNull(),
    offsetBytes: bigint("offset_bytes", { mode: "number" }).notNull(),
    /** The log file's bytes from offsetBytes, exactly as the host holds them (never decoded). */
    content: bytea("content").notNull(),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.runId, t.seq] })],
);

export const runTimings = pgTable(
  "run_timings",
  {
    runId: uuid("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    stage: varchar("stage", { length: 64 }).notNull(),
    symmetry: varchar("symmetry", { length: 32 }).notNull(),
    elapsedMs: bigint("elapsed_ms", { mode: "number" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.runId, t.stage, t.symmetry] })],
);

export const runArtifacts = pgTable(
  "run_artifacts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    runId: uuid("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    stage: varchar("stage", { length: 64 }).notNull(),
    name: varchar("name", { length: 128 }).notNull(),
    sizeBytes: bigint("size_bytes", { mode: "number" }).notNull(),
    sha256: varchar("sha256", { length: 64 }).notNull(),
    content: bytea("content").notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("run_artifacts_name_key").on(t.runId, t.stage, t.name)],
);
