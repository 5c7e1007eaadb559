CREATE TABLE "fix_quality_sums" (
	"branch_id" uuid NOT NULL,
	"month" date NOT NULL,
	"dim" text NOT NULL,
	"tech_id" uuid,
	"make" text,
	"model" text,
	"cause_code" text,
	"origin" text,
	"jobs" integer NOT NULL,
	"eligible" integer NOT NULL,
	"first_time_fixed" integer NOT NULL,
	"resolved_first_visits" integer NOT NULL,
	"callbacks" integer NOT NULL,
	"return_visits" integer NOT NULL,
	"resolved_jobs" integer NOT NULL,
	"resolve_us" bigint NOT NULL,
	CONSTRAINT "fix_quality_sums_key" UNIQUE NULLS NOT DISTINCT("month","branch_id","dim","tech_id","make","model","cause_code","origin")
);
--> statement-breakpoint
CREATE TABLE "fix_quality_sums_pending" (
	"txid" bigint NOT NULL,
	"branch_id" uuid NOT NULL,
	"month" date NOT NULL,
	"dim" text NOT NULL,
	"tech_id" uuid,
	"make" text,
	"model" text,
	"cause_code" text,
	"origin" text,
	"jobs" integer NOT NULL,
	"eligible" integer NOT NULL,
	"first_time_fixed" integer NOT NULL,
	"resolved_first_visits" integer NOT NULL,
	"callbacks" integer NOT NULL,
	"return_visits" integer NOT NULL,
	"resolved_jobs" integer NOT NULL,
	"resolve_us" bigint NOT NULL
);
--> statement-breakpoint
CREATE INDEX "fix_quality_sums_empty_idx" ON "fix_quality_sums" USING btree ("month") WHERE "fix_quality_sums"."jobs" = 0;--> statement-breakpoint
CREATE INDEX "fix_quality_sums_pending_txid_idx" ON "fix_quality_sums_pending" USING btree ("txid");--> statement-breakpoint
CREATE INDEX "service_call_facts_unit_idx" ON "service_call_facts" USING btree ("unit_id");--> statement-breakpoint
-- fix_quality_sums (see schema.ts) holds the Fix Quality report's sums per branch, month and dimension.
-- `fix_quality_jobs` is the one definition of what a job counts (the report reads it for the days outside
-- whole months); `fix_quality_job_dims` repeats each job once per dimension with its key there.
-- The sums depend on service_call_facts, the branch's callback window and the unit's make and model. A
-- change to any of these records, for every job it touches, minus the job's counts before (BEFORE trigger:
-- the old row is still what the view sees) and plus its counts after (AFTER trigger) in
-- fix_quality_sums_pending; a deferred constraint trigger adds the transaction's deltas to fix_quality_sums
-- at commit, after every other lock the transaction takes and in key order, so two transactions never wait
-- on each other's sums in a cycle. `rebuild_fix_quality_sums()` recomputes the table in one statement.
CREATE VIEW fix_quality_jobs AS
  SELECT f.job_id, f.branch_id, f.unit_id, f.first_closed_at, date_trunc('month', f.first_closed_at AT TIME ZONE 'UTC')::date AS month,
    f.tech_id, u.make, u.model, f.cause_code, f.origin,
    x.e::int AS eligible,
    (x.e AND x.r AND NOT x.cb AND NOT x.rv)::int AS first_time_fixed,
    (x.e AND x.r)::int AS resolved_first_visits,
    (x.e AND x.r AND x.cb)::int AS callbacks,
    CASE WHEN x.e THEN f.return_visits ELSE 0 END AS return_visits,
    (x.e AND x.rj)::int AS resolved_jobs,
    CASE WHEN x.e AND x.rj THEN (extract(epoch FROM f.last_closed_at - f.opened_at) * 1000000)::bigint ELSE 0 END AS resolve_us
  FROM service_call_facts f
  JOIN branches b ON b.id = f.branch_id
  LEFT JOIN units u ON u.id = f.unit_id
  -- Per job, with its branch's callback window W (whole 24-hour days after the first visit closed, inclusive):
  -- eligible = first visit not declined (closed without an outcome counts as needs return); r = it resolved;
  -- cb / rv = a callback / return visit opened within W; rj = the last closed visit of the job and its
  -- follow-ups resolved it. The same definitions as `fixQuality` in @coilpath/calc.
  CROSS JOIN LATERAL (SELECT
    coalesce(f.first_outcome, 'needs_return') <> 'declined' AS e,
    coalesce(f.first_outcome = 'resolved', false) AS r,
    coalesce(f.first_callback_at <= f.first_closed_at + b.callback_window_days * interval '24 hours', false) AS cb,
    coalesce(f.first_return_at <= f.first_closed_at + b.callback_window_days * interval '24 hours', false) AS rv,
    coalesce(f.last_outcome = 'resolved' AND f.last_closed_at IS NOT NULL, false) AS rj) x
  WHERE f.first_closed_at IS NOT NULL;
--> statement-breakpoint
CREATE VIEW fix_quality_job_dims AS
  SELECT j.job_id, j.branch_id, j.first_closed_at, j.month, d.dim, d.tech_id, d.make, d.model, d.cause_code, d.origin,
    j.eligible, j.first_time_fixed, j.resolved_first_visits, j.callbacks, j.return_visits, j.resolved_jobs, j.resolve_us
  FROM fix_quality_jobs j
  CROSS JOIN LATERAL (VALUES
    ('technician', j.tech_id, NULL, NULL, NULL, NULL),
    ('model', NULL, j.make, j.model, NULL, NULL),
    ('cause', NULL, NULL, NULL, j.cause_code, NULL),
    ('origin', NULL, NULL, NULL, NULL, j.origin)
  ) d(dim, tech_id, make, model, cause_code, origin);
--> statement-breakpoint
CREATE OR REPLACE FUNCTION fix_quality_sums_record(job_ids uuid[], sign int) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO fix_quality_sums_pending
  SELECT txid_current(), branch_id, month, dim, tech_id, make, model, cause_code, origin,
    sign * count(*), sign * sum(eligible), sign * sum(first_time_fixed), sign * sum(resolved_first_visits), sign * sum(callbacks),
    sign * sum(return_visits), sign * sum(resolved_jobs), sign * sum(resolve_us)
  FROM fix_quality_job_dims
  WHERE job_id = ANY(job_ids)
  GROUP BY branch_id, month, dim, tech_id, make, model, cause_code, origin;
  PERFORM set_config('coilpath.fix_quality_sums', 'pending', true);
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION fix_quality_sums_apply() RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  WITH moved AS (DELETE FROM fix_quality_sums_pending WHERE txid = txid_current() RETURNING *)
  INSERT INTO fix_quality_sums AS s
  SELECT branch_id, month, dim, tech_id, make, model, cause_code, origin,
    sum(jobs), sum(eligible), sum(first_time_fixed), sum(resolved_first_visits), sum(callbacks), sum(return_visits), sum(resolved_jobs), sum(resolve_us)
  FROM moved
  GROUP BY branch_id, month, dim, tech_id, make, model, cause_code, origin
  HAVING sum(jobs) <> 0 OR sum(eligible) <> 0 OR sum(first_time_fixed) <> 0 OR sum(resolved_first_visits) <> 0 OR sum(callbacks) <> 0
    OR sum(return_visits) <> 0 OR sum(resolved_jobs) <> 0 OR sum(resolve_us) <> 0
  ORDER BY month, branch_id, dim, tech_id, make, model, cause_code, origin
  ON CONFLICT ON CONSTRAINT fix_quality_sums_key DO UPDATE SET
    jobs = s.jobs + excluded.jobs, eligible = s.eligible + excluded.eligible, first_time_fixed = s.first_time_fixed + excluded.first_time_fixed,
    resolved_first_visits = s.resolved_first_visits + excluded.resolved_first_visits, callbacks = s.callbacks + excluded.callbacks,
    return_visits = s.return_visits + excluded.return_visits, resolved_jobs = s.resolved_jobs + excluded.resolved_jobs,
    resolve_us = s.resolve_us + excluded.resolve_us;
  DELETE FROM fix_quality_sums WHERE jobs = 0;
  PERFORM set_config('coilpath.fix_quality_sums', 'applied', true);
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION rebuild_fix_quality_sums() RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  DELETE FROM fix_quality_sums_pending WHERE txid = txid_current();
  DELETE FROM fix_quality_sums;
  INSERT INTO fix_quality_sums
  SELECT branch_id, month, dim, tech_id, make, model, cause_code, origin,
    count(*), sum(eligible), sum(first_time_fixed), sum(resolved_first_visits), sum(callbacks), sum(return_visits), sum(resolved_jobs), sum(resolve_us)
  FROM fix_quality_job_dims
  GROUP BY branch_id, month, dim, tech_id, make, model, cause_code, origin;
END $$;
--> statement-breakpoint
-- BEFORE (minus the counts as they stand) and AFTER (plus the new counts) a change to a fact, a unit's make or
-- model, or a branch's callback window, for every job it touches.
CREATE OR REPLACE FUNCTION fix_quality_sums_on_change() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  r record := CASE WHEN TG_WHEN = 'BEFORE' THEN OLD ELSE NEW END;
  job_ids uuid[];
BEGIN
  IF TG_TABLE_NAME = 'service_call_facts' THEN
    job_ids := ARRAY[r.job_id];
  ELSIF TG_TABLE_NAME = 'units' THEN
    job_ids := ARRAY(SELECT f.job_id FROM service_call_facts f WHERE f.unit_id = r.id);
  ELSE
    job_ids := ARRAY(SELECT f.job_id FROM service_call_facts f WHERE f.branch_id = r.id);
  END IF;
  IF cardinality(job_ids) > 0 THEN
    PERFORM fix_quality_sums_record(job_ids, CASE WHEN TG_WHEN = 'BEFORE' THEN -1 ELSE 1 END);
  END IF;
  IF TG_WHEN = 'BEFORE' THEN
    RETURN CASE WHEN TG_OP = 'DELETE' THEN OLD ELSE NEW END;
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION fix_quality_sums_at_commit() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  -- The first of the transaction's queued events adds every pending delta; the rest find nothing to do.
  IF current_setting('coilpath.fix_quality_sums', true) = 'pending' THEN
    PERFORM fix_quality_sums_apply();
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER fix_quality_sums_facts_before BEFORE UPDATE OR DELETE ON service_call_facts
  FOR EACH ROW EXECUTE FUNCTION fix_quality_sums_on_change();
--> statement-breakpoint
CREATE TRIGGER fix_quality_sums_facts_after AFTER INSERT OR UPDATE ON service_call_facts
  FOR EACH ROW EXECUTE FUNCTION fix_quality_sums_on_change();
--> statement-breakpoint
CREATE TRIGGER fix_quality_sums_units_before BEFORE UPDATE OF make, model ON units
  FOR EACH ROW WHEN (OLD.make IS DISTINCT FROM NEW.make OR OLD.model IS DISTINCT FROM NEW.model)
  EXECUTE FUNCTION fix_quality_sums_on_change();
--> statement-breakpoint
CREATE TRIGGER fix_quality_sums_units_after AFTER UPDATE OF make, model ON units
  FOR EACH ROW WHEN (OLD.make IS DISTINCT FROM NEW.make OR OLD.model IS DISTINCT FROM NEW.model)
  EXECUTE FUNCTION fix_quality_sums_on_change();
--> statement-breakpoint
CREATE TRIGGER fix_quality_sums_branches_before BEFORE UPDATE OF callback_window_days ON branches
  FOR EACH ROW WHEN (OLD.callback_window_days IS DISTINCT FROM NEW.callback_window_days)
  EXECUTE FUNCTION fix_quality_sums_on_change();
--> statement-breakpoint
CREATE TRIGGER fix_quality_sums_branches_after AFTER UPDATE OF callback_window_days ON branches
  FOR EACH ROW WHEN (OLD.callback_window_days IS DISTINCT FROM NEW.callback_window_days)
  EXECUTE FUNCTION fix_quality_sums_on_change();
--> statement-breakpoint
CREATE CONSTRAINT TRIGGER fix_quality_sums_at_commit AFTER INSERT ON fix_quality_sums_pending
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION fix_quality_sums_at_commit();
--> statement-breakpoint
SELECT rebuild_fix_quality_sums();
--> statement-breakpoint
ANALYZE fix_quality_sums;
