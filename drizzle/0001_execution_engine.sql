CREATE TYPE "public"."host_status" AS ENUM('unverified', 'ok', 'unreachable', 'key_mismatch');--> statement-breakpoint
CREATE TYPE "public"."ledger_kind" AS ENUM('reserve', 'charge', 'release');--> statement-breakpoint
CREATE TYPE "public"."run_state" AS ENUM('queued', 'staging', 'submitted', 'running', 'collecting', 'done', 'failed', 'cancelled', 'held');--> statement-breakpoint
CREATE TYPE "public"."scheduler_kind" AS ENUM('direct', 'slurm');--> statement-breakpoint
CREATE TABLE "allocations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"group_id" uuid NOT NULL,
	"name" varchar(80) NOT NULL,
	"granted_core_seconds" bigint NOT NULL,
	"starts_at" timestamp with time zone NOT NULL,
	"ends_at" timestamp with time zone NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "codes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"group_id" uuid NOT NULL,
	"name" varchar(64) NOT NULL,
	"version" varchar(64) NOT NULL,
	"definition" jsonb NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "host_accounts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"host_id" uuid NOT NULL,
	"owner_user_id" uuid,
	"username" varchar(64) NOT NULL,
	"public_key" text NOT NULL,
	"private_key_encrypted" "bytea" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "host_accounts_owner_key" UNIQUE NULLS NOT DISTINCT("host_id","owner_user_id")
);
--> statement-breakpoint
CREATE TABLE "hosts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"group_id" uuid NOT NULL,
	"name" varchar(64) NOT NULL,
	"address" varchar(253) NOT NULL,
	"port" integer DEFAULT 22 NOT NULL,
	"scheduler" "scheduler_kind" NOT NULL,
	"remote_base_dir" text NOT NULL,
	"max_concurrent_runs" integer DEFAULT 50 NOT NULL,
	"host_key" text,
	"host_key_fingerprint" varchar(80),
	"host_key_confirmed_at" timestamp with time zone,
	"status" "host_status" DEFAULT 'unverified' NOT NULL,
	"status_message" text,
	"status_changed_at" timestamp with time zone,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "ledger_entries" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"allocation_id" uuid NOT NULL,
	"run_id" uuid,
	"kind" "ledger_kind" NOT NULL,
	"core_seconds" bigint NOT NULL,
	"note" text,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "recipes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"group_id" uuid NOT NULL,
	"name" varchar(64) NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"stages" jsonb NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "run_artifacts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"run_id" uuid NOT NULL,
	"stage" varchar(64) NOT NULL,
	"name" varchar(128) NOT NULL,
	"size_bytes" bigint NOT NULL,
	"sha256" varchar(64) NOT NULL,
	"content" "bytea" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "run_events" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"run_id" uuid NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"from_state" "run_state",
	"to_state" "run_state" NOT NULL,
	"actor_user_id" uuid,
	"actor" varchar(32) NOT NULL,
	"message" text
);
--> statement-breakpoint
CREATE TABLE "run_log_chunks" (
	"run_id" uuid NOT NULL,
	"seq" integer NOT NULL,
	"offset_bytes" bigint NOT NULL,
	"text" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "run_log_chunks_run_id_seq_pk" PRIMARY KEY("run_id","seq")
);
--> statement-breakpoint
CREATE TABLE "run_timings" (
	"run_id" uuid NOT NULL,
	"stage" varchar(64) NOT NULL,
	"symmetry" varchar(32) NOT NULL,
	"elapsed_ms" bigint NOT NULL,
	CONSTRAINT "run_timings_run_id_stage_symmetry_pk" PRIMARY KEY("run_id","stage","symmetry")
);
--> statement-breakpoint
CREATE TABLE "runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"group_id" uuid NOT NULL,
	"recipe_id" uuid NOT NULL,
	"host_id" uuid NOT NULL,
	"host_account_id" uuid NOT NULL,
	"allocation_id" uuid NOT NULL,
	"submitted_by" uuid,
	"name" varchar(120) NOT NULL,
	"spec" jsonb NOT NULL,
	"plan" jsonb NOT NULL,
	"fingerprint" varchar(64) NOT NULL,
	"state" "run_state" DEFAULT 'queued' NOT NULL,
	"state_message" text,
	"cores" integer NOT NULL,
	"wall_time_minutes" integer NOT NULL,
	"reserved_core_seconds" bigint NOT NULL,
	"charged_core_seconds" bigint,
	"remote_dir" text NOT NULL,
	"submit_token" varchar(64) NOT NULL,
	"scheduler_job_id" varchar(64),
	"exit_code" integer,
	"log_offset_bytes" bigint DEFAULT 0 NOT NULL,
	"log_seq" integer DEFAULT 0 NOT NULL,
	"transport_attempts" integer DEFAULT 0 NOT NULL,
	"held_step" varchar(16),
	"held_from_state" "run_state",
	"staged_files" jsonb,
	"progress" jsonb,
	"next_retry_at" timestamp with time zone,
	"cancel_requested_at" timestamp with time zone,
	"resubmitted_from" uuid,
	"reused_from" uuid,
	"notify_by_email" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "allocations" ADD CONSTRAINT "allocations_group_id_groups_id_fk" FOREIGN KEY ("group_id") REFERENCES "public"."groups"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "allocations" ADD CONSTRAINT "allocations_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "codes" ADD CONSTRAINT "codes_group_id_groups_id_fk" FOREIGN KEY ("group_id") REFERENCES "public"."groups"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "codes" ADD CONSTRAINT "codes_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "host_accounts" ADD CONSTRAINT "host_accounts_host_id_hosts_id_fk" FOREIGN KEY ("host_id") REFERENCES "public"."hosts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "host_accounts" ADD CONSTRAINT "host_accounts_owner_user_id_users_id_fk" FOREIGN KEY ("owner_user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "hosts" ADD CONSTRAINT "hosts_group_id_groups_id_fk" FOREIGN KEY ("group_id") REFERENCES "public"."groups"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "hosts" ADD CONSTRAINT "hosts_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ledger_entries" ADD CONSTRAINT "ledger_entries_allocation_id_allocations_id_fk" FOREIGN KEY ("allocation_id") REFERENCES "public"."allocations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ledger_entries" ADD CONSTRAINT "ledger_entries_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recipes" ADD CONSTRAINT "recipes_group_id_groups_id_fk" FOREIGN KEY ("group_id") REFERENCES "public"."groups"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recipes" ADD CONSTRAINT "recipes_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_artifacts" ADD CONSTRAINT "run_artifacts_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_events" ADD CONSTRAINT "run_events_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_events" ADD CONSTRAINT "run_events_actor_user_id_users_id_fk" FOREIGN KEY ("actor_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_log_chunks" ADD CONSTRAINT "run_log_chunks_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_timings" ADD CONSTRAINT "run_timings_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_group_id_groups_id_fk" FOREIGN KEY ("group_id") REFERENCES "public"."groups"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_recipe_id_recipes_id_fk" FOREIGN KEY ("recipe_id") REFERENCES "public"."recipes"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_host_id_hosts_id_fk" FOREIGN KEY ("host_id") REFERENCES "public"."hosts"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_host_account_id_host_accounts_id_fk" FOREIGN KEY ("host_account_id") REFERENCES "public"."host_accounts"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_allocation_id_allocations_id_fk" FOREIGN KEY ("allocation_id") REFERENCES "public"."allocations"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_submitted_by_users_id_fk" FOREIGN KEY ("submitted_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "allocations_group_idx" ON "allocations" USING btree ("group_id","starts_at");--> statement-breakpoint
CREATE UNIQUE INDEX "codes_group_name_version_key" ON "codes" USING btree ("group_id","name","version");--> statement-breakpoint
CREATE INDEX "host_accounts_host_idx" ON "host_accounts" USING btree ("host_id");--> statement-breakpoint
CREATE UNIQUE INDEX "hosts_group_name_key" ON "hosts" USING btree ("group_id","name");--> statement-breakpoint
CREATE INDEX "ledger_allocation_idx" ON "ledger_entries" USING btree ("allocation_id");--> statement-breakpoint
CREATE INDEX "ledger_run_idx" ON "ledger_entries" USING btree ("run_id");--> statement-breakpoint
CREATE UNIQUE INDEX "recipes_group_name_key" ON "recipes" USING btree ("group_id","name");--> statement-breakpoint
CREATE UNIQUE INDEX "run_artifacts_name_key" ON "run_artifacts" USING btree ("run_id","stage","name");--> statement-breakpoint
CREATE INDEX "run_events_run_idx" ON "run_events" USING btree ("run_id","id");--> statement-breakpoint
CREATE INDEX "runs_group_created_idx" ON "runs" USING btree ("group_id","created_at");--> statement-breakpoint
CREATE INDEX "runs_host_state_idx" ON "runs" USING btree ("host_id","state");--> statement-breakpoint
CREATE INDEX "runs_fingerprint_idx" ON "runs" USING btree ("group_id","fingerprint");--> statement-breakpoint
CREATE UNIQUE INDEX "runs_submit_token_key" ON "runs" USING btree ("submit_token");