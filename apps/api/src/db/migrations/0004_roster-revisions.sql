CREATE TABLE "roster_revisions" (
	"branch_id" uuid PRIMARY KEY NOT NULL,
	"revision" bigint DEFAULT 0 NOT NULL
);
--> statement-breakpoint
-- roster_revisions: a counter per branch that rises whenever a row the Roster shows changes, so an API
-- process may reuse a week it read before while the counter stands (apps/api/src/lib/revision-cache.ts).
-- The triggers are deferred constraint triggers: the counter is raised at commit, after every other lock the
-- transaction takes (no lock-order cycles with the technician row locks of booking), and only once per
-- branch per transaction (a transaction-local setting remembers it).
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
  PERFORM set_config(flag, 'raised', true);
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION roster_revision_on_branch_row() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP <> 'INSERT' THEN
    PERFORM raise_roster_revision(OLD.branch_id);
  END IF;
  IF TG_OP <> 'DELETE' THEN
    PERFORM raise_roster_revision(NEW.branch_id);
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION roster_revision_on_branch() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM raise_roster_revision(CASE WHEN TG_OP = 'DELETE' THEN OLD.id ELSE NEW.id END);
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER roster_revision AFTER INSERT OR UPDATE OR DELETE ON bookings
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION roster_revision_on_branch_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER roster_revision AFTER INSERT OR UPDATE OR DELETE ON work_orders
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION roster_revision_on_branch_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER roster_revision AFTER INSERT OR UPDATE OR DELETE ON visits
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION roster_revision_on_branch_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER roster_revision AFTER INSERT OR UPDATE OR DELETE ON sites
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION roster_revision_on_branch_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER roster_revision AFTER INSERT OR UPDATE OR DELETE ON units
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION roster_revision_on_branch_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER roster_revision AFTER INSERT OR UPDATE OR DELETE ON leak_cases
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION roster_revision_on_branch_row();
--> statement-breakpoint
-- Technicians: only what the Roster shows or plans with (not sign-ins, calendar feeds or passwords).
CREATE CONSTRAINT TRIGGER roster_revision
  AFTER INSERT OR DELETE OR UPDATE OF name, role, branch_id, skills, epa608_type, working_hours, start_lat, start_lon, color_index, active
  ON users DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION roster_revision_on_branch_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER roster_revision AFTER INSERT OR UPDATE OR DELETE ON branches
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION roster_revision_on_branch();
