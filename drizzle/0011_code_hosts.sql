CREATE TABLE "code_hosts" (
	"code_id" uuid NOT NULL,
	"host_id" uuid NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "code_hosts_code_id_host_id_pk" PRIMARY KEY("code_id","host_id")
);
--> statement-breakpoint
ALTER TABLE "code_hosts" ADD CONSTRAINT "code_hosts_code_id_codes_id_fk" FOREIGN KEY ("code_id") REFERENCES "public"."codes"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "code_hosts" ADD CONSTRAINT "code_hosts_host_id_hosts_id_fk" FOREIGN KEY ("host_id") REFERENCES "public"."hosts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "code_hosts" ADD CONSTRAINT "code_hosts_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "code_hosts_host_idx" ON "code_hosts" USING btree ("host_id");