/**
 * GET /api/units/:id/refrigerant-record over a hand-worked history. Every expected value is worked by
 * hand from the rule text in docs/reference/LEAK-RULES.md (section and tag beside each):
 *
 * Unit: R-22 (HCFC, ozone-depleting), full charge 100 lb, comfort cooling → 40 CFR 82.157 applies
 * (82.157(a) [P]: 50 lb or more of class I/II refrigerant), threshold 10 % (82.157(c)(2) [P]).
 *
 *   2024-01-10  100 lb initial charge        exempt, no rate (82.157(b) [P]: installation of a new appliance)
 *   2024-07-08    5 lb leak top-off          180 days after 2024-01-10: 5/100 × 365/180 × 100 = 10.1389 % > 10 → repair owed,
 *                                            due 2024-08-07 (82.157(d) [M]: 30 days); leak case L1
 *   2024-07-20  repair (L1)
 *   2024-07-22  initial verification passed; 2024-07-30 follow-up passed → verified (82.157(e) [M])
 *   2025-07-08   10 lb leak top-off          365 days: 10/100 × 365/365 × 100 = 10 % exactly: not "over" (82.157(c)(1) [P])
 *   2025-09-06   12 lb leak top-off          60 days: 12/100 × 365/60 × 100 = 73 % > 10 → repair owed, due 2025-10-06;
 *                                            no repair recorded → overdue on 2026-07-01
 *   2025-10-01    3 lb recovered             listed, never counted
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import Papa from 'papaparse';
import type { RefrigerantRecord } from '@coilpath/contract';
import { refrigerantRecordSchema } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, TEST_PASSWORD } from '../../testing/fixtures';
import { leakCases, refrigerantEvents, verificationTests } from '../../db/schema';
import { readPdf } from '../../testing/pdf-text';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let u: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let other: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let tech: Awaited<ReturnType<typeof makeUser>>;
let caseId: string;

beforeAll(async () => {
  t = await createTestApp({ now: '2026-07-01T17:00:00Z' });
  const db = t.ctx.db;
  f = await makeTwoBranches(db);
  tech = await makeUser(db, 'technician', f.a.id, { name: 'Łukasz Żółć', epa608Type: 'universal', epa608Number: 'EPA-TEST-0042' });
  u = await makeSiteWithUnit(db, f.a.id, {
    unit: { tag: 'CH-1', serial: 'RR-77', refrigerant: 'R-22', fullChargeLb: 100, applianceCategory: 'comfort_cooling' },
  });
  other = await makeSiteWithUnit(db, f.b.id);
  const ev = await db
    .insert(refrigerantEvents)
    .values([
      { unitId: u.unit.id, date: '2024-01-10', refrigerant: 'R-22', poundsAdded: 100, reason: 'initial_charge', techId: tech.id },
      {
        unitId: u.unit.id,
        date: '2024-07-08',
        refrigerant: 'R-22',
        poundsAdded: 5,
        reason: 'leak_top_off',
        techId: tech.id,
        cylinderLot: '=HYPERLINK("x")',
        createdAt: new Date('2024-07-08T15:30:00Z'),
      },
      { unitId: u.unit.id, date: '2025-07-08', refrigerant: 'R-22', poundsAdded: 10, reason: 'leak_top_off', techId: tech.id, circuit: 2 },
      { unitId: u.unit.id, date: '2025-09-06', refrigerant: 'R-22', poundsAdded: 12, reason: 'leak_top_off', techId: tech.id },
      { unitId: u.unit.id, date: '2025-10-01', refrigerant: 'R-22', poundsRecovered: 3, reason: 'recovery', techId: tech.id },
    ])
    .returning();
  const [c] = await db
    .insert(leakCases)
    .values({
      branchId: f.a.id,
      unitId: u.unit.id,
      triggeringEventId: ev[1]!.id,
      openedOn: '2024-07-08',
      rule: '40 CFR 82.157',
      method: 'annualizing',
      thresholdPercent: 10,
      leakRatePercent: 10.14,
      repairDueDate: '2024-08-07',
      status: 'closed',
      repairedOn: '2024-07-20',
    })
    .returning();
  caseId = c!.id;
  await db.insert(verificationTests).values([
    { leakCaseId: caseId, kind: 'initial', testedOn: '2024-07-22', passed: true, byUserId: tech.id },
    { leakCaseId: caseId, kind: 'follow_up', testedOn: '2024-07-30', passed: true, byUserId: tech.id },
  ]);
});
afterAll(() => t.close());

const as = (email: string) => signedInAgent(t.app, email, TEST_PASSWORD);
const bytes = (r: request.Test) =>
  r.buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => cb(null, Buffer.concat(chunks)));
  });

describe('GET /api/units/:id/refrigerant-record', () => {
  it('says in words that a unit with no charge on record has no leak rate (not a computation error)', async () => {
    const boiler = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { tag: 'B-9', kind: 'boiler', refrigerant: '', fullChargeLb: 0 } });
    const res = await (await as(f.inA.manager.email)).get(`/api/units/${boiler.unit.id}/refrigerant-record`);
    expect(res.status).toBe(200);
    expect(res.body.computeError).toMatch(/^No leak rate: the unit has no refrigerant and full charge on record/);
    expect(res.body.computeError).not.toMatch(/finite number/);
  });

  it('gives the ledger: every entry, the rate at each counted addition, the rule and the obligations with their states', async () => {
    const res = await (await as(f.inA.manager.email)).get(`/api/units/${u.unit.id}/refrigerant-record`);
    expect(res.status).toBe(200);
    const r = refrigerantRecordSchema.parse(res.body) as RefrigerantRecord;
    expect(r.asOf).toBe('2026-07-01');
    expect(r.appliance).toMatchObject({
      tag: 'CH-1',
      serial: 'RR-77',
      make: 'Testmake',
      model: 'TM-10',
      refrigerant: 'R-22',
      fullChargeLb: 100,
    });
    expect(r.appliance.fullChargeBasis).toMatch(/as recorded on the unit/i);
    // 82.157(a) [P] covers R-22 at 100 lb; (c)(2) [P]: comfort cooling 10 %.
    expect(r).toMatchObject({ inScope: true, rule: '40 CFR 82.157', thresholdPercent: 10, method: 'annualizing', computeError: null });

    expect(r.events.map((e) => `${e.date} ${e.kind}`)).toEqual([
      '2024-01-10 addition',
      '2024-07-08 addition',
      '2024-07-20 repair',
      '2024-07-22 verification',
      '2024-07-30 verification',
      '2025-07-08 addition',
      '2025-09-06 addition',
      '2025-10-01 recovery',
    ]);
    const [charge, first, , initial, , exact, big, recovery] = r.events;
    // 82.157(b) [P]: the charge of a new appliance is not counted, and no rate is computed at it.
    expect(charge).toMatchObject({ exempt: 'installation', counted: false, rate: null });
    // 82.152 annualizing [S]: 5/100 × 365/180 × 100 = 10.13888… %, over 10 → opens the first obligation.
    expect(first!.rate!.leakRatePercent).toBeCloseTo((5 / 100) * (365 / 180) * 100, 9);
    expect(first).toMatchObject({
      counted: true,
      opensObligation: true,
      leakCaseId: caseId,
      rate: { rule: '40 CFR 82.157', thresholdPercent: 10, overThreshold: true },
    });
    expect(first!.by).toEqual({ name: 'Łukasz Żółć', epa608Type: 'universal', epa608Number: 'EPA-TEST-0042' });
    expect(initial).toMatchObject({ stage: 'initial', passed: true, leakCaseId: caseId });
    // 82.157(c)(1) [P]: 10 lb in 365 days is exactly 10 %, not over.
    expect(exact!.rate!.leakRatePercent).toBe(10);
    expect(exact).toMatchObject({ opensObligation: false, rate: { overThreshold: false } });
    // 12/100 × 365/60 × 100 = 73 %.
    expect(big!.rate!.leakRatePercent).toBeCloseTo(73, 9);
    expect(big).toMatchObject({ opensObligation: true, rate: { overThreshold: true } });
    expect(recovery).toMatchObject({ counted: false, poundsRecovered: 3, rate: null });
    expect(r.leakRatePercent).toBeCloseTo(73, 9);

    // Obligations, oldest first (82.157(d) [M] 30 days; (e) [M] follow-up within 10 days of a passed initial test).
    expect(r.obligations).toHaveLength(2);
    expect(r.obligations[0]).toMatchObject({
      triggeredOn: '2024-07-08',
      repairDueDate: '2024-08-07',
      repairedOn: '2024-07-20',
      initialTestDue: '2024-08-07',
      followUpTestDue: '2024-08-01',
      state: 'verified',
      leakCaseId: caseId,
    });
    expect(r.obligations[0]!.timeline.map((x) => `${x.date} ${x.kind}`)).toEqual([
      '2024-07-20 repair',
      '2024-07-22 verification',
      '2024-07-30 verification',
    ]);
    expect(r.obligations[1]).toMatchObject({
      triggeredOn: '2025-09-06',
      repairDueDate: '2025-10-06',
      repairedOn: null,
      state: 'overdue',
      leakCaseId: null,
      timeline: [],
    });
    expect(r.openObligation?.triggeredOn).toBe('2025-09-06');
    expect(r.chronicYears).toEqual([]); // 2025: 22 lb of 100, under 125 % (82.157(j) [S])
    expect(r.cautions.join(' ')).toMatch(/manufacturer/);
    expect(r.cautions.join(' ')).toMatch(/local codes/);
    expect(r.sources.join(' ')).toContain('40 CFR 82 Subpart F, §82.157');
    expect(r.sources.join(' ')).toContain('40 CFR 84 Subpart C');
  });

  it('answers 404 for another branch’s unit and for a technician never on the unit', async () => {
    expect((await (await as(f.inA.manager.email)).get(`/api/units/${other.unit.id}/refrigerant-record`)).status).toBe(404);
    expect((await (await as(f.inA.technician.email)).get(`/api/units/${u.unit.id}/refrigerant-record`)).status).toBe(404);
    expect((await (await as(f.owner.email)).get(`/api/units/${other.unit.id}/refrigerant-record`)).status).toBe(200);
  });

  it('refuses an unknown format with 400', async () => {
    const res = await (await as(f.owner.email)).get(`/api/units/${u.unit.id}/refrigerant-record?format=xls`);
    expect(res.status).toBe(400);
  });

  it('writes the CSV with the shared writer: one row per entry and per obligation, times in the branch zone', async () => {
    const res = await bytes((await as(f.owner.email)).get(`/api/units/${u.unit.id}/refrigerant-record?format=csv`));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    expect(res.headers['content-disposition']).toContain('coilpath-refrigerant-record-CH-1-2026-07-01.csv');
    const raw = res.body as Buffer;
    expect([...raw.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const rows = Papa.parse<Record<string, string>>(raw.toString('utf8').slice(1), { header: true, skipEmptyLines: true }).data;
    expect(rows.filter((x) => x.record === 'event')).toHaveLength(8);
    const first = rows.find((x) => x.record === 'event' && x.date === '2024-07-08')!;
    expect(Number(first.leak_rate_pct_per_year)).toBeCloseTo(10.14, 2);
    expect(first).toMatchObject({
      technician: 'Łukasz Żółć',
      rule: '40 CFR 82.157',
      threshold_pct: '10',
      over_threshold: 'true',
      counted: 'true',
    });
    expect(first.epa608_certification).toContain('EPA-TEST-0042');
    // A cell that would run as a formula is neutralised.
    expect(first.cylinder_lot).toBe(`'=HYPERLINK("x")`);
    // Recorded instants in America/Chicago with the offset: 15:30 UTC is 10:30 CDT (UTC−5) on 2024-07-08.
    expect(first.recorded_at).toBe('2024-07-08T10:30:00-05:00');
    // The circuit named at entry; none where it was not.
    expect(rows.find((x) => x.record === 'event' && x.date === '2025-07-08')!.circuit).toBe('2');
    expect(first.circuit).toBe('');
    const obligations = rows.filter((x) => x.record === 'obligation');
    expect(obligations.map((o) => [o.date, o.repair_due, o.state])).toEqual([
      ['2024-07-08', '2024-08-07', 'Repaired and verified'],
      ['2025-09-06', '2025-10-06', 'Repair overdue'],
    ]);
  });

  it('prints the auditor’s PDF: identity, entries with technician and certification, obligations, cautions and sources', async () => {
    const res = await bytes((await as(f.inA.manager.email)).get(`/api/units/${u.unit.id}/refrigerant-record?format=pdf`));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const pdf = await readPdf(res.body as Buffer);
    expect(pdf.title).toContain('Refrigerant record — CH-1');
    expect(pdf.marked).toBe(true);
    for (const s of [
      'RR-77',
      'R-22',
      '100 lb',
      'Łukasz Żółć',
      'EPA-TEST-0042',
      '10.14',
      '73.00',
      '2025-10-06',
      'Repair overdue',
      'Repaired and verified',
      'circuit 2',
      '40 CFR 82.157',
      '40 CFR 84 Subpart C',
      'manufacturer',
      'local codes',
      'licensed practice',
    ]) {
      expect(pdf.flat).toContain(s);
    }
    expect(pdf.roles).toEqual(expect.arrayContaining(['H1', 'H2', 'Table', 'TH', 'TD', 'L']));
  });
});
