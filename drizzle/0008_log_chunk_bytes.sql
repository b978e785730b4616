-- Log chunks hold the job's log bytes exactly as the host wrote them (multi-byte characters, invalid
-- UTF-8, carriage returns, colour escapes), no longer decoded text. Chunks stored before hold decoded
-- text: they become its UTF-8 encoding (bytes that were invalid there were already U+FFFD).
ALTER TABLE "run_log_chunks" ADD COLUMN "content" bytea;--> statement-breakpoint
UPDATE "run_log_chunks" SET "content" = convert_to("text", 'UTF8');--> statement-breakpoint
ALTER TABLE "run_log_chunks" ALTER COLUMN "content" SET NOT NULL;--> statement-breakpoint
ALTER TABLE "run_log_chunks" DROP COLUMN "text";
