CREATE TABLE "live_events" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"branch_id" uuid NOT NULL,
	"kind" text NOT NULL,
	"user_id" uuid,
	"payload" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "live_events_at_idx" ON "live_events" USING btree ("at");--> statement-breakpoint
-- hand-written:
-- live_events: what the open screens hear (GET /api/events, apps/api/src/modules/events/). Triggers write the rows
-- in the committing transaction and announce each id with pg_notify('coilpath_live', id), delivered at commit;
-- every API process LISTENs once and hands the row to its connected screens that may see it. Who made the change
-- comes from the transaction-local setting `coilpath.actor` (a user id) that services set with `actAs`
-- (modules/events/actor.ts); changes made without it carry `by: null`.
CREATE OR REPLACE FUNCTION live_actor() RETURNS jsonb LANGUAGE plpgsql AS $$
DECLARE
  actor text := nullif(current_setting('coilpath.actor', true), '');
  who jsonb;
BEGIN
  IF actor IS NULL THEN
    RETURN NULL;
  END IF;
  SELECT jsonb_build_object('id', u.id, 'name', u.name) INTO who FROM users u WHERE u.id = actor::uuid;
  RETURN who;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION live_event(branch uuid, event_kind text, for_user uuid, body jsonb) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  new_id bigint;
BEGIN
  IF branch IS NULL THEN
    RETURN;
  END IF;
  INSERT INTO live_events (branch_id, kind, user_id, payload)
  VALUES (branch, event_kind, for_user, body || jsonb_build_object('by', live_actor()))
  RETURNING id INTO new_id;
  PERFORM pg_notify('coilpath_live', new_id::text);
END $$;
--> statement-breakpoint
-- Once per key per transaction (a transaction-local setting remembers it), as raise_roster_revision does.
CREATE OR REPLACE FUNCTION live_once(key text) RETURNS boolean LANGUAGE plpgsql AS $$
DECLARE
  flag text := 'coilpath.live_' || replace(key, '-', '');
BEGIN
  IF current_setting(flag, true) = 'sent' THEN
    RETURN false;
  END IF;
  PERFORM set_config(flag, 'sent', true);
  RETURN true;
END $$;
--> statement-breakpoint
-- The bookings a transaction touches, per branch, for the `roster` event (the Roster marks the chips another
-- dispatcher moved). Immediate row trigger: every statement has run before the deferred roster trigger reads them.
CREATE OR REPLACE FUNCTION live_note_booking() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  branch uuid := CASE WHEN TG_OP = 'DELETE' THEN OLD.branch_id ELSE NEW.branch_id END;
  booking uuid := CASE WHEN TG_OP = 'DELETE' THEN OLD.id ELSE NEW.id END;
  flag text := 'coilpath.live_bookings_' || replace(branch::text, '-', '');
  noted text := coalesce(current_setting(flag, true), '');
BEGIN
  -- Up to 50 bookings are named; beyond that (evening out a week, a bulk load) the event says `*`: many.
  IF noted = '*' THEN
    RETURN NULL;
  END IF;
  PERFORM set_config(flag, CASE WHEN length(noted) >= 50 * 37 THEN '*' ELSE noted || booking::text || ',' END, true);
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER live_note_booking AFTER INSERT OR UPDATE OR DELETE ON bookings
  FOR EACH ROW EXECUTE FUNCTION live_note_booking();
--> statement-breakpoint
-- The roster revision (migrations 0004, 0006) now also writes the branch's `roster` event with the new revision.
CREATE OR REPLACE FUNCTION raise_roster_revision(branch uuid) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  flag text;
  rev bigint;
  booked text;
BEGIN
  IF branch IS NULL THEN
    RETURN;
  END IF;
  flag := 'coilpath.roster_' || replace(branch::text, '-', '');
  IF current_setting(flag, true) = 'raised' THEN
    RETURN;
  END IF;
  INSERT INTO roster_revisions (branch_id, revision) VALUES (branch, 1)
  ON CONFLICT (branch_id) DO UPDATE SET revision = roster_revisions.revision + 1
  RETURNING revision INTO rev;
  PERFORM pg_notify('coilpath_roster', branch::text);
  PERFORM set_config(flag, 'raised', true);
  booked := rtrim(coalesce(current_setting('coilpath.live_bookings_' || replace(branch::text, '-', ''), true), ''), ',');
  PERFORM live_event(branch, 'roster', NULL, jsonb_build_object(
    'revision', rev,
    'bookings', CASE WHEN booked = '' THEN '[]'::jsonb WHEN booked = '*' THEN 'null'::jsonb ELSE to_jsonb(string_to_array(booked, ',')) END));
END $$;
--> statement-breakpoint
-- `day`: once per technician per transaction, at commit, for the technician whose bookings or visits changed
-- (both technicians of a reassignment) or whose booked work order changed.
CREATE OR REPLACE FUNCTION live_day(branch uuid, tech uuid) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  IF branch IS NULL OR tech IS NULL THEN
    RETURN;
  END IF;
  IF live_once('day_' || tech::text) THEN
    PERFORM live_event(branch, 'day', tech, '{}'::jsonb);
  END IF;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION live_day_on_tech_row() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP <> 'INSERT' THEN
    PERFORM live_day(OLD.branch_id, OLD.tech_id);
  END IF;
  IF TG_OP <> 'DELETE' THEN
    PERFORM live_day(NEW.branch_id, NEW.tech_id);
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION live_day_on_work_order() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  b record;
BEGIN
  FOR b IN SELECT DISTINCT bk.branch_id, bk.tech_id FROM bookings bk
           WHERE bk.work_order_id = CASE WHEN TG_OP = 'DELETE' THEN OLD.id ELSE NEW.id END LOOP
    PERFORM live_day(b.branch_id, b.tech_id);
  END LOOP;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER live_day AFTER INSERT OR UPDATE OR DELETE ON bookings
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION live_day_on_tech_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER live_day AFTER INSERT OR DELETE OR UPDATE OF tech_id, booking_id, en_route_at, on_site_at, closed_at ON visits
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION live_day_on_tech_row();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER live_day AFTER UPDATE ON work_orders
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION live_day_on_work_order();
--> statement-breakpoint
-- `visit`: a stop's state (en route, on site, closed) as the technician taps it.
CREATE OR REPLACE FUNCTION live_visit_state() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM live_event(NEW.branch_id, 'visit', NULL, jsonb_build_object(
    'visitId', NEW.id,
    'bookingId', NEW.booking_id,
    'workOrderId', NEW.work_order_id,
    'techId', NEW.tech_id,
    'state', CASE WHEN NEW.closed_at IS NOT NULL THEN 'closed'
                  WHEN NEW.on_site_at IS NOT NULL THEN 'on_site'
                  WHEN NEW.en_route_at IS NOT NULL THEN 'en_route'
                  ELSE 'booked' END));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER live_visit_state AFTER UPDATE OF en_route_at, on_site_at, closed_at ON visits FOR EACH ROW
  WHEN (OLD.en_route_at IS DISTINCT FROM NEW.en_route_at OR OLD.on_site_at IS DISTINCT FROM NEW.on_site_at OR OLD.closed_at IS DISTINCT FROM NEW.closed_at)
  EXECUTE FUNCTION live_visit_state();
--> statement-breakpoint
-- `alarm` and `leak-case`: once per branch per transaction (a CSV import of many alarms is one event).
CREATE OR REPLACE FUNCTION live_branch_kind() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  branch uuid := CASE WHEN TG_OP = 'DELETE' THEN OLD.branch_id ELSE NEW.branch_id END;
BEGIN
  IF live_once(TG_ARGV[0] || '_' || branch::text) THEN
    PERFORM live_event(branch, TG_ARGV[0], NULL, '{}'::jsonb);
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER live_alarm AFTER INSERT OR UPDATE OR DELETE ON alarms
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION live_branch_kind('alarm');
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER live_leak_case AFTER INSERT OR UPDATE OR DELETE ON leak_cases
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION live_branch_kind('leak-case');
