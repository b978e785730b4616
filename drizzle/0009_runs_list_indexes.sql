DROP INDEX "runs_group_created_idx";--> statement-breakpoint
CREATE INDEX "runs_group_created_id_idx" ON "runs" USING btree ("group_id","created_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "runs_group_updated_id_idx" ON "runs" USING btree ("group_id","updated_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "runs_group_state_created_idx" ON "runs" USING btree ("group_id","state","created_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "runs_group_name_id_idx" ON "runs" USING btree ("group_id","name","id");--> statement-breakpoint
CREATE INDEX "runs_group_target_created_idx" ON "runs" USING btree ("group_id","target_id","created_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "runs_group_recipe_created_idx" ON "runs" USING btree ("group_id","recipe_id","created_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "runs_group_host_created_idx" ON "runs" USING btree ("group_id","host_id","created_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "runs_group_submitter_created_idx" ON "runs" USING btree ("group_id","submitted_by","created_at" DESC NULLS LAST,"id" DESC NULLS LAST);