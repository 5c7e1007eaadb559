-- Keeps service_call_facts (one row per service call, see schema.ts) in step with work_orders, visits and
-- findings. `refresh_service_call_facts(job)` recomputes one job from its own rows (index lookups only);
-- the triggers call it for every job a change can touch: the work order itself and the job it was booked
-- off (a follow-up's visits change the job's last visit). `rebuild_service_call_facts()` recomputes every job
-- in one set-based statement (after a bulk load with triggers off, and below for existing data).
CREATE OR REPLACE FUNCTION refresh_service_call_facts(job uuid) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  IF job IS NULL THEN
    RETURN;
  END IF;
  DELETE FROM service_call_facts WHERE job_id = job;
  INSERT INTO service_call_facts (job_id, branch_id, unit_id, opened_at, first_visit_id, first_closed_at, first_outcome, tech_id,
    cause_code, origin, first_callback_at, first_return_at, return_visits, last_closed_at, last_outcome)
  SELECT w.id, w.branch_id, w.unit_id, w.created_at, fv.id, fv.closed_at, fv.outcome, fv.tech_id, ff.cause_code, ff.origin,
    fu.first_callback, fu.first_return, fu.return_visits, lv.closed_at, lv.outcome
  FROM work_orders w
  LEFT JOIN LATERAL (
    SELECT v.id, v.closed_at, v.outcome, v.tech_id FROM visits v
    WHERE v.work_order_id = w.id AND v.closed_at IS NOT NULL
    ORDER BY v.closed_at, v.id LIMIT 1
  ) fv ON true
  LEFT JOIN LATERAL (
    SELECT fd.cause_code, fd.origin FROM findings fd WHERE fd.visit_id = fv.id ORDER BY fd.created_at, fd.id LIMIT 1
  ) ff ON true
  CROSS JOIN LATERAL (
    SELECT min(f.created_at) FILTER (WHERE f.kind = 'callback') AS first_callback,
      min(f.created_at) FILTER (WHERE f.kind = 'return_visit') AS first_return,
      (count(*) FILTER (WHERE f.kind = 'return_visit'))::int AS return_visits
    FROM work_orders f WHERE f.origin_work_order_id = w.id AND f.kind IN ('callback', 'return_visit')
  ) fu
  LEFT JOIN LATERAL (
    SELECT c.closed_at, c.outcome FROM (
      SELECT v.id, v.closed_at, v.outcome FROM visits v WHERE v.work_order_id = w.id AND v.closed_at IS NOT NULL
      UNION ALL
      SELECT v.id, v.closed_at, v.outcome FROM work_orders f JOIN visits v ON v.work_order_id = f.id
      WHERE f.origin_work_order_id = w.id AND f.kind IN ('callback', 'return_visit') AND v.closed_at IS NOT NULL
    ) c ORDER BY c.closed_at DESC, c.id DESC LIMIT 1
  ) lv ON true
  WHERE w.id = job AND w.kind = 'service_call';
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION rebuild_service_call_facts() RETURNS void LANGUAGE sql AS $$
  DELETE FROM service_call_facts;
  INSERT INTO service_call_facts (job_id, branch_id, unit_id, opened_at, first_visit_id, first_closed_at, first_outcome, tech_id,
    cause_code, origin, first_callback_at, first_return_at, return_visits, last_closed_at, last_outcome)
  WITH jobs AS (
    SELECT id, branch_id, unit_id, created_at FROM work_orders WHERE kind = 'service_call'
  ),
  fv AS (
    SELECT DISTINCT ON (v.work_order_id) v.work_order_id AS job_id, v.id, v.closed_at, v.outcome, v.tech_id
    FROM visits v JOIN jobs j ON j.id = v.work_order_id
    WHERE v.closed_at IS NOT NULL
    ORDER BY v.work_order_id, v.closed_at, v.id
  ),
  ff AS (
    SELECT DISTINCT ON (fd.visit_id) fd.visit_id, fd.cause_code, fd.origin
    FROM findings fd JOIN fv ON fv.id = fd.visit_id
    ORDER BY fd.visit_id, fd.created_at, fd.id
  ),
  fu AS (
    SELECT f.origin_work_order_id AS job_id, f.id, f.kind, f.created_at
    FROM work_orders f JOIN jobs j ON j.id = f.origin_work_order_id
    WHERE f.kind IN ('callback', 'return_visit')
  ),
  fu_agg AS (
    SELECT job_id, min(created_at) FILTER (WHERE kind = 'callback') AS first_callback,
      min(created_at) FILTER (WHERE kind = 'return_visit') AS first_return,
      (count(*) FILTER (WHERE kind = 'return_visit'))::int AS return_visits
    FROM fu GROUP BY job_id
  ),
  chain AS (
    SELECT id AS job_id, id AS wo_id FROM jobs
    UNION ALL
    SELECT job_id, id FROM fu
  ),
  lv AS (
    SELECT DISTINCT ON (c.job_id) c.job_id, v.closed_at, v.outcome
    FROM chain c JOIN visits v ON v.work_order_id = c.wo_id
    WHERE v.closed_at IS NOT NULL
    ORDER BY c.job_id, v.closed_at DESC, v.id DESC
  )
  SELECT j.id, j.branch_id, j.unit_id, j.created_at, fv.id, fv.closed_at, fv.outcome, fv.tech_id, ff.cause_code, ff.origin,
    fa.first_callback, fa.first_return, coalesce(fa.return_visits, 0), lv.closed_at, lv.outcome
  FROM jobs j
  LEFT JOIN fv ON fv.job_id = j.id
  LEFT JOIN ff ON ff.visit_id = fv.id
  LEFT JOIN fu_agg fa ON fa.job_id = j.id
  LEFT JOIN lv ON lv.job_id = j.id;
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION service_call_facts_on_work_order() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP IN ('UPDATE', 'DELETE') THEN
    PERFORM refresh_service_call_facts(OLD.id);
    PERFORM refresh_service_call_facts(OLD.origin_work_order_id);
  END IF;
  IF TG_OP IN ('INSERT', 'UPDATE') THEN
    PERFORM refresh_service_call_facts(NEW.id);
    IF TG_OP = 'INSERT' OR NEW.origin_work_order_id IS DISTINCT FROM OLD.origin_work_order_id THEN
      PERFORM refresh_service_call_facts(NEW.origin_work_order_id);
    END IF;
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION service_call_facts_on_visit() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  wo uuid;
BEGIN
  FOR wo IN
    SELECT DISTINCT x FROM unnest(ARRAY[
      CASE WHEN TG_OP <> 'INSERT' THEN OLD.work_order_id END,
      CASE WHEN TG_OP <> 'DELETE' THEN NEW.work_order_id END
    ]) AS x WHERE x IS NOT NULL
  LOOP
    PERFORM refresh_service_call_facts(wo);
    PERFORM refresh_service_call_facts((SELECT w.origin_work_order_id FROM work_orders w WHERE w.id = wo));
  END LOOP;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION service_call_facts_on_finding() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  wo uuid;
BEGIN
  FOR wo IN
    SELECT DISTINCT v.work_order_id FROM visits v
    WHERE v.id IN (CASE WHEN TG_OP <> 'INSERT' THEN OLD.visit_id END, CASE WHEN TG_OP <> 'DELETE' THEN NEW.visit_id END)
  LOOP
    PERFORM refresh_service_call_facts(wo);
  END LOOP;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER service_call_facts_work_orders AFTER INSERT OR DELETE ON work_orders
  FOR EACH ROW EXECUTE FUNCTION service_call_facts_on_work_order();
--> statement-breakpoint
CREATE TRIGGER service_call_facts_work_orders_update AFTER UPDATE OF kind, branch_id, unit_id, created_at, origin_work_order_id ON work_orders
  FOR EACH ROW WHEN (OLD.kind IS DISTINCT FROM NEW.kind OR OLD.branch_id IS DISTINCT FROM NEW.branch_id OR OLD.unit_id IS DISTINCT FROM NEW.unit_id
    OR OLD.created_at IS DISTINCT FROM NEW.created_at OR OLD.origin_work_order_id IS DISTINCT FROM NEW.origin_work_order_id)
  EXECUTE FUNCTION service_call_facts_on_work_order();
--> statement-breakpoint
CREATE TRIGGER service_call_facts_visits AFTER INSERT OR DELETE ON visits
  FOR EACH ROW EXECUTE FUNCTION service_call_facts_on_visit();
--> statement-breakpoint
CREATE TRIGGER service_call_facts_visits_update AFTER UPDATE OF work_order_id, closed_at, outcome, tech_id ON visits
  FOR EACH ROW WHEN (OLD.work_order_id IS DISTINCT FROM NEW.work_order_id OR OLD.closed_at IS DISTINCT FROM NEW.closed_at
    OR OLD.outcome IS DISTINCT FROM NEW.outcome OR OLD.tech_id IS DISTINCT FROM NEW.tech_id)
  EXECUTE FUNCTION service_call_facts_on_visit();
--> statement-breakpoint
CREATE TRIGGER service_call_facts_findings AFTER INSERT OR DELETE ON findings
  FOR EACH ROW EXECUTE FUNCTION service_call_facts_on_finding();
--> statement-breakpoint
CREATE TRIGGER service_call_facts_findings_update AFTER UPDATE OF visit_id, cause_code, origin, created_at ON findings
  FOR EACH ROW WHEN (OLD.visit_id IS DISTINCT FROM NEW.visit_id OR OLD.cause_code IS DISTINCT FROM NEW.cause_code
    OR OLD.origin IS DISTINCT FROM NEW.origin OR OLD.created_at IS DISTINCT FROM NEW.created_at)
  EXECUTE FUNCTION service_call_facts_on_finding();
--> statement-breakpoint
SELECT rebuild_service_call_facts();
--> statement-breakpoint
ANALYZE service_call_facts;
