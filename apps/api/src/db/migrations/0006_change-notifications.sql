-- Change notifications for the embedded database. PGlite is one process, so that process hears every commit:
-- it keeps the roster revisions and signed-in users in memory from these notifications instead of asking the
-- database on every request (apps/api/src/db/client.ts). On PostgreSQL nobody listens and the revisions are
-- read from roster_revisions, which stays the authority (several API processes).
CREATE OR REPLACE FUNCTION raise_roster_revision(branch uuid) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  flag text;
BEGIN
  IF branch IS NULL THEN
    RETURN;
  END IF;
  flag := 'coilpath.roster_' || replace(branch::text, '-', '');
  IF current_setting(flag, true) = 'raised' THEN
    RETURN;
  END IF;
  INSERT INTO roster_revisions (branch_id, revision) VALUES (branch, 1)
  ON CONFLICT (branch_id) DO UPDATE SET revision = roster_revisions.revision + 1;
  PERFORM pg_notify('coilpath_roster', branch::text);
  PERFORM set_config(flag, 'raised', true);
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION notify_user_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('coilpath_user', OLD.id::text);
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER user_change AFTER UPDATE OR DELETE ON users FOR EACH ROW EXECUTE FUNCTION notify_user_change();
