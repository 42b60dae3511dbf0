-- A program page lists the audit events of its revisions, deleted drafts included (their events name the program).
CREATE INDEX audit_events_revision_program_idx ON audit_events ((details->>'programId')) WHERE object_type = 'revision';
