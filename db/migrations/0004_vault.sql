CREATE TYPE "public"."analysis_state" AS ENUM('queued', 'running', 'done', 'failed');--> statement-breakpoint
CREATE TYPE "public"."mail_state" AS ENUM('pending', 'sending', 'sent', 'failed');--> statement-breakpoint
CREATE TYPE "public"."revision_status" AS ENUM('draft', 'submitted', 'released', 'rejected', 'superseded');--> statement-breakpoint
CREATE TYPE "public"."finding_severity" AS ENUM('error', 'warning', 'info');--> statement-breakpoint
CREATE TYPE "public"."signature_meaning" AS ENUM('submitted', 'released', 'rejected', 'waived');--> statement-breakpoint
CREATE TABLE "api_tokens" (
	"id" serial PRIMARY KEY NOT NULL,
	"user_id" integer NOT NULL,
	"name" varchar(100) NOT NULL,
	"token_hash" char(64) NOT NULL,
	"prefix" varchar(16) NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_used_at" timestamp with time zone,
	"revoked_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "machine_work_offsets" (
	"machine_id" integer NOT NULL,
	"code" varchar(16) NOT NULL,
	"x" double precision NOT NULL,
	"y" double precision NOT NULL,
	"z" double precision NOT NULL,
	"set_by" integer,
	"set_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "machine_work_offsets_machine_id_code_pk" PRIMARY KEY("machine_id","code")
);
--> statement-breakpoint
CREATE TABLE "mail_outbox" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "mail_outbox_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"message_id" varchar(200) NOT NULL,
	"kind" varchar(40) NOT NULL,
	"recipients" text[] NOT NULL,
	"subject" varchar(300) NOT NULL,
	"body" text NOT NULL,
	"revision_id" integer,
	"state" "mail_state" DEFAULT 'pending' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"next_attempt_at" timestamp with time zone DEFAULT now() NOT NULL,
	"locked_until" timestamp with time zone,
	"last_error" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "parts" (
	"id" serial PRIMARY KEY NOT NULL,
	"number" varchar(64) NOT NULL,
	"name" varchar(200) NOT NULL,
	"customer" varchar(200) DEFAULT '' NOT NULL,
	"material" varchar(200) DEFAULT '' NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "program_file_uploads" (
	"upload_id" uuid PRIMARY KEY NOT NULL,
	"bytes" "bytea" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "program_files" (
	"sha256" char(64) PRIMARY KEY NOT NULL,
	"size" bigint NOT NULL,
	"bytes" "bytea" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "programs" (
	"id" serial PRIMARY KEY NOT NULL,
	"program_number" varchar(32) NOT NULL,
	"title" varchar(200) NOT NULL,
	"part_id" integer NOT NULL,
	"machine_id" integer NOT NULL,
	"operation" varchar(100) DEFAULT '' NOT NULL,
	"parts_per_cycle" integer DEFAULT 1 NOT NULL,
	"safe_z" double precision,
	"created_by" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_revision_number" integer DEFAULT 0 NOT NULL,
	"latest_revision_id" integer,
	"released_revision_id" integer,
	CONSTRAINT "programs_parts_per_cycle" CHECK ("programs"."parts_per_cycle" between 1 and 100)
);
--> statement-breakpoint
CREATE TABLE "revision_analyses" (
	"revision_id" integer PRIMARY KEY NOT NULL,
	"state" "analysis_state" DEFAULT 'queued' NOT NULL,
	"error" text,
	"attempts" integer DEFAULT 0 NOT NULL,
	"request_seq" integer DEFAULT 1 NOT NULL,
	"run_seq" integer,
	"queued_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone,
	"engine_version" integer,
	"machine_id" integer,
	"safe_z" double precision,
	"parts_per_cycle" integer,
	"units" "units",
	"work_offsets" text[],
	"tool_count" integer,
	"tool_change_count" integer,
	"tool_sequence" integer[],
	"tool_order" varchar(16),
	"total_seconds" double precision,
	"feed_seconds" double precision,
	"rapid_seconds" double precision,
	"bounds" jsonb,
	"error_count" integer,
	"warning_count" integer,
	"info_count" integer,
	"result" jsonb
);
--> statement-breakpoint
CREATE TABLE "revision_findings" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "revision_findings_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"revision_id" integer NOT NULL,
	"rule" varchar(40) NOT NULL,
	"severity" "finding_severity" NOT NULL,
	"line" integer NOT NULL,
	"message" text NOT NULL,
	"hint" text NOT NULL
);
--> statement-breakpoint
CREATE TABLE "revision_offsets" (
	"revision_id" integer NOT NULL,
	"code" varchar(16) NOT NULL,
	"position" integer NOT NULL,
	"first_line" integer,
	"total_seconds" double precision NOT NULL,
	CONSTRAINT "revision_offsets_revision_id_code_pk" PRIMARY KEY("revision_id","code")
);
--> statement-breakpoint
CREATE TABLE "revision_tools" (
	"revision_id" integer NOT NULL,
	"tool_number" integer NOT NULL,
	"description" varchar(300),
	"length_offsets" integer[] NOT NULL,
	"first_line" integer NOT NULL,
	"loads" integer NOT NULL,
	"total_seconds" double precision NOT NULL,
	"lowest_z" double precision,
	CONSTRAINT "revision_tools_revision_id_tool_number_pk" PRIMARY KEY("revision_id","tool_number")
);
--> statement-breakpoint
CREATE TABLE "revisions" (
	"id" serial PRIMARY KEY NOT NULL,
	"program_id" integer NOT NULL,
	"number" integer NOT NULL,
	"file_name" varchar(120) NOT NULL,
	"sha256" char(64) NOT NULL,
	"size" bigint NOT NULL,
	"line_count" integer NOT NULL,
	"uploaded_by" integer NOT NULL,
	"note" varchar(2000) DEFAULT '' NOT NULL,
	"status" "revision_status" DEFAULT 'draft' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"submitted_at" timestamp with time zone,
	"decided_at" timestamp with time zone,
	"decided_by" integer,
	"superseded_at" timestamp with time zone,
	"superseded_by_id" integer
);
--> statement-breakpoint
CREATE TABLE "signatures" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "signatures_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"revision_id" integer NOT NULL,
	"signer_id" integer NOT NULL,
	"signer_name" varchar(100) NOT NULL,
	"signer_email" varchar(254) NOT NULL,
	"meaning" "signature_meaning" NOT NULL,
	"comment" text DEFAULT '' NOT NULL,
	"sha256" char(64) NOT NULL,
	"finding" jsonb,
	"signed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "api_tokens" ADD CONSTRAINT "api_tokens_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "machine_work_offsets" ADD CONSTRAINT "machine_work_offsets_machine_id_machines_id_fk" FOREIGN KEY ("machine_id") REFERENCES "public"."machines"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "machine_work_offsets" ADD CONSTRAINT "machine_work_offsets_set_by_users_id_fk" FOREIGN KEY ("set_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "parts" ADD CONSTRAINT "parts_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "programs" ADD CONSTRAINT "programs_part_id_parts_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."parts"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "programs" ADD CONSTRAINT "programs_machine_id_machines_id_fk" FOREIGN KEY ("machine_id") REFERENCES "public"."machines"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "programs" ADD CONSTRAINT "programs_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "revision_analyses" ADD CONSTRAINT "revision_analyses_revision_id_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "revision_findings" ADD CONSTRAINT "revision_findings_revision_id_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "revision_offsets" ADD CONSTRAINT "revision_offsets_revision_id_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "revision_tools" ADD CONSTRAINT "revision_tools_revision_id_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "revisions" ADD CONSTRAINT "revisions_program_id_programs_id_fk" FOREIGN KEY ("program_id") REFERENCES "public"."programs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "revisions" ADD CONSTRAINT "revisions_sha256_program_files_sha256_fk" FOREIGN KEY ("sha256") REFERENCES "public"."program_files"("sha256") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "revisions" ADD CONSTRAINT "revisions_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "revisions" ADD CONSTRAINT "revisions_decided_by_users_id_fk" FOREIGN KEY ("decided_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signatures" ADD CONSTRAINT "signatures_revision_id_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."revisions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signatures" ADD CONSTRAINT "signatures_signer_id_users_id_fk" FOREIGN KEY ("signer_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "api_tokens_hash_idx" ON "api_tokens" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "api_tokens_user_idx" ON "api_tokens" USING btree ("user_id");--> statement-breakpoint
CREATE UNIQUE INDEX "mail_outbox_message_id_idx" ON "mail_outbox" USING btree ("message_id");--> statement-breakpoint
CREATE INDEX "mail_outbox_due_idx" ON "mail_outbox" USING btree ("state","next_attempt_at");--> statement-breakpoint
CREATE UNIQUE INDEX "parts_number_lower_idx" ON "parts" USING btree (lower("number"));--> statement-breakpoint
CREATE UNIQUE INDEX "programs_machine_number_idx" ON "programs" USING btree ("machine_id",lower("program_number"));--> statement-breakpoint
CREATE INDEX "programs_part_idx" ON "programs" USING btree ("part_id");--> statement-breakpoint
CREATE INDEX "programs_number_idx" ON "programs" USING btree (lower("program_number"));--> statement-breakpoint
CREATE INDEX "programs_latest_idx" ON "programs" USING btree ("latest_revision_id");--> statement-breakpoint
CREATE INDEX "programs_updated_idx" ON "programs" USING btree ("updated_at");--> statement-breakpoint
CREATE INDEX "programs_title_idx" ON "programs" USING btree (lower("title"));--> statement-breakpoint
CREATE INDEX "revision_analyses_state_idx" ON "revision_analyses" USING btree ("state");--> statement-breakpoint
CREATE INDEX "revision_analyses_engine_idx" ON "revision_analyses" USING btree ("engine_version");--> statement-breakpoint
CREATE INDEX "revision_findings_revision_idx" ON "revision_findings" USING btree ("revision_id");--> statement-breakpoint
CREATE INDEX "revision_findings_rule_idx" ON "revision_findings" USING btree ("rule","revision_id");--> statement-breakpoint
CREATE INDEX "revision_offsets_code_idx" ON "revision_offsets" USING btree ("code","revision_id");--> statement-breakpoint
CREATE INDEX "revision_tools_number_idx" ON "revision_tools" USING btree ("tool_number","revision_id");--> statement-breakpoint
CREATE UNIQUE INDEX "revisions_program_number_idx" ON "revisions" USING btree ("program_id","number");--> statement-breakpoint
CREATE INDEX "revisions_sha256_idx" ON "revisions" USING btree ("sha256");--> statement-breakpoint
CREATE INDEX "revisions_status_idx" ON "revisions" USING btree ("status");--> statement-breakpoint
CREATE INDEX "revisions_uploaded_by_idx" ON "revisions" USING btree ("uploaded_by");--> statement-breakpoint
CREATE INDEX "signatures_revision_idx" ON "signatures" USING btree ("revision_id");