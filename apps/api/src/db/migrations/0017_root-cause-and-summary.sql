ALTER TABLE "branches" ADD COLUMN "trading_name" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "branches" ADD COLUMN "office_address" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "branches" ADD COLUMN "office_phone" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "branches" ADD COLUMN "licence_number" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "branches" ADD COLUMN "office_email" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "findings" ADD COLUMN "notes_audience" text DEFAULT 'internal' NOT NULL;--> statement-breakpoint
ALTER TABLE "visits" ADD COLUMN "notes_audience" text DEFAULT 'internal' NOT NULL;--> statement-breakpoint
ALTER TABLE "visits" ADD COLUMN "root_cause_finding_id" uuid;--> statement-breakpoint
ALTER TABLE "findings" ADD CONSTRAINT "findings_visit_id_uq" UNIQUE("visit_id","id");--> statement-breakpoint
-- hand-written:
-- Root cause. A visit's root cause is the finding its technician marks (visits.root_cause_finding_id); the
-- foreign key on (id, root_cause_finding_id) → findings (visit_id, id) keeps it one of the visit's own findings.
ALTER TABLE "visits" ADD CONSTRAINT "visits_root_cause_finding_fk" FOREIGN KEY ("id","root_cause_finding_id") REFERENCES "public"."findings"("visit_id","id") ON DELETE no action ON UPDATE no action;
--> statement-breakpoint
-- Backfill rule: every closed visit that has findings gets its earliest finding as its root cause (by
-- recorded time `created_at`, then by id) — the finding the Fix Quality facts took as the call's cause
-- before, so no existing figure moves. Open visits are left unmarked: the technician marks one at close-out.
UPDATE visits v SET root_cause_finding_id = (
  SELECT fd.id FROM findings fd WHERE fd.visit_id = v.id ORDER BY fd.created_at, fd.id LIMIT 1
) WHERE v.closed_at IS NOT NULL AND v.root_cause_finding_id IS NULL AND EXISTS (SELECT 1 FROM findings fd WHERE fd.visit_id = v.id);
--> statement-breakpoint
-- The one definition of a visit's root cause: the marked finding; a visit with no mark and exactly one finding
-- has that one (the close-out's default); otherwise none. Fix Quality's facts and the factory-defect review read it.
CREATE VIEW visit_root_causes AS
  SELECT v.id AS visit_id, fd.id AS finding_id, fd.unit_id, fd.cause_code, fd.origin, fd.created_at
  FROM visits v JOIN findings fd ON fd.id = v.root_cause_finding_id AND fd.visit_id = v.id
  UNION ALL
  SELECT fd.visit_id, fd.id, fd.unit_id, fd.cause_code, fd.origin, fd.created_at
  FROM findings fd JOIN visits v ON v.id = fd.visit_id
  WHERE v.root_cause_finding_id IS NULL AND NOT EXISTS (SELECT 1 FROM findings o WHERE o.visit_id = fd.visit_id AND o.id <> fd.id);
--> statement-breakpoint
-- service_call_facts (migration 0002) takes the first visit's cause and origin from its root cause, no longer
-- from its first finding.
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
    SELECT rc.cause_code, rc.origin FROM visit_root_causes rc WHERE rc.visit_id = fv.id LIMIT 1
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
    SELECT rc.visit_id, rc.cause_code, rc.origin FROM visit_root_causes rc JOIN fv ON fv.id = rc.visit_id
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
-- Marking (or changing) a visit's root cause changes its job's facts.
DROP TRIGGER service_call_facts_visits_update ON visits;
--> statement-breakpoint
CREATE TRIGGER service_call_facts_visits_update AFTER UPDATE OF work_order_id, closed_at, outcome, tech_id, root_cause_finding_id ON visits
  FOR EACH ROW WHEN (OLD.work_order_id IS DISTINCT FROM NEW.work_order_id OR OLD.closed_at IS DISTINCT FROM NEW.closed_at
    OR OLD.outcome IS DISTINCT FROM NEW.outcome OR OLD.tech_id IS DISTINCT FROM NEW.tech_id
    OR OLD.root_cause_finding_id IS DISTINCT FROM NEW.root_cause_finding_id)
  EXECUTE FUNCTION service_call_facts_on_visit();
--> statement-breakpoint
-- The kept tables recomputed under the new definition (the backfill makes them equal to before for closed
-- visits; the rebuild makes sure of it): the facts, then the sums (rebuild_fix_quality_sums drops the deltas
-- the facts' rebuild queued in this transaction).
SELECT rebuild_service_call_facts();
--> statement-breakpoint
SELECT rebuild_fix_quality_sums();
