ALTER TABLE "host_accounts" DROP CONSTRAINT "host_accounts_owner_key";--> statement-breakpoint
ALTER TABLE "host_accounts" ADD COLUMN "disabled_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "host_accounts" ADD COLUMN "disabled_by" uuid;--> statement-breakpoint
ALTER TABLE "host_accounts" ADD CONSTRAINT "host_accounts_disabled_by_users_id_fk" FOREIGN KEY ("disabled_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "host_accounts_enabled_owner_key" ON "host_accounts" USING btree ("host_id",coalesce("owner_user_id", '00000000-0000-0000-0000-000000000000'::uuid)) WHERE "host_accounts"."disabled_at" is null;