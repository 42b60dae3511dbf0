CREATE TYPE "public"."role" AS ENUM('admin', 'lead', 'programmer', 'operator');--> statement-breakpoint
CREATE TYPE "public"."units" AS ENUM('mm', 'inch');--> statement-breakpoint
CREATE TABLE "audit_events" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "audit_events_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"actor_id" integer,
	"actor_email" varchar(254),
	"action" varchar(64) NOT NULL,
	"object_type" varchar(32),
	"object_id" varchar(64),
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"details" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"ip" "inet"
);
--> statement-breakpoint
CREATE TABLE "machines" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" varchar(100) NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"units" "units" NOT NULL,
	"travel_x_min" double precision NOT NULL,
	"travel_x_max" double precision NOT NULL,
	"travel_y_min" double precision NOT NULL,
	"travel_y_max" double precision NOT NULL,
	"travel_z_min" double precision NOT NULL,
	"travel_z_max" double precision NOT NULL,
	"rapid_rate" double precision NOT NULL,
	"max_feed" double precision NOT NULL,
	"max_spindle" double precision NOT NULL,
	"acceleration" double precision NOT NULL,
	"tool_change_seconds" double precision NOT NULL,
	"manual_tool_change" boolean NOT NULL,
	"spindle_program_controlled" boolean NOT NULL,
	"h_must_equal_t" boolean DEFAULT true NOT NULL,
	"safe_z" double precision NOT NULL,
	"work_offset_count" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "machines_travel_x" CHECK ("machines"."travel_x_min" < "machines"."travel_x_max"),
	CONSTRAINT "machines_travel_y" CHECK ("machines"."travel_y_min" < "machines"."travel_y_max"),
	CONSTRAINT "machines_travel_z" CHECK ("machines"."travel_z_min" < "machines"."travel_z_max"),
	CONSTRAINT "machines_positive" CHECK ("machines"."rapid_rate" > 0 and "machines"."max_feed" > 0 and "machines"."max_spindle" > 0 and "machines"."acceleration" > 0 and "machines"."tool_change_seconds" >= 0 and "machines"."work_offset_count" between 1 and 300)
);
--> statement-breakpoint
CREATE TABLE "rate_limits" (
	"key" varchar(255) PRIMARY KEY NOT NULL,
	"points" integer DEFAULT 0 NOT NULL,
	"expire" bigint
);
--> statement-breakpoint
CREATE TABLE "sessions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" integer NOT NULL,
	"session_version" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_seen_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"revoked_at" timestamp with time zone,
	"ip" "inet",
	"user_agent" varchar(300)
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" serial PRIMARY KEY NOT NULL,
	"email" varchar(254) NOT NULL,
	"display_name" varchar(100) NOT NULL,
	"role" "role" NOT NULL,
	"password_hash" text NOT NULL,
	"disabled" boolean DEFAULT false NOT NULL,
	"session_version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "audit_events" ADD CONSTRAINT "audit_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sessions" ADD CONSTRAINT "sessions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "audit_events_at_idx" ON "audit_events" USING btree ("at");--> statement-breakpoint
CREATE INDEX "audit_events_actor_idx" ON "audit_events" USING btree ("actor_id");--> statement-breakpoint
CREATE INDEX "audit_events_object_idx" ON "audit_events" USING btree ("object_type","object_id");--> statement-breakpoint
CREATE INDEX "audit_events_action_idx" ON "audit_events" USING btree ("action");--> statement-breakpoint
CREATE UNIQUE INDEX "machines_name_lower_idx" ON "machines" USING btree (lower("name"));--> statement-breakpoint
CREATE INDEX "sessions_user_idx" ON "sessions" USING btree ("user_id");--> statement-breakpoint
CREATE UNIQUE INDEX "users_email_lower_idx" ON "users" USING btree (lower("email"));