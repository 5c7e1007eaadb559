-- An upgrade runs the migrations it lacks in one transaction: earlier ones (0017's backfill of visits, 0010's fold)
-- queue the deferred triggers of roster_revisions and fix_quality_sums, and a table with pending trigger events
-- cannot be altered; they run now (as in 0010), and are deferred again at the end.
SET CONSTRAINTS ALL IMMEDIATE;
--> statement-breakpoint
CREATE TABLE "briefing_revisions" (
	"site_id" uuid PRIMARY KEY NOT NULL,
	"revision" bigint DEFAULT 0 NOT NULL
);
--> statement-breakpoint
ALTER TABLE "visits" ADD COLUMN "unit_id" uuid;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_unit_id_units_id_fk" FOREIGN KEY ("unit_id") REFERENCES "public"."units"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "visits_unit_closed_idx" ON "visits" USING btree ("unit_id","closed_at");--> statement-breakpoint
-- visits.unit_id: the work order's unit, so that a unit's last closed visit is one descent of
-- visits_unit_closed_idx instead of a walk over every work order of the unit and their visits. Filled here for
-- the visits there are (with the visits' own triggers off: nothing they keep reads this column), then by a
-- trigger on insert and when a work order's unit changes.
ALTER TABLE "visits" DISABLE TRIGGER USER;
--> statement-breakpoint
UPDATE "visits" v SET "unit_id" = w."unit_id" FROM "work_orders" w WHERE w."id" = v."work_order_id" AND w."unit_id" IS NOT NULL;
--> statement-breakpoint
ALTER TABLE "visits" ENABLE TRIGGER USER;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION visit_unit_from_work_order() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  SELECT w.unit_id INTO NEW.unit_id FROM work_orders w WHERE w.id = NEW.work_order_id;
  RETURN NEW;
END $$;
--> statement-breakpoint
CREATE TRIGGER visit_unit BEFORE INSERT OR UPDATE OF work_order_id ON visits
  FOR EACH ROW EXECUTE FUNCTION visit_unit_from_work_order();
--> statement-breakpoint
CREATE OR REPLACE FUNCTION work_order_unit_to_visits() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  UPDATE visits SET unit_id = NEW.unit_id WHERE work_order_id = NEW.id AND unit_id IS DISTINCT FROM NEW.unit_id;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER visit_unit AFTER UPDATE OF unit_id ON work_orders
  FOR EACH ROW WHEN (OLD.unit_id IS DISTINCT FROM NEW.unit_id) EXECUTE FUNCTION work_order_unit_to_visits();
--> statement-breakpoint
-- briefing_revisions: a counter per site raised at the commit of any change a unit briefing of that site shows
-- (apps/api/src/modules/visits/briefing.service.ts keeps its answers by it). Deferred constraint triggers, as
-- for roster_revisions (migration 0004): raised once per site per transaction, after the transaction's other
-- locks, and notified on `coilpath_site` so that PGlite's one process keeps the revisions in memory.
CREATE OR REPLACE FUNCTION raise_briefing_revision(site uuid) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  flag text;
BEGIN
  IF site IS NULL THEN
    RETURN;
  END IF;
  flag := 'coilpath.briefing_' || replace(site::text, '-', '');
  IF current_setting(flag, true) = 'raised' THEN
    RETURN;
  END IF;
  INSERT INTO briefing_revisions (site_id, revision) VALUES (site, 1)
  ON CONFLICT (site_id) DO UPDATE SET revision = briefing_revisions.revision + 1;
  PERFORM pg_notify('coilpath_site', site::text);
  PERFORM set_config(flag, 'raised', true);
END $$;
--> statement-breakpoint
-- Rows that name their site (units, work orders), and the site itself.
CREATE OR REPLACE FUNCTION briefing_revision_on_site_row() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP <> 'INSERT' THEN
    PERFORM raise_briefing_revision(OLD.site_id);
  END IF;
  IF TG_OP <> 'DELETE' THEN
    PERFORM raise_briefing_revision(NEW.site_id);
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION briefing_revision_on_site() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    PERFORM raise_briefing_revision(OLD.id);
  ELSE
    PERFORM raise_briefing_revision(NEW.id);
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
-- Rows that name their unit: circuits, readings, leak cases, refrigerant entries, alarms, photos (a photo of a
-- visit only, without a unit, is in no briefing), and findings (also through their visit: a finding without a
-- unit is the visit's, shown in the briefings of the visit's site).
CREATE OR REPLACE FUNCTION raise_briefing_revision_of_unit(unit uuid) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  IF unit IS NOT NULL THEN
    PERFORM raise_briefing_revision((SELECT u.site_id FROM units u WHERE u.id = unit));
  END IF;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION briefing_revision_on_unit_row() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP <> 'INSERT' THEN
    PERFORM raise_briefing_revision_of_unit(OLD.unit_id);
  END IF;
  IF TG_OP <> 'DELETE' THEN
    PERFORM raise_briefing_revision_of_unit(NEW.unit_id);
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION raise_briefing_revision_of_work_order(work_order uuid) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  PERFORM raise_briefing_revision((SELECT w.site_id FROM work_orders w WHERE w.id = work_order));
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION briefing_revision_on_visit_row() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP <> 'INSERT' THEN
    PERFORM raise_briefing_revision_of_work_order(OLD.work_order_id);
  END IF;
  IF TG_OP <> 'DELETE' THEN
    PERFORM raise_briefing_revision_of_work_order(NEW.work_order_id);
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION briefing_revision_on_visit_child() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP <> 'INSERT' THEN
    PERFORM raise_briefing_revision_of_work_order((SELECT v.work_order_id FROM visits v WHERE v.id = OLD.visit_id));
  END IF;
  IF TG_OP <> 'DELETE' THEN
    PERFORM raise_briefing_revision_of_work_order((SELECT v.work_order_id FROM visits v WHERE v.id = NEW.visit_id));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
-- A branch's settings a briefing shows (its zone's year, repeat-alarm rule, units) and a technician's name
-- (the last visit's): every site of the branch.
CREATE OR REPLACE FUNCTION briefing_revision_on_branch_wide() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  branch uuid;
  s uuid;
BEGIN
  IF TG_TABLE_NAME = 'branches' THEN
    branch := NEW.id;
  ELSE
    branch := NEW.branch_id;
  END IF;
  FOR s IN SELECT id FROM sites WHERE branch IS NULL OR branch_id = branch LOOP
    PERFORM raise_briefing_revision(s);
  END LOOP;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON sites
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_site();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON units
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_site_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON work_orders
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_site_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON circuits
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_unit_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON readings
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_unit_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON leak_cases
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_unit_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON refrigerant_events
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_unit_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON alarms
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_unit_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON attachments
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_unit_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON findings
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_unit_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision_visit AFTER INSERT OR UPDATE OR DELETE ON findings
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_visit_child();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER INSERT OR UPDATE OR DELETE ON visits
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_visit_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER UPDATE OF time_zone, repeat_alarm_count, repeat_alarm_days, unit_system ON branches
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_branch_wide();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER briefing_revision AFTER UPDATE OF name ON users
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION briefing_revision_on_branch_wide();
--> statement-breakpoint
SET CONSTRAINTS ALL DEFERRED;
