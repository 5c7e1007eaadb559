/** The Watchlist: repeat-alarm units, leak cases with their deadlines, return visits to book. */
import { and, asc, desc, eq, gte, inArray, isNotNull, isNull, ne, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import {
  recordDate,
  DUE_SOON_DAYS,
  type LeakCasePatch,
  type LeakCaseRow,
  type LeakDeadline,
  type QueueReturnVisit,
  type RepeatAlarmResponse,
  type RepeatAlarmUnit,
  type ReturnVisitRow,
  type SessionUser,
  type VerificationTestInput,
  type BookRepair,
  type LeakCaseStatus,
  type ApplianceCategory,
  type LeakObligationState,
  leakObligationStateLabels,
  workOrderLabel,
} from '@coilpath/contract';
import {
  LEAK_RULES,
  addDays,
  daysFrom,
  repeatAlarms,
  requiredCertificationFor,
  sameCode,
  verificationDeadlines,
  zonedInstant,
} from '@coilpath/calc';
import type { AppContext } from '../../context';
import type { Db, Tx } from '../../db/client';
import {
  alarms,
  auditEvents,
  branches,
  findings,
  leakCases,
  refrigerantEvents,
  sites,
  units,
  users,
  verificationTests,
  visits,
  workOrders,
} from '../../db/schema';
import { assertBranch } from '../../auth/policy';
import { HttpError, conflict, notFound, unprocessable } from '../../lib/errors';
import { branchFilter, branchesById, branchesInScope, todayIn, type BranchInfo } from './scope';
import { buildLedger, loadLedgerSource } from '../unit-file/refrigerant-record';
import {
  OpenReturnChanged,
  findOpenReturn,
  isOpenState,
  joinOpenReturn,
  leakRepairLatestAt,
  openReturnExists,
  withOneOpenReturn,
} from '../work-orders/open-return';
import { actAs } from '../events/actor';

/* ------------------------------------------------------------ repeat alarms */

/**
 * Units with the same alarm code at least N times in the last M days (the branch's rule), as of
 * `asOf`, with the work done on them since the first of those alarms and the findings recorded.
 */
export async function repeatAlarmUnits(ctx: AppContext, scope: BranchInfo[], asOf: Date): Promise<RepeatAlarmResponse> {
  const out: RepeatAlarmResponse = {
    asOf: asOf.toISOString(),
    rules: scope.map((b) => ({ branchId: b.id, minCount: b.repeatAlarmCount, windowDays: b.repeatAlarmDays })),
    units: [],
  };
  if (scope.length === 0) return out;
  const maxDays = Math.max(...scope.map((b) => b.repeatAlarmDays));
  const since = new Date(asOf.getTime() - maxDays * 86_400_000);
  const rows = await ctx.db
    .select({ branchId: alarms.branchId, unitId: alarms.unitId, circuit: alarms.circuit, code: alarms.code, raisedAt: alarms.raisedAt })
    .from(alarms)
    .where(
      and(
        inArray(
          alarms.branchId,
          scope.map((b) => b.id),
        ),
        gte(alarms.raisedAt, since),
        sql`${alarms.raisedAt} <= ${asOf.toISOString()}`,
      ),
    );

  const groups: {
    branchId: string;
    unitId: string;
    code: string;
    count: number;
    first: string;
    last: string;
    circuits: (string | number)[];
  }[] = [];
  for (const b of scope) {
    const mine = rows.filter((r) => r.branchId === b.id);
    for (const g of repeatAlarms(mine, { windowDays: b.repeatAlarmDays, minCount: b.repeatAlarmCount, asOf })) {
      groups.push({ branchId: b.id, ...g });
    }
  }
  if (groups.length === 0) return out;

  const unitIds = [...new Set(groups.map((g) => g.unitId))];
  const earliest = new Date(Math.min(...groups.map((g) => Date.parse(g.first))) - 86_400_000);
  const [unitRows, woRows, findingRows] = await Promise.all([
    ctx.db
      .select({
        id: units.id,
        tag: units.tag,
        make: units.make,
        model: units.model,
        serial: units.serial,
        siteId: units.siteId,
        siteName: sites.name,
      })
      .from(units)
      .innerJoin(sites, eq(sites.id, units.siteId))
      .where(inArray(units.id, unitIds)),
    ctx.db
      .select({
        workOrderId: workOrders.id,
        unitId: workOrders.unitId,
        number: workOrders.number,
        kind: workOrders.kind,
        state: workOrders.state,
        createdAt: workOrders.createdAt,
        closedAt: visits.closedAt,
        outcome: visits.outcome,
        techName: users.name,
      })
      .from(workOrders)
      .leftJoin(visits, eq(visits.workOrderId, workOrders.id))
      .leftJoin(users, eq(users.id, visits.techId))
      .where(and(inArray(workOrders.unitId, unitIds), gte(workOrders.createdAt, earliest), ne(workOrders.kind, 'planned_maintenance')))
      .orderBy(asc(workOrders.createdAt), asc(visits.createdAt)),
    ctx.db
      .select({
        id: findings.id,
        unitId: findings.unitId,
        causeCode: findings.causeCode,
        origin: findings.origin,
        alarmCode: findings.alarmCode,
        reportedCircuit: findings.reportedCircuit,
        actualCircuit: findings.actualCircuit,
        notes: findings.notes,
        createdAt: findings.createdAt,
      })
      .from(findings)
      .where(and(inArray(findings.unitId, unitIds), gte(findings.createdAt, earliest)))
      .orderBy(asc(findings.createdAt)),
  ]);
  const unitById = new Map(unitRows.map((u) => [u.id, u]));

  for (const g of groups) {
    const u = unitById.get(g.unitId);
    if (!u) continue;
    const from = Date.parse(g.first) - 86_400_000;
    // One line per work order, with its latest visit.
    const byWo = new Map<string, RepeatAlarmUnit['visits'][number]>();
    for (const w of woRows) {
      if (w.unitId !== g.unitId || w.createdAt.getTime() < from) continue;
      byWo.set(w.workOrderId, {
        workOrderId: w.workOrderId,
        number: w.number,
        kind: w.kind,
        state: w.state,
        closedAt: w.closedAt?.toISOString() ?? null,
        outcome: w.outcome,
        techName: w.techName,
      });
    }
    const f = findingRows
      .filter(
        (x) =>
          x.unitId === g.unitId && x.createdAt.getTime() >= from && (x.alarmCode === null || sameCode(x.alarmCode) === sameCode(g.code)),
      )
      .map((x) => ({ ...x, createdAt: x.createdAt.toISOString() }));
    out.units.push({
      unitId: g.unitId,
      branchId: g.branchId,
      unitTag: u.tag,
      make: u.make,
      model: u.model,
      serial: u.serial,
      siteId: u.siteId,
      siteName: u.siteName,
      code: g.code,
      count: g.count,
      first: g.first,
      last: g.last,
      circuits: g.circuits,
      circuitMismatch: f.some((x) => x.reportedCircuit !== null && x.actualCircuit !== null && x.reportedCircuit !== x.actualCircuit),
      visits: [...byWo.values()],
      findings: f.map(({ unitId: _u, ...rest }) => rest),
    });
  }
  return out;
}

/* ---------------------------------------------------------------- leak cases */

const ACTIVE: LeakCaseStatus[] = ['open', 'repaired', 'retrofit_planned', 'retire_planned'];

/** Days to make a retrofit or retirement plan, and to carry it out (LEAK-RULES.md §1 (h)-(i) [S/M], §2 (h) [S]). */
export const PLAN_DAYS = 30;
export const PLAN_COMPLETE_DAYS = 365;

/** Section letters and LEAK-RULES.md tags for each deadline, by rule. */
function sourceOf(rule: string, what: LeakDeadline['what']): string {
  const part84 = rule.includes('84.');
  const sec = part84 ? '40 CFR 84.106' : rule.includes('82.156') ? '40 CFR 82.156(i)' : '40 CFR 82.157';
  switch (what) {
    case 'repair':
      return `${sec}(d): repair within 30 days of the addition that showed the leak rate over the threshold ${part84 ? '[S]' : '[M]'}`;
    case 'initial_verification':
      return `${sec}(e): initial verification test within the repair window ${part84 ? '[S]' : '[M]'}`;
    case 'follow_up_verification':
      return `${sec}(e): follow-up verification test within 10 days of a successful initial test ${part84 ? '[S]' : '[M]'}`;
    case 'retrofit_retire_plan':
      return `${sec}(h): retrofit or retirement plan within 30 days ${part84 ? '[S]' : '[S/M]'}`;
    case 'retrofit_retire_complete':
      return `${sec}(h)-(i): retrofit or retirement done within one year of the plan ${part84 ? '[S]' : '[S/M]'}`;
  }
}

interface CaseBase {
  rule: string;
  openedOn: string;
  repairDueDate: string;
  repairedOn: string | null;
  status: LeakCaseStatus;
  planKind: 'retrofit' | 'retire' | null;
  planDueDate: string | null;
}

/**
 * The deadlines of a leak case and their state on `today` (the branch's date). Repair and the
 * initial verification test are due by the repair due date; the follow-up test `followUpVerificationDays`
 * (10) after a passed initial test (calc `verificationDeadlines`). A retrofit/retire plan replaces them.
 */
export function leakDeadlines(
  c: CaseBase,
  tests: { kind: 'initial' | 'follow_up'; testedOn: string; passed: boolean }[],
  today: string,
): LeakDeadline[] {
  const mk = (what: LeakDeadline['what'], due: string, met: boolean): LeakDeadline => {
    const daysLeft = daysFrom(today, due);
    const state = met ? 'met' : daysLeft < 0 ? 'overdue' : daysLeft <= DUE_SOON_DAYS ? 'due_soon' : 'ok';
    return { what, due, daysLeft, state, source: sourceOf(c.rule, what) };
  };
  if (c.planKind) {
    return [
      mk('retrofit_retire_plan', addDays(c.openedOn, PLAN_DAYS), true),
      mk('retrofit_retire_complete', c.planDueDate ?? addDays(c.openedOn, PLAN_DAYS + PLAN_COMPLETE_DAYS), c.status === 'closed'),
    ];
  }
  const followUpDays = LEAK_RULES.find((r) => r.rule === c.rule)?.followUpVerificationDays ?? 10;
  const initialPassed = tests.filter((t) => t.kind === 'initial' && t.passed).sort((a, b) => a.testedOn.localeCompare(b.testedOn))[0];
  const followUpPassed = tests.some((t) => t.kind === 'follow_up' && t.passed);
  const v = verificationDeadlines({
    repairDueDate: c.repairDueDate,
    followUpDays,
    ...(initialPassed ? { initialTestDate: initialPassed.testedOn } : {}),
  });
  const list = [
    mk('repair', c.repairDueDate, c.repairedOn !== null),
    mk('initial_verification', v.initialTestDue, initialPassed !== undefined),
  ];
  if (v.followUpDue) list.push(mk('follow_up_verification', v.followUpDue, followUpPassed));
  return list;
}

export async function listLeakCases(
  ctx: AppContext,
  user: SessionUser,
  q: { branchId?: string | undefined; status: 'active' | 'closed' | 'all' },
  onlyIds?: string[],
): Promise<LeakCaseRow[]> {
  const statusCond =
    q.status === 'active' ? inArray(leakCases.status, ACTIVE) : q.status === 'closed' ? eq(leakCases.status, 'closed') : undefined;
  const rows = await ctx.db
    .select({
      c: leakCases,
      unitTag: units.tag,
      make: units.make,
      model: units.model,
      refrigerant: units.refrigerant,
      fullChargeLb: units.fullChargeLb,
      applianceCategory: units.applianceCategory,
      siteName: sites.name,
      woId: workOrders.id,
      woNumber: workOrders.number,
      woState: workOrders.state,
    })
    .from(leakCases)
    .innerJoin(units, eq(units.id, leakCases.unitId))
    .innerJoin(sites, eq(sites.id, units.siteId))
    .leftJoin(workOrders, eq(workOrders.id, leakCases.repairWorkOrderId))
    .where(and(branchFilter(user, q.branchId, leakCases.branchId), statusCond, onlyIds ? inArray(leakCases.id, onlyIds) : undefined))
    .orderBy(asc(leakCases.repairDueDate));
  if (rows.length === 0) return [];
  const repairIds = [...new Set(rows.flatMap((r) => (r.woId ? [r.woId] : [])))];
  const [tests, branchMap, repairVisits] = await Promise.all([
    ctx.db
      .select()
      .from(verificationTests)
      .where(
        inArray(
          verificationTests.leakCaseId,
          rows.map((r) => r.c.id),
        ),
      )
      .orderBy(asc(verificationTests.testedOn), asc(verificationTests.createdAt)),
    branchesById(
      ctx.db,
      rows.map((r) => r.c.branchId),
    ),
    repairIds.length
      ? ctx.db
          .select({ id: visits.id, workOrderId: visits.workOrderId })
          .from(visits)
          .where(inArray(visits.workOrderId, repairIds))
          .orderBy(desc(visits.createdAt))
      : Promise.resolve([]),
  ]);
  // The latest visit of each repair work order (the list is newest first).
  const visitOf = new Map<string, string>();
  for (const v of repairVisits) if (!visitOf.has(v.workOrderId)) visitOf.set(v.workOrderId, v.id);
  const now = ctx.clock.now();
  const states = await obligationStates(
    ctx.db,
    rows.map((r) => ({
      id: r.c.unitId,
      refrigerant: r.refrigerant,
      fullChargeLb: r.fullChargeLb,
      applianceCategory: r.applianceCategory,
      timeZone: branchMap.get(r.c.branchId)?.timeZone ?? 'UTC',
    })),
    now,
  );
  const list = rows.map((r): LeakCaseRow => {
    const c = r.c;
    const today = todayIn(branchMap.get(c.branchId)?.timeZone ?? 'UTC', now);
    const t = tests.filter((x) => x.leakCaseId === c.id);
    const deadlines = leakDeadlines(c, t, today);
    const next = deadlines.filter((d) => d.state !== 'met').sort((a, b) => a.due.localeCompare(b.due))[0] ?? null;
    return {
      id: c.id,
      branchId: c.branchId,
      unitId: c.unitId,
      unitTag: r.unitTag,
      siteName: r.siteName,
      make: r.make,
      model: r.model,
      refrigerant: r.refrigerant,
      fullChargeLb: r.fullChargeLb,
      rule: c.rule,
      method: c.method,
      thresholdPercent: c.thresholdPercent,
      leakRatePercent: c.leakRatePercent,
      openedOn: c.openedOn,
      repairDueDate: c.repairDueDate,
      repairedOn: c.repairedOn,
      chronic: c.chronic,
      status: c.status,
      obligationState: states.get(c.id) ?? null,
      planKind: c.planKind,
      planDueDate: c.planDueDate,
      notes: c.notes,
      repairWorkOrder: r.woId ? { id: r.woId, number: r.woNumber, state: r.woState!, visitId: visitOf.get(r.woId) ?? null } : null,
      tests: t.map((x) => ({ id: x.id, kind: x.kind, testedOn: x.testedOn, passed: x.passed, notes: x.notes })),
      deadlines,
      next,
      requiredCertification: requiredCertificationFor({ fullChargeLb: r.fullChargeLb }) ?? 'II',
      today,
    };
  });
  // The most urgent first: nearest unmet deadline, then cases with every deadline met.
  return list.sort((a, b) => (a.next?.due ?? '9999').localeCompare(b.next?.due ?? '9999'));
}

/**
 * The state of each leak case's obligation in its unit's refrigerant record (the ledger of
 * `leakObligations`, one per unit), by case id. A case the record has no obligation for is absent.
 */
async function obligationStates(
  db: Db | Tx,
  unitList: { id: string; refrigerant: string; fullChargeLb: number; applianceCategory: ApplianceCategory; timeZone: string }[],
  now: Date,
): Promise<Map<string, LeakObligationState>> {
  const out = new Map<string, LeakObligationState>();
  const seen = new Set<string>();
  for (const u of unitList) {
    if (seen.has(u.id)) continue;
    seen.add(u.id);
    const ledger = buildLedger(await loadLedgerSource(db, u), todayIn(u.timeZone, now));
    for (const o of ledger.obligations) if (o.leakCaseId) out.set(o.leakCaseId, o.state);
  }
  return out;
}

async function oneCase(ctx: AppContext, user: SessionUser, id: string): Promise<LeakCaseRow> {
  const [row] = await listLeakCases(ctx, user, { status: 'all' }, [id]);
  if (!row) throw notFound('leak case');
  return row;
}

async function loadCase(tx: Tx, user: SessionUser, id: string) {
  const [c] = await tx.select().from(leakCases).where(eq(leakCases.id, id)).limit(1);
  if (!c) throw notFound('leak case');
  assertBranch(user, c.branchId, 'leak case');
  return c;
}

async function audit(tx: Tx, user: SessionUser, action: string, entity: string, entityId: string, details: Record<string, unknown>) {
  await tx.insert(auditEvents).values({ actorId: user.id, action, entity, entityId, details });
}

/**
 * Books the repair of a leak case as a return visit: an unplaced work order (so it sits in the Roster's
 * queue) with the EPA 608 certification the refrigerant work needs and the repair due date as the latest
 * booking. When the unit already has an open return visit (a close-out's), the repair joins it instead: the
 * case links to it and it gains the leak search, the certification and the earlier deadline. While the case's
 * repair visit is open, a second request answers 409 `open_return_exists` naming it (`details.workOrderId`).
 */
export async function bookLeakRepair(
  ctx: AppContext,
  user: SessionUser,
  id: string,
  input: { priority: BookRepair['priority'] & string; notes?: string | undefined },
) {
  const booked = await withOneOpenReturn(ctx.db, () =>
    ctx.db.transaction(async (tx) => {
      await actAs(tx, user.id);
      const c = await loadCase(tx, user, id);
      if (c.repairWorkOrderId) {
        const [wo] = await tx
          .select({ id: workOrders.id, number: workOrders.number, state: workOrders.state, unitId: workOrders.unitId })
          .from(workOrders)
          .where(eq(workOrders.id, c.repairWorkOrderId));
        if (wo && isOpenState(wo.state)) {
          throw await openReturnExists(
            tx,
            wo,
            `The repair visit already exists: ${workOrderLabel(wo.number)} (${wo.state.replace('_', ' ')}).`,
          );
        }
      }
      if (c.status !== 'open')
        throw unprocessable(`Only an open leak case needs a repair visit; this one is ${c.status.replace('_', ' ')}.`);
      const [u] = await tx
        .select({
          id: units.id,
          siteId: units.siteId,
          tag: units.tag,
          refrigerant: units.refrigerant,
          fullChargeLb: units.fullChargeLb,
          branchTz: branches.timeZone,
        })
        .from(units)
        .innerJoin(branches, eq(branches.id, units.branchId))
        .where(eq(units.id, c.unitId));
      if (!u) throw notFound('unit');
      const now = ctx.clock.now();
      const latestAt = leakRepairLatestAt(c.repairDueDate, u.branchTz);
      const requiredCertification = requiredCertificationFor({ fullChargeLb: u.fullChargeLb }) ?? 'II';
      const complaint = [
        `Leak repair on ${u.tag} (${u.refrigerant}, full charge ${u.fullChargeLb} lb): leak rate ${c.leakRatePercent.toFixed(1)} %/yr is over the ${c.thresholdPercent} % threshold (${c.rule}).`,
        `Repair by ${c.repairDueDate}, with the initial verification test in the same window.`,
        input.notes ?? '',
      ]
        .filter(Boolean)
        .join(' ');

      let workOrderId: string;
      const open = await findOpenReturn(tx, u.id, { lock: true });
      if (open) {
        // One truck roll: the repair rides on the return visit already waiting for this unit.
        await joinOpenReturn(
          tx,
          open,
          {
            needs: ['leak_search'],
            latestAt,
            priority: input.priority,
            complaint,
            estimatedMinutes: 180,
            requiredCertification,
            leakCaseId: c.id,
          },
          now,
        );
        workOrderId = open.id;
      } else {
        let originWorkOrderId: string | null = null;
        if (c.triggeringEventId) {
          const [o] = await tx
            .select({ workOrderId: visits.workOrderId })
            .from(refrigerantEvents)
            .innerJoin(visits, eq(visits.id, refrigerantEvents.visitId))
            .where(eq(refrigerantEvents.id, c.triggeringEventId));
          originWorkOrderId = o?.workOrderId ?? null;
        }
        const [wo] = await tx
          .insert(workOrders)
          .values({
            branchId: c.branchId,
            siteId: u.siteId,
            unitId: u.id,
            kind: 'return_visit',
            state: 'unplaced',
            priority: input.priority,
            complaint,
            latestAt,
            requiredCertification,
            estimatedMinutes: 180,
            leakCaseId: c.id,
            originWorkOrderId,
            returnNeeds: ['leak_search'],
            purpose: `leak-case:${c.id}`,
            createdById: user.id,
          })
          .returning({ id: workOrders.id });
        workOrderId = wo!.id;
      }
      // Only the first of two racing requests links the case; the other rolls back and runs again (then 409).
      const linked = await tx
        .update(leakCases)
        .set({ repairWorkOrderId: workOrderId, updatedAt: now })
        .where(
          and(
            eq(leakCases.id, c.id),
            c.repairWorkOrderId ? eq(leakCases.repairWorkOrderId, c.repairWorkOrderId) : isNull(leakCases.repairWorkOrderId),
          ),
        )
        .returning({ id: leakCases.id });
      if (linked.length === 0) throw new OpenReturnChanged();
      await audit(tx, user, open ? 'leak_case.repair_joined' : 'leak_case.repair_booked', 'leak_case', c.id, { workOrderId });
      return { workOrderId, joined: open !== null };
    }),
  );
  const leakCase = await oneCase(ctx, user, id);
  return { leakCase, ...booked };
}

export async function patchLeakCase(ctx: AppContext, user: SessionUser, id: string, patch: LeakCasePatch): Promise<LeakCaseRow> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const c = await loadCase(tx, user, id);
    const [b] = (await branchesById(tx, [c.branchId])).values();
    const today = todayIn(b?.timeZone ?? 'UTC', ctx.clock.now());
    const now = ctx.clock.now();
    if (c.status === 'closed') throw unprocessable('This leak case is closed.');
    if (patch.action === 'repaired') {
      if (c.status !== 'open') throw unprocessable(`Only an open case can be marked repaired; this one is ${c.status.replace('_', ' ')}.`);
      if (patch.repairedOn > today) throw unprocessable('The repair date is in the future.');
      if (patch.repairedOn < c.openedOn) throw unprocessable(`The repair date is before the case opened (${recordDate(c.openedOn)}).`);
      await tx
        .update(leakCases)
        .set({ status: 'repaired', repairedOn: patch.repairedOn, notes: patch.notes ?? c.notes, updatedAt: now })
        .where(eq(leakCases.id, id));
    } else if (patch.action === 'close') {
      const tests = await tx.select().from(verificationTests).where(eq(verificationTests.leakCaseId, id));
      const followUpPassed = tests.some((t) => t.kind === 'follow_up' && t.passed);
      const planned = c.status === 'retrofit_planned' || c.status === 'retire_planned';
      if (!followUpPassed && !planned) {
        throw unprocessable(
          'A leak case closes after a passed follow-up verification test (40 CFR 82.157(e) [M], 84.106(e) [S]). Record the tests first, or mark a retrofit or retirement plan.',
        );
      }
      // The unit's refrigerant record must agree: its obligation for this case verified (tests after the repair) or under a plan.
      const [u] = await tx
        .select({
          id: units.id,
          refrigerant: units.refrigerant,
          fullChargeLb: units.fullChargeLb,
          applianceCategory: units.applianceCategory,
        })
        .from(units)
        .where(eq(units.id, c.unitId));
      const state = (await obligationStates(tx, [{ ...u!, timeZone: b?.timeZone ?? 'UTC' }], now)).get(c.id);
      if (state === 'open' || state === 'overdue' || state === 'repaired') {
        throw unprocessable(
          `The unit’s refrigerant record shows this leak’s repair obligation as “${leakObligationStateLabels[state]}”: a passed initial and a passed follow-up verification test, both on or after the repair date, close it (40 CFR 82.157(e) [M], 84.106(e) [S]).`,
        );
      }
      await tx
        .update(leakCases)
        .set({ status: 'closed', closedAt: now, notes: patch.notes ?? c.notes, updatedAt: now })
        .where(eq(leakCases.id, id));
    } else {
      await tx
        .update(leakCases)
        .set({
          status: patch.planKind === 'retrofit' ? 'retrofit_planned' : 'retire_planned',
          planKind: patch.planKind,
          // The plan must be carried out within one year (82.157(h)-(i) [S/M], 84.106(h)-(i) [S]).
          planDueDate: addDays(today, PLAN_COMPLETE_DAYS),
          notes: patch.notes ?? c.notes,
          updatedAt: now,
        })
        .where(eq(leakCases.id, id));
    }
    await audit(tx, user, `leak_case.${patch.action}`, 'leak_case', id, patch);
  });
  return oneCase(ctx, user, id);
}

/**
 * Records an initial or follow-up verification test. A follow-up needs a passed initial test on or
 * before its date; a passed initial test marks an open case repaired (on the test date, unless a
 * repair date is already recorded); a failed one re-opens a repaired case.
 */
export async function addVerificationTest(
  ctx: AppContext,
  user: SessionUser,
  id: string,
  input: VerificationTestInput,
): Promise<LeakCaseRow> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const c = await loadCase(tx, user, id);
    if (c.status === 'closed') throw unprocessable('This leak case is closed.');
    const [b] = (await branchesById(tx, [c.branchId])).values();
    const today = todayIn(b?.timeZone ?? 'UTC', ctx.clock.now());
    if (input.testedOn > today) throw unprocessable('The test date is in the future.');
    if (input.testedOn < c.openedOn) throw unprocessable(`The test date is before the case opened (${recordDate(c.openedOn)}).`);
    const tests = await tx.select().from(verificationTests).where(eq(verificationTests.leakCaseId, id));
    if (input.kind === 'follow_up' && !tests.some((t) => t.kind === 'initial' && t.passed && t.testedOn <= input.testedOn)) {
      throw unprocessable(
        'Record a passed initial verification test first: the follow-up test comes after it (40 CFR 82.157(e) [M], 84.106(e) [S]).',
      );
    }
    await tx.insert(verificationTests).values({
      leakCaseId: id,
      kind: input.kind,
      testedOn: input.testedOn,
      passed: input.passed,
      notes: input.notes ?? null,
      byUserId: user.id,
    });
    const now = ctx.clock.now();
    if (input.kind === 'initial' && input.passed && c.status === 'open') {
      await tx
        .update(leakCases)
        .set({ status: 'repaired', repairedOn: c.repairedOn ?? input.testedOn, updatedAt: now })
        .where(eq(leakCases.id, id));
    } else if (!input.passed && c.status === 'repaired') {
      await tx.update(leakCases).set({ status: 'open', updatedAt: now }).where(eq(leakCases.id, id));
    }
    await audit(tx, user, 'leak_case.verification_test', 'leak_case', id, { ...input });
  });
  return oneCase(ctx, user, id);
}

/* ------------------------------------------------------------ return visits */

const origin = alias(workOrders, 'origin');

/** Return visits from close-outs (`needs_return`) still unplaced, oldest close-out first. */
export async function listReturnVisits(
  ctx: AppContext,
  user: SessionUser,
  branchId: string | undefined,
  onlyId?: string,
): Promise<ReturnVisitRow[]> {
  const rows = await ctx.db
    .select({
      workOrderId: workOrders.id,
      number: workOrders.number,
      branchId: workOrders.branchId,
      siteName: sites.name,
      unitId: workOrders.unitId,
      unitTag: units.tag,
      priority: workOrders.priority,
      latestAt: workOrders.latestAt,
      createdAt: workOrders.createdAt,
      complaint: workOrders.complaint,
      woNeeds: workOrders.returnNeeds,
      visitNeeds: visits.returnNeeds,
      returnNotes: visits.returnNotes,
      originId: origin.id,
      originNumber: origin.number,
      closedAt: visits.closedAt,
      techName: users.name,
    })
    .from(workOrders)
    .innerJoin(origin, eq(origin.id, workOrders.originWorkOrderId))
    .innerJoin(visits, and(eq(visits.workOrderId, origin.id), eq(visits.outcome, 'needs_return')))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .leftJoin(units, eq(units.id, workOrders.unitId))
    .leftJoin(users, eq(users.id, visits.techId))
    .where(
      and(
        branchFilter(user, branchId, workOrders.branchId),
        eq(workOrders.kind, 'return_visit'),
        eq(workOrders.state, 'unplaced'),
        isNotNull(workOrders.originWorkOrderId),
        onlyId ? eq(workOrders.id, onlyId) : undefined,
      ),
    )
    .orderBy(asc(visits.closedAt), asc(workOrders.createdAt), desc(visits.createdAt));
  const byWo = new Map<string, ReturnVisitRow>();
  for (const r of rows) {
    if (byWo.has(r.workOrderId)) continue;
    byWo.set(r.workOrderId, {
      workOrderId: r.workOrderId,
      number: r.number,
      branchId: r.branchId,
      siteName: r.siteName,
      unitId: r.unitId,
      unitTag: r.unitTag,
      priority: r.priority,
      latestAt: r.latestAt?.toISOString() ?? null,
      createdAt: r.createdAt.toISOString(),
      complaint: r.complaint,
      returnNeeds: r.woNeeds.length ? r.woNeeds : r.visitNeeds,
      returnNotes: r.returnNotes,
      origin: { workOrderId: r.originId, number: r.originNumber, closedAt: r.closedAt?.toISOString() ?? null, techName: r.techName },
    });
  }
  return [...byWo.values()];
}

/** Sets a return visit's priority and latest booking date (end of that day in the branch's zone) for the Roster queue. */
export async function queueReturnVisit(ctx: AppContext, user: SessionUser, id: string, input: QueueReturnVisit): Promise<ReturnVisitRow> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const [wo] = await tx.select().from(workOrders).where(eq(workOrders.id, id)).limit(1);
    if (!wo || wo.kind !== 'return_visit') throw notFound('return visit');
    assertBranch(user, wo.branchId, 'return visit');
    if (wo.state !== 'unplaced')
      throw conflict('not_unplaced', `This return visit is already ${wo.state.replace('_', ' ')}; change it on the Roster.`);
    const [b] = (await branchesById(tx, [wo.branchId])).values();
    const tz = b?.timeZone ?? 'UTC';
    if (input.latestDate < todayIn(tz, ctx.clock.now())) throw unprocessable('The latest date is in the past; pick today or later.');
    await tx
      .update(workOrders)
      .set({ priority: input.priority, latestAt: new Date(zonedInstant(input.latestDate, '23:59', tz)), updatedAt: ctx.clock.now() })
      .where(eq(workOrders.id, id));
    await audit(tx, user, 'return_visit.queued', 'work_order', id, { ...input });
  });
  const [row] = await listReturnVisits(ctx, user, undefined, id);
  if (!row) throw new HttpError(404, 'not_found', 'No such return visit.');
  return row;
}

/** Units of the branches in scope with their site (the alarm form's and agreement form's pickers). */
export async function unitChoices(ctx: AppContext, user: SessionUser, branchId: string | undefined) {
  return ctx.db
    .select({
      id: units.id,
      branchId: units.branchId,
      tag: units.tag,
      make: units.make,
      model: units.model,
      serial: units.serial,
      refrigerant: units.refrigerant,
      siteId: sites.id,
      siteName: sites.name,
    })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(and(branchFilter(user, branchId, units.branchId), sql`${units.archivedAt} is null`))
    .orderBy(asc(sites.name), asc(units.tag))
    .limit(5000);
}

export { branchesInScope };
