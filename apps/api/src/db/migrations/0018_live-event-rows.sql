-- Custom SQL migration file, put your code below! --
-- hand-written:
-- The live events name the rows they concern, so a screen can say "Changed by …" beside the row someone else
-- changed: the `roster` event names its work orders (the unplaced queue, the Watchlist's return visits) as it
-- names its bookings (migration 0016), the `alarm` event its units (the Watchlist's repeat-alarm rows), the
-- `leak-case` event its leak cases. An immediate row trigger notes each row in a transaction-local setting per
-- branch; the deferred triggers that write the events at commit read the notes (every statement has run).
-- Up to 50 rows are named; beyond that (an agreement's plan, a CSV import) the list is `null`: many.
-- TG_ARGV: the list's name and the column that names the row, `id` or `unit_id` (the three tables have both).
CREATE OR REPLACE FUNCTION live_note_row() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  r record;
  item text;
  flag text;
  noted text;
BEGIN
  IF TG_OP = 'DELETE' THEN
    r := OLD;
  ELSE
    r := NEW;
  END IF;
  IF r.branch_id IS NULL THEN
    RETURN NULL;
  END IF;
  flag := 'coilpath.live_' || TG_ARGV[0] || '_' || replace(r.branch_id::text, '-', '');
  noted := coalesce(current_setting(flag, true), '');
  IF noted = '*' THEN
    RETURN NULL;
  END IF;
  IF TG_ARGV[1] = 'unit_id' THEN
    item := r.unit_id::text;
  ELSE
    item := r.id::text;
  END IF;
  IF item IS NULL OR position(item || ',' in noted) > 0 THEN
    RETURN NULL;
  END IF;
  PERFORM set_config(flag, CASE WHEN length(noted) >= 50 * 37 THEN '*' ELSE noted || item || ',' END, true);
  RETURN NULL;
END $$;
--> statement-breakpoint
-- The rows of `list` noted for `branch` in this transaction: a JSON array of ids, [] for none, null for many.
CREATE OR REPLACE FUNCTION live_noted(list text, branch uuid) RETURNS jsonb LANGUAGE plpgsql AS $$
DECLARE
  noted text := rtrim(coalesce(current_setting('coilpath.live_' || list || '_' || replace(branch::text, '-', ''), true), ''), ',');
BEGIN
  RETURN CASE WHEN noted = '' THEN '[]'::jsonb WHEN noted = '*' THEN 'null'::jsonb ELSE to_jsonb(string_to_array(noted, ',')) END;
END $$;
--> statement-breakpoint
CREATE TRIGGER live_note_work_order AFTER INSERT OR UPDATE OR DELETE ON work_orders
  FOR EACH ROW EXECUTE FUNCTION live_note_row('work_orders', 'id');
--> statement-breakpoint
CREATE TRIGGER live_note_alarm AFTER INSERT OR UPDATE OR DELETE ON alarms
  FOR EACH ROW EXECUTE FUNCTION live_note_row('alarm_units', 'unit_id');
--> statement-breakpoint
CREATE TRIGGER live_note_leak_case AFTER INSERT OR UPDATE OR DELETE ON leak_cases
  FOR EACH ROW EXECUTE FUNCTION live_note_row('leak_cases', 'id');
--> statement-breakpoint
-- As in migration 0016, and the `roster` event also names its work orders.
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
    'bookings', CASE WHEN booked = '' THEN '[]'::jsonb WHEN booked = '*' THEN 'null'::jsonb ELSE to_jsonb(string_to_array(booked, ',')) END,
    'workOrders', live_noted('work_orders', branch)));
END $$;
--> statement-breakpoint
-- As in migration 0016, and `alarm` names its units, `leak-case` its leak cases.
CREATE OR REPLACE FUNCTION live_branch_kind() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  branch uuid := CASE WHEN TG_OP = 'DELETE' THEN OLD.branch_id ELSE NEW.branch_id END;
BEGIN
  IF live_once(TG_ARGV[0] || '_' || branch::text) THEN
    PERFORM live_event(branch, TG_ARGV[0], NULL, CASE TG_ARGV[0]
      WHEN 'alarm' THEN jsonb_build_object('units', live_noted('alarm_units', branch))
      WHEN 'leak-case' THEN jsonb_build_object('leakCases', live_noted('leak_cases', branch))
      ELSE '{}'::jsonb END);
  END IF;
  RETURN NULL;
END $$;
