ALTER TABLE "codes" ADD COLUMN "retired_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "codes" ADD COLUMN "retired_by" uuid;--> statement-breakpoint
ALTER TABLE "codes" ADD CONSTRAINT "codes_retired_by_users_id_fk" FOREIGN KEY ("retired_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;