CREATE TYPE "public"."results_state" AS ENUM('pending', 'derived', 'none', 'failed');--> statement-breakpoint
CREATE TABLE "run_results" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"run_id" uuid NOT NULL,
	"kind" varchar(32) NOT NULL,
	"process" varchar(32) NOT NULL,
	"irrep" varchar(32),
	"label" varchar(64) DEFAULT '' NOT NULL,
	"columns" jsonb NOT NULL,
	"column_order" jsonb NOT NULL,
	"fit" jsonb,
	"method" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "target_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"target_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"atoms" jsonb NOT NULL,
	"charge" integer NOT NULL,
	"multiplicity" integer NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"derived" jsonb NOT NULL,
	"formula" varchar(200) NOT NULL,
	"point_group" varchar(16) NOT NULL,
	"abelian_subgroup" varchar(8) NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "targets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"group_id" uuid NOT NULL,
	"name" varchar(120) NOT NULL,
	"parent_target_id" uuid,
	"latest_version" integer DEFAULT 1 NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "target_id" uuid;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "target_version_id" uuid;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "results_state" "results_state";--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "results_message" text;--> statement-breakpoint
ALTER TABLE "run_results" ADD CONSTRAINT "run_results_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "target_versions" ADD CONSTRAINT "target_versions_target_id_targets_id_fk" FOREIGN KEY ("target_id") REFERENCES "public"."targets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "target_versions" ADD CONSTRAINT "target_versions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "targets" ADD CONSTRAINT "targets_group_id_groups_id_fk" FOREIGN KEY ("group_id") REFERENCES "public"."groups"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "targets" ADD CONSTRAINT "targets_parent_target_id_targets_id_fk" FOREIGN KEY ("parent_target_id") REFERENCES "public"."targets"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "targets" ADD CONSTRAINT "targets_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "run_results_key" ON "run_results" USING btree ("run_id","kind","process",coalesce("irrep", ''),"label");--> statement-breakpoint
CREATE INDEX "run_results_run_idx" ON "run_results" USING btree ("run_id");--> statement-breakpoint
CREATE UNIQUE INDEX "target_versions_target_version_key" ON "target_versions" USING btree ("target_id","version");--> statement-breakpoint
CREATE UNIQUE INDEX "targets_group_name_key" ON "targets" USING btree ("group_id",lower("name"));--> statement-breakpoint
CREATE INDEX "targets_parent_idx" ON "targets" USING btree ("parent_target_id");--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_target_id_targets_id_fk" FOREIGN KEY ("target_id") REFERENCES "public"."targets"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_target_version_id_target_versions_id_fk" FOREIGN KEY ("target_version_id") REFERENCES "public"."target_versions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "runs_target_idx" ON "runs" USING btree ("target_id");