CREATE TABLE "audit_rollups" (
	"key" varchar(200) PRIMARY KEY NOT NULL,
	"event" jsonb NOT NULL,
	"first_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_at" timestamp with time zone DEFAULT now() NOT NULL,
	"window_end" timestamp with time zone NOT NULL,
	"repeats" integer DEFAULT 0 NOT NULL,
	"samples" jsonb DEFAULT '[]'::jsonb NOT NULL
);
--> statement-breakpoint
CREATE INDEX "audit_rollups_window_end_idx" ON "audit_rollups" USING btree ("window_end");