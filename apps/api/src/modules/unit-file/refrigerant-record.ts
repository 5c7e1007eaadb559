/**
 * A unit's refrigerant record: the legal record of 40 CFR 82.157(l) / 84.106(l) — every addition with
 * the leak rate at that moment, every repair, verification test and retrofit/retirement plan, and the
 * repair obligations they make, computed by `leakObligations` (@coilpath/calc) over the whole ledger.
 *
 * How the stored data maps onto the ledger's events:
 * - `refrigerant_events` with pounds added → additions. Their reason marks the 82.157(b) exemptions:
 *   `initial_charge` → installation, `retrofit` → retrofit, `seasonal_variance` → seasonal variance.
 *   A `recovery` entry is refrigerant taken out, not added: it is listed but never counted.
 * - Leak grouping: an addition that triggered a leak case carries that case's id as its `leakId`.
 *   No other addition is tied to a leak in the stored data, so each other one is its own leak.
 * - `leak_cases.repaired_on` → a repair (the record keeps the latest repair date of a case).
 * - `verification_tests` → verification tests (`follow_up` → 'follow-up').
 * - A case with a retrofit/retirement plan → a plan dated `plan_due_date` − 365 days (the plan is
 *   stored with its one-year completion date, set on the day it was made).
 * - Per appliance, not per circuit: the rule defines the leak rate against "the appliance's full
 *   charge" (82.152 "leak rate" [S]), and a multi-circuit unit is one appliance with one full charge.
 *
 * Not in the stored data, so fixed here (and said so in the record): the full charge is the one
 * recorded on the unit; no industrial-process shutdown is claimed (30-day repair window); units are
 * not flagged residential/light-commercial; the leak-rate method is annualizing (as the leak cases).
 */
import {
  addDays,
  leakObligations,
  leakRepairObligation,
  verificationDeadlines,
  LEAK_RULES,
  zonedDate,
  type LedgerEvent,
  type LeakObligationsResult,
  type RefrigerantAddition,
} from '@coilpath/calc';
import {
  refrigerantRecordEventKindLabels,
  type AdditionExemptionKind,
  type RefrigerantEventReason,
  type RefrigerantRecord,
  type RefrigerantRecordEvent,
  type RefrigerantRecordObligation,
  type SessionUser,
} from '@coilpath/contract';
import type { Db, Tx } from '../../db/client';
import * as repo from './unit-file.repo';
import { readableUnit } from './unit-file.service';

/** The leak-rate method Coilpath applies (82.152: annualizing or rolling average, one per facility [S]). */
export const RECORD_METHOD = 'annualizing' as const;

/** Days between a retrofit/retirement plan and its completion date (82.157(h)-(i) [S/M], 84.106(h)-(i) [S]). */
const PLAN_COMPLETE_DAYS = 365;

export const FULL_CHARGE_BASIS = 'As recorded on the unit (nameplate or the installer’s charge; the record holds no other determination).';

export const RECORD_CAUTIONS = [
  'Leak rates, thresholds and deadlines are computed by Coilpath from the entries in this record; an entry missing here is missing from the computation.',
  'Defer to the manufacturer’s data for charge and service procedures, to local codes, and to licensed practice. Refrigerant work needs an EPA 608 certified technician.',
  'Several rule details are from secondary sources or memory (tags [S] and [M] below). Check the current eCFR before relying on them.',
];

export const RECORD_SOURCES = [
  '40 CFR 82 Subpart F, §82.157 (appliances with ozone-depleting refrigerant, 50 lb or more): rate calculated at every addition except after installation, retrofit or a seasonal variance (b) [P]; repair owed when the rate is over 20 % commercial refrigeration, 30 % industrial process, 10 % comfort cooling and other (c)(2) [P]; repair within 30 days, 120 with an industrial-process shutdown (d) [M]; initial and follow-up verification tests (e) [M]; chronic leaker at 125 % of full charge in a calendar year (j) [S]; records kept 3 years (l) [S].',
  '40 CFR 82.152 "leak rate" [S]: annualizing method — pounds added ÷ full charge ÷ (days since refrigerant was last added, at most 365, ÷ 365) × 100.',
  'Before 2019, Subpart F (more than 50 lb): 35 % commercial and industrial process, 15 % comfort cooling and other [P].',
  '40 CFR 84 Subpart C, §84.106 (HFCs and substitutes with GWP over 53, 15 lb or more, from 1 January 2026; residential and light-commercial air conditioning excluded) [S]; 89 FR 82682 (11 October 2024) [P]; same thresholds and deadlines (c)-(e) [S].',
];

const EXEMPT_BY_REASON: Partial<Record<RefrigerantEventReason, AdditionExemptionKind>> = {
  initial_charge: 'installation',
  retrofit: 'retrofit',
  seasonal_variance: 'seasonal-variance',
};

/**
 * A refrigerant entry as an addition to the leak-rate calculation: `null` for a recovery or an entry
 * with nothing added; an installation charge, retrofit or seasonal top-up is marked exempt
 * (40 CFR 82.157(b), 84.106(b)). The one mapping for the ledger and the check made at each entry.
 */
export function additionOf(
  e: { date: string; poundsAdded: number; reason: RefrigerantEventReason },
  leakId?: string,
): RefrigerantAddition | null {
  if (e.reason === 'recovery' || e.poundsAdded <= 0) return null;
  const exempt = EXEMPT_BY_REASON[e.reason];
  return { date: e.date, pounds: e.poundsAdded, ...(leakId ? { leakId } : {}), ...(exempt ? { exempt } : {}) };
}

type Person = { name: string; epa608Type: string; epa608Number: string | null } | null;

export interface LedgerSourceRows {
  unit: { refrigerant: string; fullChargeLb: number; applianceCategory: RefrigerantRecord['appliance']['applianceCategory'] };
  events: {
    id: string;
    date: string;
    poundsAdded: number;
    poundsRecovered: number;
    reason: RefrigerantEventReason;
    circuit: number | null;
    cylinderLot: string | null;
    visitId: string | null;
    createdAt: Date;
    tech: Person;
  }[];
  cases: {
    id: string;
    triggeringEventId: string | null;
    openedOn: string;
    repairedOn: string | null;
    planKind: 'retrofit' | 'retire' | null;
    planDueDate: string | null;
    createdAt: Date;
  }[];
  tests: {
    id: string;
    leakCaseId: string;
    kind: 'initial' | 'follow_up';
    testedOn: string;
    passed: boolean;
    notes: string | null;
    createdAt: Date;
    by: Person;
  }[];
}

export interface Ledger {
  events: RefrigerantRecordEvent[];
  obligations: RefrigerantRecordObligation[];
  result: LeakObligationsResult | null;
  computeError: string | null;
}

const dateOrder = (a: RefrigerantRecordEvent, b: RefrigerantRecordEvent) => {
  const order = { addition: 0, recovery: 0, repair: 1, verification: 2, 'retrofit-or-retirement-plan': 3 } as const;
  return a.date.localeCompare(b.date) || order[a.kind] - order[b.kind] || (a.recordedAt ?? '').localeCompare(b.recordedAt ?? '');
};

/**
 * The ledger of one unit as of `asOf` (the branch's date): the record's entries, the rate at each
 * counted addition, and the obligations of `leakObligations`, each with its leak case and timeline.
 */
export function buildLedger(src: LedgerSourceRows, asOf: string): Ledger {
  const leakIdOf = new Map<string, string>();
  for (const c of src.cases) if (c.triggeringEventId) leakIdOf.set(c.triggeringEventId, c.id);

  const entries: RefrigerantRecordEvent[] = [];
  const ledgerEvents: LedgerEvent[] = [];
  const additions: RefrigerantAddition[] = [];
  const blank = {
    poundsAdded: null,
    poundsRecovered: null,
    reason: null,
    exempt: null,
    circuit: null,
    counted: false,
    leakCaseId: null,
    cylinderLot: null,
    visitId: null,
    by: null,
    stage: null,
    passed: null,
    rate: null,
    opensObligation: false,
    note: null,
  };

  for (const e of src.events) {
    const base = {
      ...blank,
      date: e.date,
      sourceId: e.id,
      recordedAt: e.createdAt.toISOString(),
      poundsAdded: e.poundsAdded,
      poundsRecovered: e.poundsRecovered,
      reason: e.reason,
      circuit: e.circuit,
      cylinderLot: e.cylinderLot,
      visitId: e.visitId,
      by: e.tech,
      leakCaseId: leakIdOf.get(e.id) ?? null,
    };
    const leakId = leakIdOf.get(e.id);
    const a = additionOf(e, leakId);
    if (!a) {
      entries.push({
        ...base,
        kind: e.poundsAdded > 0 || e.poundsRecovered > 0 || e.reason === 'recovery' ? 'recovery' : 'addition',
        note: e.poundsAdded > 0 ? 'Recorded as a recovery: not counted toward the leak rate.' : null,
      });
      continue;
    }
    const exempt = a.exempt ?? null;
    additions.push(a);
    ledgerEvents.push({ kind: 'addition', ...a });
    entries.push({
      ...base,
      kind: 'addition',
      exempt,
      counted: exempt === null,
      note: exempt ? 'Not counted toward the leak rate (40 CFR 82.157(b)).' : null,
    });
  }
  for (const c of src.cases) {
    if (c.repairedOn) {
      ledgerEvents.push({ kind: 'repair', date: c.repairedOn });
      entries.push({ ...blank, kind: 'repair', date: c.repairedOn, sourceId: c.id, recordedAt: null, leakCaseId: c.id });
    }
    if (c.planKind) {
      const date = c.planDueDate ? addDays(c.planDueDate, -PLAN_COMPLETE_DAYS) : c.openedOn;
      ledgerEvents.push({ kind: 'retrofit-or-retirement-plan', date });
      entries.push({
        ...blank,
        kind: 'retrofit-or-retirement-plan',
        date,
        sourceId: c.id,
        recordedAt: null,
        leakCaseId: c.id,
        note: c.planKind === 'retrofit' ? 'Retrofit plan' : 'Retirement plan',
      });
    }
  }
  for (const t of src.tests) {
    const stage = t.kind === 'initial' ? ('initial' as const) : ('follow-up' as const);
    ledgerEvents.push({ kind: 'verification', date: t.testedOn, stage, passed: t.passed });
    entries.push({
      ...blank,
      kind: 'verification',
      date: t.testedOn,
      sourceId: t.id,
      recordedAt: t.createdAt.toISOString(),
      leakCaseId: t.leakCaseId,
      by: t.by,
      stage,
      passed: t.passed,
      note: t.notes,
    });
  }
  entries.sort(dateOrder);

  const appliance = { category: src.unit.applianceCategory, fullCharge: src.unit.fullChargeLb, refrigerant: src.unit.refrigerant };
  if (!(src.unit.fullChargeLb > 0) || !src.unit.refrigerant.trim()) {
    // A boiler or a unit whose charge was never entered: nothing to compute, which is not a failure.
    return {
      events: entries,
      obligations: [],
      result: null,
      computeError: 'No leak rate: the unit has no refrigerant and full charge on record (enter them on the unit from its nameplate).',
    };
  }
  let result: LeakObligationsResult;
  try {
    result = leakObligations({ appliance, events: ledgerEvents, asOf, method: RECORD_METHOD });
  } catch (err) {
    return { events: entries, obligations: [], result: null, computeError: `No leak rate could be computed: ${(err as Error).message}` };
  }

  // The rate at each day with a counted addition, under the rule in force that day (the same core).
  const rateOn = new Map<string, RefrigerantRecordEvent['rate']>();
  for (const e of entries) {
    if (!e.counted || rateOn.has(e.date) || e.date > asOf) continue;
    const o = leakRepairObligation({ appliance, additions, asOf: e.date, method: RECORD_METHOD });
    rateOn.set(e.date, {
      leakRatePercent: o.leakRate,
      inScope: o.inScope,
      rule: o.rule,
      thresholdPercent: o.thresholdPercent,
      overThreshold: o.exceeds,
    });
  }
  const triggers = new Set(result.obligations.map((o) => o.triggeredOn));
  const opened = new Set<string>();
  for (const e of entries) {
    if (!e.counted) continue;
    e.rate = rateOn.get(e.date) ?? null;
    if (triggers.has(e.date) && !opened.has(e.date)) {
      e.opensObligation = true;
      opened.add(e.date);
    }
  }

  const obligations = result.obligations.map((o, i): RefrigerantRecordObligation => {
    const next = result.obligations[i + 1]?.triggeredOn ?? '9999-12-31';
    const rate = rateOn.get(o.triggeredOn) ?? null;
    const trigger = entries.find((e) => e.date === o.triggeredOn && e.opensObligation);
    const leakCase =
      src.cases.find((c) => trigger && c.triggeringEventId === trigger.sourceId) ??
      src.cases.find((c) => c.openedOn === o.triggeredOn) ??
      null;
    const within = entries.filter((e) => e.kind !== 'addition' && e.kind !== 'recovery' && e.date >= o.triggeredOn && e.date < next);
    const initialPassed = within.find(
      (e) => e.kind === 'verification' && e.stage === 'initial' && e.passed && (o.repairedOn === null || e.date >= o.repairedOn),
    );
    const rule = LEAK_RULES.find((r) => r.rule === rate?.rule);
    const v = verificationDeadlines({
      repairDueDate: o.repairDueDate,
      ...(initialPassed ? { initialTestDate: initialPassed.date } : {}),
      ...(rule ? { followUpDays: rule.followUpVerificationDays } : {}),
    });
    return {
      triggeredOn: o.triggeredOn,
      leakRatePercent: o.leakRate,
      rule: rate?.rule ?? null,
      thresholdPercent: rate?.thresholdPercent ?? null,
      repairDueDate: o.repairDueDate,
      repairedOn: o.repairedOn,
      initialTestDue: v.initialTestDue,
      followUpTestDue: v.followUpDue,
      state: o.state,
      leakCaseId: leakCase?.id ?? null,
      timeline: within.map((e) => ({
        date: e.date,
        kind: e.kind,
        text:
          e.kind === 'verification'
            ? `${e.stage === 'initial' ? 'Initial' : 'Follow-up'} verification test ${e.passed ? 'passed' : 'failed'}`
            : e.kind === 'retrofit-or-retirement-plan'
              ? (e.note ?? refrigerantRecordEventKindLabels[e.kind])
              : refrigerantRecordEventKindLabels[e.kind],
      })),
    };
  });
  return { events: entries, obligations, result, computeError: null };
}

/** Loads what the ledger is built from for one unit (no access check). */
export async function loadLedgerSource(db: Db | Tx, unit: LedgerSourceRows['unit'] & { id: string }): Promise<LedgerSourceRows> {
  const person = (r: { name: string | null; epa608Type: string | null; epa608Number: string | null }): Person =>
    r.name === null ? null : { name: r.name, epa608Type: r.epa608Type ?? 'none', epa608Number: r.epa608Number };
  const { eventRows, caseRows, testRows } = await repo.ledgerRows(db, unit.id);
  return {
    unit,
    events: eventRows.map(({ e, ...p }) => ({
      id: e.id,
      date: e.date,
      poundsAdded: e.poundsAdded,
      poundsRecovered: e.poundsRecovered,
      reason: e.reason,
      circuit: e.circuit,
      cylinderLot: e.cylinderLot,
      visitId: e.visitId,
      createdAt: e.createdAt,
      tech: person(p),
    })),
    cases: caseRows.map((c) => ({
      id: c.id,
      triggeringEventId: c.triggeringEventId,
      openedOn: c.openedOn,
      repairedOn: c.repairedOn,
      planKind: c.planKind,
      planDueDate: c.planDueDate,
      createdAt: c.createdAt,
    })),
    tests: testRows.map(({ t, ...p }) => ({
      id: t.id,
      leakCaseId: t.leakCaseId,
      kind: t.kind,
      testedOn: t.testedOn,
      passed: t.passed,
      notes: t.notes,
      createdAt: t.createdAt,
      by: person(p),
    })),
  };
}

/** The refrigerant record of a unit the user may read (404 otherwise, as the Unit file). */
export async function refrigerantRecord(db: Db, user: SessionUser, unitId: string, now: Date): Promise<RefrigerantRecord> {
  const u = await readableUnit(db, user, unitId);
  const [[site], [branch], circuitRows] = await repo.recordHeaderRows(db, u);
  const asOf = zonedDate(now, branch!.timeZone);
  const ledger = buildLedger(await loadLedgerSource(db, u), asOf);
  const r = ledger.result;
  return {
    asOf,
    generatedAt: now.toISOString(),
    appliance: {
      unitId: u.id,
      tag: u.tag,
      kind: u.kind,
      make: u.make,
      model: u.model,
      serial: u.serial,
      installDate: u.installDate,
      refrigerant: u.refrigerant,
      applianceCategory: u.applianceCategory,
      fullChargeLb: u.fullChargeLb,
      fullChargeBasis: FULL_CHARGE_BASIS,
      circuits: circuitRows,
      site: site!,
      branch: branch!,
    },
    method: RECORD_METHOD,
    industrialShutdown: false,
    inScope: r?.inScope ?? false,
    rule: r?.rule ?? null,
    thresholdPercent: r?.thresholdPercent ?? null,
    leakRatePercent: r?.leakRate ?? 0,
    chronicYears: r?.chronicYears ?? [],
    events: ledger.events,
    obligations: ledger.obligations,
    openObligation: ledger.obligations.find((o) => o.state === 'open' || o.state === 'overdue') ?? null,
    computeError: ledger.computeError,
    cautions: RECORD_CAUTIONS,
    sources: RECORD_SOURCES,
  };
}
