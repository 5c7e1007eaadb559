/**
 * Fix Quality: the owner's report of first-time fix and callbacks. (The factory-defect review with its
 * warranty claims is `factory-defects.service.ts`; model alerts with their inspections `model-alerts.service.ts`.)
 *
 * The report counts in the database, with the one definition of first-time fix: the view `fix_quality_jobs`
 * and `fix_quality_jobs_at(at)` over `service_call_facts` (migrations 0002, 0005, 0014, 0017), whose counts
 * triggers keep summed per branch, month and group (`fix_quality_sums`). One statement adds up the months of
 * the period and the jobs of its remaining days (`reportGroups` in `fix-quality.repo.ts`), answering a few
 * hundred rows; the rates come from `fixQualityFromCounts`. Definitions in words:
 * packages/contract/src/fix-quality.ts. calc's `fixQuality` is only the tests' oracle.
 */
import { previousPeriod } from '@coilpath/calc';
import type { FixQualityReport } from '@coilpath/contract';
import type { Db } from '../../db/client';
import * as repo from './fix-quality.repo';
import { presentReport, reportTechIds } from './fix-quality.present';
import { bounds, DAY_MS, type Period } from './periods';

export { NONE } from './fix-quality.present';
export { splitByMonths, type Period } from './periods';

/**
 * The report as of `at` (the server's clock). A job whose callback window has not run out by `at` is
 * `pending` and counts in nothing else (`fix_quality_jobs_at`, migration 0014): its first-time fix cannot be
 * known yet. The kept sums hold the counts of mature jobs, so they are read only for months that end at least
 * the longest callback window of the branches shown before `at`; the later days are counted job by job.
 */
export async function fixQualityReport(db: Db, period: Period, branchId: string | undefined, at: Date): Promise<FixQualityReport> {
  const prev = previousPeriod(period);
  const cur = bounds(period);
  const branchRows = await repo.reportBranches(db, branchId);
  const longestWindow = Math.max(0, ...branchRows.map((b) => b.windowDays));
  const sumsUntil = new Date(at.getTime() - longestWindow * DAY_MS).toISOString();
  const counted = await repo.reportGroups(db, { start: bounds(prev).start, curStart: cur.start, end: cur.end }, branchId, {
    at,
    sumsUntil,
  });
  const techs = await repo.userNames(db, reportTechIds(counted));
  return presentReport({ period, prev, branchId, counted, branchRows, techNames: new Map(techs.map((t) => [t.id, t.name])) });
}

/** The name a report's documents give its scope: the branch's, or "All branches". */
export async function reportScopeName(db: Db, branchId: string | undefined): Promise<string> {
  return (branchId ? await repo.branchName(db, branchId) : undefined) ?? 'All branches';
}
