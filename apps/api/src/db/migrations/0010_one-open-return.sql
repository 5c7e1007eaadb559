-- One open return visit (not closed, not cancelled) per unit: a close-out's return and a leak case's repair
-- share one truck roll (apps/api/src/modules/work-orders/open-return.ts).
-- A database loaded before this rule may hold two open return visits on one unit (the demo data could). Each
-- unit's extras are folded into one first: the one furthest along (on site, en route, booked, unplaced), then
-- the oldest, keeps the needs of all, the earliest latest-booking time, the highest priority and the longest
-- estimate; an extra not yet started is unbooked (its untouched visit and its booking go, as an unbook does)
-- and cancelled with a note naming the work order it went into, and a leak case pointing at it points there.
CREATE TEMP TABLE one_open_return_fold AS
SELECT r.id AS extra_id, k.id AS kept_id, k.number AS kept_number, r.unit_id
FROM (
  SELECT id, unit_id, state,
    row_number() OVER (PARTITION BY unit_id ORDER BY CASE state WHEN 'on_site' THEN 0 WHEN 'en_route' THEN 1 WHEN 'booked' THEN 2 ELSE 3 END, created_at, id) AS pos
  FROM work_orders
  WHERE kind = 'return_visit' AND state NOT IN ('closed', 'cancelled') AND unit_id IS NOT NULL
) r
JOIN (
  SELECT DISTINCT ON (unit_id) id, unit_id, number
  FROM work_orders
  WHERE kind = 'return_visit' AND state NOT IN ('closed', 'cancelled') AND unit_id IS NOT NULL
  ORDER BY unit_id, CASE state WHEN 'on_site' THEN 0 WHEN 'en_route' THEN 1 WHEN 'booked' THEN 2 ELSE 3 END, created_at, id
) k ON k.unit_id = r.unit_id
WHERE r.pos > 1 AND r.state IN ('unplaced', 'booked');
--> statement-breakpoint
UPDATE work_orders k SET
  return_needs = (
    SELECT coalesce(jsonb_agg(DISTINCT n), '[]'::jsonb)
    FROM (
      SELECT jsonb_array_elements(k.return_needs) AS n
      UNION
      SELECT jsonb_array_elements(e.return_needs) FROM work_orders e JOIN one_open_return_fold f ON f.extra_id = e.id WHERE f.kept_id = k.id
    ) x
  ),
  latest_at = (
    SELECT min(t) FROM (
      SELECT k.latest_at AS t
      UNION ALL
      SELECT e.latest_at FROM work_orders e JOIN one_open_return_fold f ON f.extra_id = e.id WHERE f.kept_id = k.id
    ) x
  ),
  priority = (
    SELECT p FROM (
      SELECT k.priority AS p
      UNION ALL
      SELECT e.priority FROM work_orders e JOIN one_open_return_fold f ON f.extra_id = e.id WHERE f.kept_id = k.id
    ) x
    ORDER BY CASE p WHEN 'emergency' THEN 0 WHEN 'high' THEN 1 WHEN 'normal' THEN 2 ELSE 3 END
    LIMIT 1
  ),
  estimated_minutes = greatest(k.estimated_minutes, (
    SELECT max(e.estimated_minutes) FROM work_orders e JOIN one_open_return_fold f ON f.extra_id = e.id WHERE f.kept_id = k.id
  )),
  leak_case_id = coalesce(k.leak_case_id, (
    SELECT e.leak_case_id FROM work_orders e JOIN one_open_return_fold f ON f.extra_id = e.id
    WHERE f.kept_id = k.id AND e.leak_case_id IS NOT NULL ORDER BY e.created_at LIMIT 1
  )),
  complaint = k.complaint || (
    SELECT string_agg(' Also (from WO-' || e.number || '): ' || e.complaint, '' ORDER BY e.created_at)
    FROM work_orders e JOIN one_open_return_fold f ON f.extra_id = e.id WHERE f.kept_id = k.id
  ),
  updated_at = now()
WHERE k.id IN (SELECT kept_id FROM one_open_return_fold);
--> statement-breakpoint
UPDATE leak_cases l SET repair_work_order_id = f.kept_id, updated_at = now()
FROM one_open_return_fold f WHERE l.repair_work_order_id = f.extra_id;
--> statement-breakpoint
DELETE FROM visits v
USING one_open_return_fold f
WHERE v.work_order_id = f.extra_id AND v.on_site_at IS NULL AND v.closed_at IS NULL
  AND NOT EXISTS (SELECT 1 FROM readings x WHERE x.visit_id = v.id)
  AND NOT EXISTS (SELECT 1 FROM findings x WHERE x.visit_id = v.id)
  AND NOT EXISTS (SELECT 1 FROM refrigerant_events x WHERE x.visit_id = v.id)
  AND NOT EXISTS (SELECT 1 FROM attachments x WHERE x.visit_id = v.id);
--> statement-breakpoint
DELETE FROM bookings b USING one_open_return_fold f WHERE b.work_order_id = f.extra_id;
--> statement-breakpoint
UPDATE work_orders e SET
  state = 'cancelled',
  closed_at = now(),
  updated_at = now(),
  complaint = 'Folded into WO-' || f.kept_number || ' (one open return visit per unit). ' || e.complaint
FROM one_open_return_fold f WHERE e.id = f.extra_id;
--> statement-breakpoint
DROP TABLE one_open_return_fold;
--> statement-breakpoint
-- The fold queued the deferred triggers of roster_revisions and fix_quality_sums (migrations 0004, 0005); an
-- index cannot be built on a table with pending trigger events, so they run now, and are deferred again after.
SET CONSTRAINTS ALL IMMEDIATE;
--> statement-breakpoint
CREATE UNIQUE INDEX "work_orders_one_open_return_uq" ON "work_orders" USING btree ("unit_id") WHERE "work_orders"."kind" = 'return_visit' and "work_orders"."state" not in ('closed', 'cancelled');
--> statement-breakpoint
SET CONSTRAINTS ALL DEFERRED;
