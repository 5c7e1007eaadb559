import { describe, expect, it } from 'vitest';
import { causeCodes, unitKinds, type CauseCode, type UnitKind, type VisitOutcome } from '@coilpath/contract';
import { buildScenario } from './scenario';
import { alarmText, complaintChoices, findingChoices, pmFindingChoices, renderNote, returnFinding, type UnitWords } from './wording';

const REFRIGERATION: UnitKind[] = ['walk_in_cooler', 'walk_in_freezer', 'reach_in', 'condensing_unit', 'ice_machine'];
const COMFORT: UnitKind[] = ['rooftop_unit', 'split_system', 'heat_pump'];

/** The causes the scenario draws for a kind (scenario.ts: causesFor). */
function causesOf(kind: UnitKind): CauseCode[] {
  if (kind === 'boiler') return ['component_failure', 'control_fault', 'settings', 'wiring_fault', 'no_fault_found'];
  if (kind === 'chiller')
    return ['refrigerant_leak', 'sensor_fault', 'wiring_fault', 'control_fault', 'component_failure', 'no_fault_found'];
  if (REFRIGERATION.includes(kind))
    return ['refrigerant_leak', 'sensor_fault', 'control_fault', 'component_failure', 'airflow', 'settings', 'no_fault_found'];
  return [...causeCodes];
}

/** The alarms a cause can raise on a kind, and none (scenario.ts: alarmFor). */
function alarmsOf(kind: UnitKind, cause: CauseCode): (string | null)[] {
  if (kind === 'boiler' || cause === 'settings') return [null];
  if (REFRIGERATION.includes(kind)) {
    const warm = kind === 'ice_machine' ? 'LONG-FRZ' : 'HI-TEMP';
    if (cause === 'refrigerant_leak') return kind === 'reach_in' || kind === 'ice_machine' ? [null, warm] : [null, 'LP1', 'LP2', warm];
    if (cause === 'control_fault') return [null, kind === 'ice_machine' ? 'LONG-HRV' : kind === 'reach_in' ? 'HI-TEMP' : 'COMM'];
    return [null, warm];
  }
  switch (cause) {
    case 'refrigerant_leak':
    case 'no_fault_found':
      return [null, 'LP1', 'LP2'];
    case 'sensor_fault':
    case 'component_failure':
      return [null, 'LP1', 'HP1', 'LP2', 'HP2'];
    case 'wiring_fault':
      return [null, 'COMM', 'HP1'];
    case 'control_fault':
      return [null, 'COMM'];
    case 'airflow':
      return [null, 'FRZ', 'HP2'];
    default:
      return [null];
  }
}

const unitsOf = (kind: UnitKind): UnitWords[] =>
  kind === 'chiller'
    ? [
        { kind, waterCooled: false, circuits: 2, stages: 6 },
        { kind, waterCooled: true, circuits: 2, stages: 2 },
      ]
    : [
        {
          kind,
          waterCooled: false,
          circuits: kind === 'rooftop_unit' || kind === 'condensing_unit' ? 2 : kind === 'boiler' ? 0 : 1,
          stages: 2,
        },
      ];

const OUTCOMES: { outcome: VisitOutcome; leakSearch: boolean }[] = [
  { outcome: 'resolved', leakSearch: false },
  { outcome: 'declined', leakSearch: false },
  { outcome: 'needs_return', leakSearch: false },
  { outcome: 'needs_return', leakSearch: true },
];

/** Every note the scenario can write for a kind: [cause, alarm, outcome, text]. */
function everyNote(kind: UnitKind): [CauseCode, string | null, VisitOutcome, string][] {
  const out: [CauseCode, string | null, VisitOutcome, string][] = [];
  for (const u of unitsOf(kind)) {
    for (const cause of causesOf(kind)) {
      for (const code of alarmsOf(kind, cause)) {
        for (const { outcome, leakSearch } of OUTCOMES) {
          if (leakSearch && cause !== 'refrigerant_leak') continue;
          for (const toppedOff of cause === 'refrigerant_leak' ? [true, false] : [false]) {
            for (const note of findingChoices(u, cause, code, { outcome, leakSearch, toppedOff }))
              out.push([cause, code, outcome, renderNote(note, 2, outcome)]);
          }
        }
      }
      out.push([cause, null, 'resolved', returnFinding(u, cause)]);
    }
  }
  return out;
}

const REFRIGERATION_WORDS = /\bbox\b|defrost|propped-open|walk-in|reach-in|product|ice machine|harvest/i;
const EVAPORATOR_SIDE = /filter|evaporator|indoor coil|supply fan|blower|belt|return grille|return-air/i;
const REFRIGERANT_WORDS = /refrigerant|compressor|superheat|subcooling|psig|\blb\b|leak|condenser|evaporator|suction|discharge/i;

describe('demo wording', () => {
  it('gives every kind, cause, alarm and outcome a list of its own (never the catch-all)', () => {
    for (const kind of unitKinds) {
      for (const u of unitsOf(kind)) {
        for (const cause of causesOf(kind)) {
          for (const code of alarmsOf(kind, cause)) {
            for (const { outcome, leakSearch } of OUTCOMES) {
              const list = findingChoices(u, cause, code, {
                outcome,
                leakSearch: leakSearch && cause === 'refrigerant_leak',
                toppedOff: cause === 'refrigerant_leak',
              });
              expect(list.length, `${kind} ${cause} ${code}`).toBeGreaterThan(0);
              expect(
                list.every((x) => x.sides.length < 7),
                `${kind} ${cause} ${code} uses the catch-all`,
              ).toBe(true);
            }
          }
        }
        expect(complaintChoices(u).length, kind).toBeGreaterThan(0);
        for (const cause of causeCodes) expect(complaintChoices(u, cause).length).toBeGreaterThan(0);
        expect(pmFindingChoices(u).length, kind).toBeGreaterThan(0);
      }
    }
  });

  it('points a high-pressure trip at the condenser side and a freeze-stat trip at the evaporator side', () => {
    for (const kind of [...COMFORT, 'chiller'] as UnitKind[]) {
      for (const [cause, code, , text] of everyNote(kind)) {
        if (code?.startsWith('HP')) expect(text, `${kind} ${cause} ${code}`).not.toMatch(EVAPORATOR_SIDE);
        if (code === 'FRZ') expect(text, `${kind} ${cause} ${code}`).not.toMatch(/condenser|outdoor/i);
      }
    }
  });

  it('keeps refrigeration words on refrigeration, and refrigerant words off boilers', () => {
    for (const kind of [...COMFORT, 'chiller', 'boiler'] as UnitKind[]) {
      for (const [cause, code, , text] of everyNote(kind)) expect(text, `${kind} ${cause} ${code}`).not.toMatch(REFRIGERATION_WORDS);
      for (const u of unitsOf(kind))
        for (const text of [...complaintChoices(u), ...pmFindingChoices(u)]) expect(text, kind).not.toMatch(REFRIGERATION_WORDS);
    }
    for (const [cause, , , text] of everyNote('boiler')) expect(text, cause).not.toMatch(REFRIGERANT_WORDS);
    const boiler = unitsOf('boiler')[0]!;
    for (const text of [...complaintChoices(boiler), ...pmFindingChoices(boiler)]) expect(text).not.toMatch(REFRIGERANT_WORDS);
  });

  it('words complaints for the kind of unit', () => {
    const words = (kind: UnitKind) => complaintChoices(unitsOf(kind)[0]!);
    for (const text of words('walk_in_cooler')) expect(text).not.toMatch(/reach-in|ice machine|freezer/i);
    for (const text of words('reach_in')) expect(text).not.toMatch(/walk-in|ice machine/i);
    for (const text of words('ice_machine')) expect(text).toMatch(/ice/i);
    for (const text of words('walk_in_freezer')) {
      expect(text).not.toMatch(/reach-in|walk-in cooler/i);
      for (const [, t] of text.matchAll(/(−?\d+) °F/g)) expect(Number(t!.replace('−', '-')), text).toBeLessThan(32);
    }
    for (const text of words('chiller')) expect(text).toMatch(/chill|condenser water/i);
    for (const text of words('boiler')) expect(text).toMatch(/boiler|heat|cold/i);
    expect(alarmText('chiller', 'LP2')).toBe('Low evaporator refrigerant temperature, circuit 2');
    expect(alarmText('rooftop_unit', 'HP1')).toBe('High discharge pressure, circuit 1');
  });

  it('never says "quoted" or "ordered" on a resolved visit, nor a leak search when the leak was fixed', () => {
    for (const kind of unitKinds) {
      for (const [cause, code, outcome, text] of everyNote(kind)) {
        if (
          outcome === 'resolved' &&
          !text.startsWith('Installed') &&
          !text.startsWith('Replaced the damaged') &&
          !text.startsWith('Pumped') &&
          !text.startsWith('Recovered')
        ) {
          expect(text, `${kind} ${cause} ${code}`).not.toMatch(/quoted|ordered|leak search/);
        }
      }
    }
  });

  it('reads right in the built scenario', () => {
    const rows = buildScenario('2026-03-10', 'x');
    const kindOf = new Map(rows.units.map((u) => [u.id, u.kind]));
    const woOfVisit = new Map(rows.visits.map((v) => [v.id, v.workOrderId]));
    const outcomeOfWo = new Map(rows.workOrders.map((w) => [w.id, w.outcome]));
    for (const f of rows.findings) {
      const kind = kindOf.get(f.unitId!)!;
      const where = `${kind} ${f.causeCode} ${f.alarmCode}: ${f.notes}`;
      if (f.alarmCode?.startsWith('HP') && kind !== 'chiller') expect(f.notes, where).not.toMatch(EVAPORATOR_SIDE);
      if (f.alarmCode === 'FRZ') expect(f.notes, where).not.toMatch(/condenser/i);
      if (!REFRIGERATION.includes(kind)) expect(f.notes, where).not.toMatch(/box temperature|defrost|propped-open/i);
      if (kind === 'boiler') expect(f.notes, where).not.toMatch(REFRIGERANT_WORDS);
      if (f.notes?.includes('{')) throw new Error(`unfilled placeholder: ${where}`);
      if (outcomeOfWo.get(woOfVisit.get(f.visitId)!) === 'resolved' && f.notes?.includes('replacement ordered')) throw new Error(where);
    }
    for (const w of rows.workOrders) {
      const kind = w.unitId ? kindOf.get(w.unitId)! : null;
      const complaint = w.complaint ?? '';
      if (kind === 'walk_in_cooler') expect(complaint, kind).not.toMatch(/reach-in|ice machine/i);
      if (kind === 'reach_in') expect(complaint, kind).not.toMatch(/walk-in/i);
      if (kind === 'boiler') expect(complaint, kind).not.toMatch(REFRIGERANT_WORDS);
      expect(complaint).not.toMatch(/°f/);
    }
    for (const a of rows.alarms) {
      const kind = kindOf.get(a.unitId)!;
      if (kind === 'ice_machine') expect(a.description).not.toMatch(/box/i);
      if (kind === 'reach_in') expect(a.code).toBe('HI-TEMP');
    }
  });
});
