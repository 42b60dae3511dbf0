-- Runs signed off at the machine are a record: append-only, like signatures and audit_events.
CREATE OR REPLACE FUNCTION runs_refuse_change() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'runs are append-only: % refused', TG_OP
    USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER runs_no_update_delete
  BEFORE UPDATE OR DELETE ON runs
  FOR EACH ROW EXECUTE FUNCTION runs_refuse_change();
--> statement-breakpoint
CREATE TRIGGER runs_no_truncate
  BEFORE TRUNCATE ON runs
  FOR EACH STATEMENT EXECUTE FUNCTION runs_refuse_change();
