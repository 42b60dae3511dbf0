CREATE TABLE "runs" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "runs_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"revision_id" integer NOT NULL,
	"program_id" integer NOT NULL,
	"machine_id" integer NOT NULL,
	"sha256" char(64) NOT NULL,
	"operator_id" integer NOT NULL,
	"operator_name" varchar(100) NOT NULL,
	"operator_email" varchar(254) NOT NULL,
	"offsets" jsonb NOT NULL,
	"tools" jsonb NOT NULL,
	"identity_checked" boolean NOT NULL,
	"dry_run" boolean NOT NULL,
	"quantity" integer,
	"signed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "runs_checked" CHECK ("runs"."identity_checked" and "runs"."dry_run"),
	CONSTRAINT "runs_quantity" CHECK ("runs"."quantity" is null or "runs"."quantity" between 1 and 100000)
);
--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_revision_id_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."revisions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_program_id_programs_id_fk" FOREIGN KEY ("program_id") REFERENCES "public"."programs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_machine_id_machines_id_fk" FOREIGN KEY ("machine_id") REFERENCES "public"."machines"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_operator_id_users_id_fk" FOREIGN KEY ("operator_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "runs_signed_at_idx" ON "runs" USING btree ("signed_at");--> statement-breakpoint
CREATE INDEX "runs_revision_idx" ON "runs" USING btree ("revision_id");--> statement-breakpoint
CREATE INDEX "runs_program_idx" ON "runs" USING btree ("program_id","signed_at");--> statement-breakpoint
CREATE INDEX "runs_machine_idx" ON "runs" USING btree ("machine_id","signed_at");--> statement-breakpoint
CREATE INDEX "runs_operator_idx" ON "runs" USING btree ("operator_id","signed_at");