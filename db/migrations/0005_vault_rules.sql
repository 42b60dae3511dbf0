-- Rules of the program vault that drizzle's schema cannot express.

-- At most one released revision per program.
CREATE UNIQUE INDEX revisions_one_released_idx ON revisions (program_id) WHERE status = 'released';
--> statement-breakpoint
-- Program files compress well and are read whole; lz4 is several times faster than the default pglz.
ALTER TABLE program_files ALTER COLUMN bytes SET COMPRESSION lz4;
--> statement-breakpoint
-- Stored bytes never change: a file row is written once and only removed when no revision refers to it.
CREATE OR REPLACE FUNCTION program_files_refuse_update() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'program_files rows are immutable: UPDATE refused'
    USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER program_files_no_update
  BEFORE UPDATE ON program_files
  FOR EACH ROW EXECUTE FUNCTION program_files_refuse_update();
--> statement-breakpoint
-- A revision's identity (program, number, hash, size) never changes. A released revision changes in one way
-- only: it is superseded (status, superseded_at, superseded_by_id). A superseded revision never changes.
-- Only drafts may be deleted.
CREATE OR REPLACE FUNCTION revisions_guard() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    IF OLD.status <> 'draft' THEN
      RAISE EXCEPTION 'revision % is %: only drafts may be deleted', OLD.id, OLD.status
        USING ERRCODE = 'insufficient_privilege';
    END IF;
    RETURN OLD;
  END IF;
  IF NEW.id <> OLD.id OR NEW.program_id <> OLD.program_id OR NEW.number <> OLD.number
     OR NEW.sha256 <> OLD.sha256 OR NEW.size <> OLD.size OR NEW.line_count <> OLD.line_count
     OR NEW.uploaded_by <> OLD.uploaded_by OR NEW.created_at <> OLD.created_at THEN
    RAISE EXCEPTION 'revision %: its program, number, hash and size never change', OLD.id
      USING ERRCODE = 'insufficient_privilege';
  END IF;
  IF OLD.status = 'superseded' THEN
    RAISE EXCEPTION 'revision % is superseded and cannot change', OLD.id
      USING ERRCODE = 'insufficient_privilege';
  END IF;
  IF OLD.status = 'released' THEN
    IF NEW.status <> 'superseded'
       OR NEW.file_name IS DISTINCT FROM OLD.file_name OR NEW.note IS DISTINCT FROM OLD.note
       OR NEW.submitted_at IS DISTINCT FROM OLD.submitted_at OR NEW.decided_at IS DISTINCT FROM OLD.decided_at
       OR NEW.decided_by IS DISTINCT FROM OLD.decided_by THEN
      RAISE EXCEPTION 'revision % is released: the only change allowed is its supersession', OLD.id
        USING ERRCODE = 'insufficient_privilege';
    END IF;
  END IF;
  RETURN NEW;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER revisions_guard
  BEFORE UPDATE OR DELETE ON revisions
  FOR EACH ROW EXECUTE FUNCTION revisions_guard();
--> statement-breakpoint
-- Signatures are a record: append-only, like audit_events.
CREATE OR REPLACE FUNCTION signatures_refuse_change() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'signatures are append-only: % refused', TG_OP
    USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER signatures_no_update_delete
  BEFORE UPDATE OR DELETE ON signatures
  FOR EACH ROW EXECUTE FUNCTION signatures_refuse_change();
--> statement-breakpoint
CREATE TRIGGER signatures_no_truncate
  BEFORE TRUNCATE ON signatures
  FOR EACH STATEMENT EXECUTE FUNCTION signatures_refuse_change();
--> statement-breakpoint
-- Foreign keys between programs and revisions in both directions (drizzle cannot declare the cycle).
ALTER TABLE programs ADD CONSTRAINT programs_latest_revision_fk
  FOREIGN KEY (latest_revision_id) REFERENCES revisions (id) ON DELETE SET NULL DEFERRABLE INITIALLY DEFERRED;
--> statement-breakpoint
ALTER TABLE programs ADD CONSTRAINT programs_released_revision_fk
  FOREIGN KEY (released_revision_id) REFERENCES revisions (id) ON DELETE RESTRICT DEFERRABLE INITIALLY DEFERRED;
--> statement-breakpoint
-- Lists search program numbers and titles by substring.
CREATE EXTENSION IF NOT EXISTS pg_trgm;
--> statement-breakpoint
CREATE INDEX programs_search_trgm_idx ON programs USING gin ((lower(program_number || ' ' || title)) gin_trgm_ops);
--> statement-breakpoint
-- Staged bytes of uploads in progress: no WAL, emptied by crash recovery.
ALTER TABLE program_file_uploads SET UNLOGGED;
--> statement-breakpoint
-- A program page lists the audit events of its revisions, deleted drafts included (their events name the program).
CREATE INDEX audit_events_revision_program_idx ON audit_events ((details->>'programId')) WHERE object_type = 'revision';
--> statement-breakpoint
-- Staged bytes are written once and read once: no compression on the way in.
ALTER TABLE program_file_uploads ALTER COLUMN bytes SET STORAGE EXTERNAL;
