/** Maintenance agreements: covered units, recurrence, term, SLA, price, tasks; visit plans; PM completion. */
import {
  recordDate,
  PM_GRACE_DAYS,
  buildAgreementRrule,
  type AgreementDetail,
  type AgreementRow,
  type PlanPreview,
  type PlanVisit,
  type PmCompletionResponse,
  type PmCounts,
  type SessionUser,
  agreementInputSchema,
  agreementPatchSchema,
} from '@coilpath/contract';
import { addDays, daysFrom, levelVisitsAcrossWeeks, planAgreementVisits, zonedDate, zonedInstant } from '@coilpath/calc';
import type { z } from 'zod';
import type { AppContext } from '../../context';
import type { Tx } from '../../db/client';
import { assertBranch } from '../../auth/policy';
import { notFound, unprocessable } from '../../lib/errors';
import { branchesById, todayIn } from '../watchlist/scope';
import { actAs } from '../events/actor';
import {
  agreementUnitRows,
  agreementVisits,
  branchAgreements,
  countActiveTechnicians,
  coveredUnits,
  deleteAgreementUnits,
  existingPlanVisits,
  findAgreement,
  findBranchRecord,
  findSiteBranch,
  insertAgreement,
  insertAgreementUnits,
  insertAudit,
  insertWorkOrders,
  listAgreementRecords,
  otherPlannedVisits,
  pmWorkOrders,
  plannedVisitsOf,
  scopedBranches,
  unitSites,
  updateAgreementRow,
  updateWorkOrderIfState,
} from './agreements.repo';
import { presentAgreementRow } from './agreements.present';

/** Planned-maintenance visits one technician can take in a week (one a working day): the levelling cap per technician. */
export const PM_VISITS_PER_TECH_WEEK = 5;
/** Agreements ending within this many days are on the renewal list. */
export const RENEWAL_DAYS = 60;

const purposeOf = (ruleDate: string) => `agreement-visit:${ruleDate}`;
const ruleDateOf = (purpose: string | null) => (purpose?.startsWith('agreement-visit:') ? purpose.slice('agreement-visit:'.length) : null);

/* ------------------------------------------------------------------ reading */

export async function listAgreements(
  ctx: AppContext,
  user: SessionUser,
  q: { branchId?: string | undefined; status: string },
  onlyIds?: string[],
): Promise<AgreementRow[]> {
  const rows = await listAgreementRecords(ctx.db, user, q.branchId, q.status, onlyIds);
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.a.id);
  const [unitRows, planned, branchMap] = await Promise.all([
    agreementUnitRows(ctx.db, ids),
    plannedVisitsOf(ctx.db, ids),
    branchesById(
      ctx.db,
      rows.map((r) => r.a.branchId),
    ),
  ]);
  const now = ctx.clock.now();
  return rows.map(({ a, siteName, customerName }) => {
    const today = todayIn(branchMap.get(a.branchId)?.timeZone ?? 'UTC', now);
    const mine = planned.filter((p) => p.agreementId === a.id);
    const upcoming = mine
      .filter((p) => p.plannedDate && p.plannedDate >= today && p.state !== 'closed')
      .map((p) => p.plannedDate!)
      .sort();
    return presentAgreementRow(a, siteName, customerName, {
      units: unitRows.filter((u) => u.agreementId === a.id).map(({ agreementId: _a, ...u }) => u),
      plannedCount: mine.length,
      nextPlannedDate: upcoming[0] ?? null,
    });
  });
}

export async function getAgreement(ctx: AppContext, user: SessionUser, id: string): Promise<AgreementDetail> {
  const [row] = await listAgreements(ctx, user, { status: 'all' }, [id]);
  if (!row) throw notFound('agreement');
  const visits = await agreementVisits(ctx.db, id);
  return { ...row, visits: visits.map((v) => ({ ...v, closedAt: v.closedAt?.toISOString() ?? null })) };
}

/* ------------------------------------------------------------------ writing */

async function checkUnits(tx: Tx, siteId: string, unitIds: string[]) {
  const found = await unitSites(tx, unitIds);
  const elsewhere = unitIds.filter((id) => found.find((u) => u.id === id)?.siteId !== siteId);
  if (elsewhere.length) throw unprocessable("Every covered unit must be at the agreement's site.", { unitIds: elsewhere });
}

export async function createAgreement(
  ctx: AppContext,
  user: SessionUser,
  input: z.infer<typeof agreementInputSchema>,
): Promise<AgreementDetail> {
  const id = await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const site = await findSiteBranch(tx, input.siteId);
    if (!site) throw notFound('site');
    assertBranch(user, site.branchId, 'site');
    await checkUnits(tx, site.id, input.unitIds);
    const a = await insertAgreement(tx, {
      branchId: site.branchId,
      siteId: site.id,
      name: input.name,
      rrule: buildAgreementRrule(input.recurrence),
      seasonNotes: input.seasonNotes || null,
      termStart: input.termStart,
      termEnd: input.termEnd,
      slaHours: input.slaHours,
      priceCents: input.priceCents,
      visitMinutes: input.visitMinutes,
      tasks: input.tasks,
    });
    await insertAgreementUnits(tx, a.id, [...new Set(input.unitIds)]);
    await insertAudit(tx, user.id, 'agreement.created', a.id, {});
    return a.id;
  });
  return getAgreement(ctx, user, id);
}

export async function patchAgreement(
  ctx: AppContext,
  user: SessionUser,
  id: string,
  patch: z.infer<typeof agreementPatchSchema>,
): Promise<AgreementDetail> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const a = await findAgreement(tx, id);
    if (!a) throw notFound('agreement');
    assertBranch(user, a.branchId, 'agreement');
    const termStart = patch.termStart ?? a.termStart;
    const termEnd = patch.termEnd ?? a.termEnd;
    if (termEnd <= termStart) throw unprocessable('The term must end after it starts.');
    if (patch.unitIds) {
      await checkUnits(tx, a.siteId, patch.unitIds);
      await deleteAgreementUnits(tx, id);
      await insertAgreementUnits(tx, id, [...new Set(patch.unitIds)]);
    }
    await updateAgreementRow(tx, id, {
      ...(patch.name !== undefined ? { name: patch.name } : {}),
      ...(patch.recurrence ? { rrule: buildAgreementRrule(patch.recurrence) } : {}),
      ...(patch.seasonNotes !== undefined ? { seasonNotes: patch.seasonNotes || null } : {}),
      termStart,
      termEnd,
      ...(patch.slaHours !== undefined ? { slaHours: patch.slaHours } : {}),
      ...(patch.priceCents !== undefined ? { priceCents: patch.priceCents } : {}),
      ...(patch.visitMinutes !== undefined ? { visitMinutes: patch.visitMinutes } : {}),
      ...(patch.tasks !== undefined ? { tasks: patch.tasks } : {}),
      ...(patch.status !== undefined ? { status: patch.status } : {}),
      updatedAt: ctx.clock.now(),
    });
    await insertAudit(tx, user.id, 'agreement.updated', id, { fields: Object.keys(patch) });
  });
  return getAgreement(ctx, user, id);
}

/* ---------------------------------------------------------------- visit plan */

interface Planned {
  ruleDate: string;
  /** The working day the rule date moved to (before levelling). */
  workingDate: string;
  plannedDate: string;
  moved: string | null;
}

/**
 * The agreement's visit plan from today to the end of its term: the recurrence expanded and moved
 * off weekends and branch holidays (calc `expandAgreementVisits`), then levelled across weeks against
 * the branch's other planned maintenance (calc `levelVisitsAcrossWeeks`, at most
 * PM_VISITS_PER_TECH_WEEK per technician a week). Each visit is known by its rule date (stored in
 * the work order's `purpose`), so regenerating finds the same visits again: it never duplicates one,
 * and never touches one that is booked, in progress or done.
 */
async function computePlan(tx: Tx, ctx: AppContext, user: SessionUser, id: string, lock: boolean) {
  const a = await findAgreement(tx, id, lock);
  if (!a) throw notFound('agreement');
  assertBranch(user, a.branchId, 'agreement');
  const b = await findBranchRecord(tx, a.branchId);
  const tz = b!.timeZone;
  const today = todayIn(tz, ctx.clock.now());

  let planned: Planned[] = [];
  let dropped: PlanPreview['dropped'] = [];
  if (a.status === 'active' && a.termEnd >= today) {
    let expanded;
    try {
      expanded = planAgreementVisits({ rrule: a.rrule, termStart: a.termStart, termEnd: a.termEnd, timeZone: tz, holidays: b!.holidays });
    } catch (e) {
      throw unprocessable(`The agreement's recurrence cannot be expanded: ${(e as Error).message}`);
    }
    dropped = expanded.dropped
      .filter((d) => d.originalDate >= today)
      .map((d) => ({ ruleDate: d.originalDate, reason: `Not planned: ${d.reason}` }));
    const future = expanded.visits.filter((v) => v.date >= today);
    if (future.length) {
      const last = future[future.length - 1]!.date;
      const [others, techs] = await Promise.all([
        otherPlannedVisits(tx, a.branchId, id, addDays(future[0]!.date, -7), addDays(last, 7 * 9)),
        countActiveTechnicians(tx, a.branchId),
      ]);
      const maxPerWeek = Math.max(1, techs?.n ?? 1) * PM_VISITS_PER_TECH_WEEK;
      // Other agreements' visits already hold their weeks ('0:' sorts before this agreement's '1:' on a tie).
      const input = [
        ...others.filter((o) => o.plannedDate).map((o) => ({ id: `0:${o.id}`, date: o.plannedDate! })),
        ...future.map((v) => ({ id: `1:${v.originalDate}`, date: v.date })),
      ];
      let levelled;
      try {
        levelled = levelVisitsAcrossWeeks(input, { maxPerWeek, holidays: b!.holidays });
      } catch (e) {
        throw unprocessable(`The branch's planned maintenance is too full to place these visits: ${(e as Error).message}`);
      }
      const byId = new Map(levelled.map((l) => [l.id, l]));
      planned = future.map((v) => {
        const l = byId.get(`1:${v.originalDate}`)!;
        const reasons: string[] = [];
        if (v.movedBecause) {
          reasons.push(
            {
              holiday: `moved off the holiday ${recordDate(v.originalDate)}`,
              weekend: `moved off the weekend (${recordDate(v.originalDate)})`,
              taken: `moved to the next free working day: ${recordDate(v.originalDate)} already had a visit of this plan`,
            }[v.movedBecause],
          );
        }
        if (l.date !== v.date)
          reasons.push(`moved to a later week: the week of ${recordDate(v.date)} already had ${maxPerWeek} planned visits`);
        const text = reasons.join('; ');
        return {
          ruleDate: v.originalDate,
          workingDate: v.date,
          plannedDate: l.date,
          moved: text ? text[0]!.toUpperCase() + text.slice(1) : null,
        };
      });
    }
  }

  const existing = await existingPlanVisits(tx, id);
  // Visits written by Coilpath carry their rule date in `purpose`; others (imported, demo data) are
  // matched by their planned date: the rule date, the working day it moved to, or the levelled day.
  type Existing = (typeof existing)[number];
  const byPurpose = new Map<string, Existing>();
  const byDate = new Map<string, Existing[]>();
  const better = (x: Existing | undefined, y: Existing) => !x || (x.state === 'cancelled' && y.state !== 'cancelled');
  for (const e of existing) {
    const rd = ruleDateOf(e.purpose);
    if (rd) {
      if (better(byPurpose.get(rd), e)) byPurpose.set(rd, e);
    } else if (e.plannedDate) byDate.set(e.plannedDate, [...(byDate.get(e.plannedDate) ?? []), e]);
  }
  const used = new Set<string>();
  const find = (p: Planned): Existing | undefined => {
    const direct = byPurpose.get(p.ruleDate);
    if (direct && !used.has(direct.id)) return direct;
    for (const d of [p.ruleDate, p.workingDate, p.plannedDate]) {
      const hit = (byDate.get(d) ?? [])
        .filter((e) => !used.has(e.id))
        .sort((x, y) => Number(x.state === 'cancelled') - Number(y.state === 'cancelled'))[0];
      if (hit) return hit;
    }
    return undefined;
  };
  const visits: PlanVisit[] = [];
  /** Unplaced visits matched by date that do not carry their rule date yet: apply records it. */
  const adopt: { id: string; ruleDate: string }[] = [];
  for (const { workingDate: _w, ...p } of planned) {
    const e = find({ ...p, workingDate: _w });
    if (e) used.add(e.id);
    if (!e || e.state === 'cancelled') visits.push({ ...p, action: 'new', workOrderId: e?.id ?? null, state: e?.state ?? null });
    else if (e.state !== 'unplaced')
      visits.push({ ...p, plannedDate: e.plannedDate ?? p.plannedDate, moved: null, action: 'locked', workOrderId: e.id, state: e.state });
    else {
      visits.push({ ...p, action: e.plannedDate === p.plannedDate ? 'keep' : 'move', workOrderId: e.id, state: e.state });
      if (e.purpose !== purposeOf(p.ruleDate)) adopt.push({ id: e.id, ruleDate: p.ruleDate });
    }
  }
  for (const e of existing) {
    if (used.has(e.id) || e.state === 'cancelled') continue;
    const ruleDate = ruleDateOf(e.purpose) ?? e.plannedDate ?? '';
    const base = { ruleDate, plannedDate: e.plannedDate ?? ruleDate, moved: null, workOrderId: e.id, state: e.state };
    if (e.state !== 'unplaced') visits.push({ ...base, action: 'locked' });
    else if ((e.plannedDate ?? '') >= today) visits.push({ ...base, action: 'cancel' });
    // Unplaced visits already in the past stay as they are: PM completion counts them as missed.
  }
  visits.sort((x, y) => x.plannedDate.localeCompare(y.plannedDate) || x.ruleDate.localeCompare(y.ruleDate));
  const counts: PlanPreview['counts'] = { new: 0, keep: 0, move: 0, locked: 0, cancel: 0 };
  for (const v of visits) counts[v.action]++;
  return { a, tz, visits, counts, adopt, dropped };
}

export async function previewPlan(ctx: AppContext, user: SessionUser, id: string): Promise<PlanPreview> {
  const { visits, counts, dropped } = await computePlan(ctx.db, ctx, user, id, false);
  return { agreementId: id, visits, counts, dropped };
}

export async function applyPlan(ctx: AppContext, user: SessionUser, id: string): Promise<PlanPreview & { applied: true }> {
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const { a, tz, visits, counts, adopt, dropped } = await computePlan(tx, ctx, user, id, true);
    const unitRows = await coveredUnits(tx, id);
    const complaint = [
      `Planned maintenance: ${a.name}.`,
      unitRows.length ? `Units: ${unitRows.map((u) => u.tag).join(', ')}.` : '',
      a.tasks.length ? `Tasks: ${a.tasks.join('; ')}.` : '',
    ]
      .filter(Boolean)
      .join(' ');
    const now = ctx.clock.now();
    const values = (v: PlanVisit) => ({
      purpose: purposeOf(v.ruleDate),
      plannedDate: v.plannedDate,
      latestAt: new Date(zonedInstant(addDays(v.plannedDate, PM_GRACE_DAYS), '23:59', tz)),
      estimatedMinutes: a.visitMinutes,
      complaint,
      updatedAt: now,
    });
    const fresh = visits.filter((v) => v.action === 'new' && !v.workOrderId);
    if (fresh.length) {
      await insertWorkOrders(
        tx,
        fresh.map((v) => ({
          branchId: a.branchId,
          siteId: a.siteId,
          unitId: unitRows.length === 1 ? unitRows[0]!.id : null,
          agreementId: a.id,
          kind: 'planned_maintenance' as const,
          state: 'unplaced' as const,
          priority: 'normal' as const,
          createdById: user.id,
          ...values(v),
        })),
      );
    }
    for (const v of visits) {
      if (!v.workOrderId) continue;
      // Each update re-checks the state it was planned from, so a visit booked meanwhile is left alone.
      if (v.action === 'new') {
        await updateWorkOrderIfState(tx, v.workOrderId, 'cancelled', { ...values(v), state: 'unplaced' });
      } else if (v.action === 'move') {
        await updateWorkOrderIfState(tx, v.workOrderId, 'unplaced', values(v));
      } else if (v.action === 'cancel') {
        await updateWorkOrderIfState(tx, v.workOrderId, 'unplaced', { state: 'cancelled', updatedAt: now });
      }
    }
    for (const x of adopt) {
      await updateWorkOrderIfState(tx, x.id, 'unplaced', { purpose: purposeOf(x.ruleDate) });
    }
    await insertAudit(tx, user.id, 'agreement.plan_applied', id, counts);
    return { agreementId: id, visits, counts, dropped, applied: true as const };
  });
}

/* ------------------------------------------------------------- PM completion */

const zero = (): PmCounts => ({ due: 0, onTime: 0, late: 0, missed: 0, open: 0 });

/**
 * Planned visits due (planned date on or before today) since `from`, per agreement and branch:
 * done on time (closed within PM_GRACE_DAYS of the planned date), late (closed after that),
 * missed (not closed and past the grace days), open (not closed, still within them). Plus the
 * active agreements ending within RENEWAL_DAYS.
 */
export async function pmCompletion(
  ctx: AppContext,
  user: SessionUser,
  q: { branchId?: string | undefined; from?: string | undefined },
): Promise<PmCompletionResponse> {
  const now = ctx.clock.now();
  const from = q.from ?? addDays(zonedDate(now, 'UTC'), -365);
  const branchRows = await scopedBranches(ctx.db, user, q.branchId);
  const out: PmCompletionResponse = { from, graceDays: PM_GRACE_DAYS, branches: [], agreements: [], renewals: [] };
  if (branchRows.length === 0) return out;
  const branchIds = branchRows.map((b) => b.id);
  const [wos, ags] = await Promise.all([pmWorkOrders(ctx.db, branchIds, from), branchAgreements(ctx.db, branchIds)]);
  const tzOf = new Map(branchRows.map((b) => [b.id, b.timeZone]));
  const todayOf = new Map(branchRows.map((b) => [b.id, todayIn(b.timeZone, now)]));
  const byBranch = new Map(branchRows.map((b) => [b.id, zero()]));
  const byAgreement = new Map<string, PmCounts>();
  for (const w of wos) {
    const today = todayOf.get(w.branchId)!;
    if (!w.plannedDate || w.plannedDate > today) continue;
    const graceEnd = addDays(w.plannedDate, PM_GRACE_DAYS);
    const closed = w.state === 'closed' && w.closedAt ? zonedDate(w.closedAt, tzOf.get(w.branchId)!) : null;
    const kind: keyof PmCounts = closed ? (closed <= graceEnd ? 'onTime' : 'late') : today > graceEnd ? 'missed' : 'open';
    for (const c of [
      byBranch.get(w.branchId)!,
      w.agreementId ? (byAgreement.get(w.agreementId) ?? byAgreement.set(w.agreementId, zero()).get(w.agreementId)!) : null,
    ]) {
      if (!c) continue;
      c.due++;
      c[kind]++;
    }
  }
  out.branches = branchRows.map((b) => ({ branchId: b.id, branchName: b.name, ...byBranch.get(b.id)! }));
  for (const { a, siteName, customerName } of ags) {
    const counts = byAgreement.get(a.id);
    if (counts) out.agreements.push({ agreementId: a.id, branchId: a.branchId, name: a.name, siteName, ...counts });
    const today = todayOf.get(a.branchId)!;
    const daysLeft = daysFrom(today, a.termEnd);
    if (a.status === 'active' && daysLeft >= 0 && daysLeft <= RENEWAL_DAYS) {
      out.renewals.push({
        agreementId: a.id,
        branchId: a.branchId,
        name: a.name,
        siteName,
        customerName,
        termEnd: a.termEnd,
        daysLeft,
        priceCents: a.priceCents,
      });
    }
  }
  out.renewals.sort((x, y) => x.daysLeft - y.daysLeft);
  return out;
}
