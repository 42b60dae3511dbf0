CREATE TYPE "public"."dialect" AS ENUM('common', 'strict-ngc');--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "dialect" "dialect" DEFAULT 'common' NOT NULL;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "arc_tolerance" double precision;--> statement-breakpoint
ALTER TABLE "machines" ADD CONSTRAINT "machines_arc_tolerance" CHECK ("machines"."arc_tolerance" is null or ("machines"."arc_tolerance" > 0 and "machines"."arc_tolerance" <= 1));