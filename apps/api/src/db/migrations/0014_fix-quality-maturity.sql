-- hand-written:
-- Maturity. A service call cannot be called fixed the first time before its callback window has run out:
-- until then a callback or return visit may still come. `fix_quality_jobs` (migration 0005) keeps the counts a
-- job has once its window has closed (the sums in fix_quality_sums are those, independent of "now") and gains
-- `window_ends_at`: the first visit's close plus the branch's callback window (whole 24-hour days). A follow-up
-- opened at `window_ends_at` still counts as inside the window, so a job is mature at `at` when
-- window_ends_at < at. `fix_quality_jobs_at(at)` is the one definition of a job's counts as of `at`: a job
-- whose window has not elapsed counts as `pending` (when it would be eligible) and in nothing else.
CREATE OR REPLACE VIEW fix_quality_jobs AS
  SELECT f.job_id, f.branch_id, f.unit_id, f.first_closed_at, date_trunc('month', f.first_closed_at AT TIME ZONE 'UTC')::date AS month,
    f.tech_id, u.make, u.model, f.cause_code, f.origin,
    x.e::int AS eligible,
    (x.e AND x.r AND NOT x.cb AND NOT x.rv)::int AS first_time_fixed,
    (x.e AND x.r)::int AS resolved_first_visits,
    (x.e AND x.r AND x.cb)::int AS callbacks,
    CASE WHEN x.e THEN f.return_visits ELSE 0 END AS return_visits,
    (x.e AND x.rj)::int AS resolved_jobs,
    CASE WHEN x.e AND x.rj THEN (extract(epoch FROM f.last_closed_at - f.opened_at) * 1000000)::bigint ELSE 0 END AS resolve_us,
    f.first_closed_at + b.callback_window_days * interval '24 hours' AS window_ends_at
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
CREATE OR REPLACE FUNCTION fix_quality_jobs_at(at timestamptz) RETURNS TABLE (
  job_id uuid, branch_id uuid, unit_id uuid, first_closed_at timestamptz, month date, tech_id uuid, make text, model text,
  cause_code text, origin text, eligible int, first_time_fixed int, resolved_first_visits int, callbacks int, return_visits int,
  resolved_jobs int, resolve_us bigint, pending int, window_ends_at timestamptz
) LANGUAGE sql STABLE AS $$
  SELECT j.job_id, j.branch_id, j.unit_id, j.first_closed_at, j.month, j.tech_id, j.make, j.model, j.cause_code::text, j.origin::text,
    CASE WHEN m.mature THEN j.eligible ELSE 0 END,
    CASE WHEN m.mature THEN j.first_time_fixed ELSE 0 END,
    CASE WHEN m.mature THEN j.resolved_first_visits ELSE 0 END,
    CASE WHEN m.mature THEN j.callbacks ELSE 0 END,
    CASE WHEN m.mature THEN j.return_visits ELSE 0 END,
    CASE WHEN m.mature THEN j.resolved_jobs ELSE 0 END,
    CASE WHEN m.mature THEN j.resolve_us ELSE 0::bigint END,
    CASE WHEN m.mature THEN 0 ELSE j.eligible END,
    j.window_ends_at
  FROM fix_quality_jobs j
  CROSS JOIN LATERAL (SELECT j.window_ends_at < at AS mature) m
$$;
