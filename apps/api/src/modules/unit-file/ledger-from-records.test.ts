/**
 * The ledger is built from the refrigerant entries, leak cases and verification tests the product has always
 * stored (no table of its own). Over the whole demo contractor — three branches, a year and more of history,
 * leak cases open, repaired, verified and under a plan — every stored entry, case and test must land in the
 * ledger, and no case still open may be without an open obligation: nothing is lost on the way to the record.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { inArray, sql } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { leakCases, refrigerantEvents, units, verificationTests } from '../../db/schema';
import { seedDemo } from '../../db/seed';
import { openTestDatabase } from '../../testing/harness';
import { makeBranch, makeSiteWithUnit } from '../../testing/fixtures';
import { buildLedger, loadLedgerSource } from './refrigerant-record';
import { OPEN_LEAK_CASE_STATUSES } from '../visits/refrigerant.service';

const TODAY = '2026-12-04';
let database: Database;
beforeAll(async () => {
  database = await openTestDatabase();
  await seedDemo(database.db, { today: TODAY });
}, 120_000);
afterAll(async () => {
  await database.close();
});

describe('the ledger from the stored records (demo contractor)', () => {
  it(
    'holds every refrigerant entry, leak case and verification test, and every open case has an open obligation',
    { timeout: 120_000 },
    async () => {
      const db = database.db;
      const withRecords = await db
        .select()
        .from(units)
        .where(inArray(units.id, sql`(select unit_id from ${refrigerantEvents} union select unit_id from ${leakCases})`));
      const [events, cases, tests] = await Promise.all([
        db.select().from(refrigerantEvents),
        db.select().from(leakCases),
        db.select().from(verificationTests),
      ]);
      expect(events.length, 'the demo has refrigerant entries').toBeGreaterThan(20);
      expect(cases.length, 'the demo has leak cases').toBeGreaterThan(2);

      const seenEvents = new Set<string>();
      const seenCases = new Set<string>();
      const seenTests = new Set<string>();
      const lost: string[] = [];
      for (const u of withRecords) {
        const ledger = buildLedger(await loadLedgerSource(db, u), TODAY);
        expect(ledger.computeError, `unit ${u.tag}`).toBeNull();
        for (const e of ledger.events) {
          if (e.kind === 'addition' || e.kind === 'recovery') seenEvents.add(e.sourceId);
          if (e.kind === 'verification') seenTests.add(e.sourceId);
          if (e.leakCaseId) seenCases.add(e.leakCaseId);
        }
        for (const o of ledger.obligations) if (o.leakCaseId) seenCases.add(o.leakCaseId);
        // A case still standing (open, or under a retrofit/retirement plan) is backed by an obligation not yet met.
        for (const c of cases.filter((x) => x.unitId === u.id && (OPEN_LEAK_CASE_STATUSES as readonly string[]).includes(x.status))) {
          const o = ledger.obligations.find((x) => x.leakCaseId === c.id);
          if (!o) lost.push(`${u.tag}: case opened ${c.openedOn} (${c.status}) has no obligation`);
          else if (o.state === 'verified' || o.state === 'repaired')
            lost.push(`${u.tag}: case opened ${c.openedOn} is ${c.status} but its obligation reads ${o.state}`);
        }
      }
      expect(
        events.filter((e) => !seenEvents.has(e.id)).map((e) => `${e.date} ${e.reason}`),
        'entries missing from the ledger',
      ).toEqual([]);
      expect(
        cases.filter((c) => !seenCases.has(c.id)).map((c) => `${c.openedOn} ${c.status}`),
        'leak cases missing from the ledger',
      ).toEqual([]);
      expect(
        tests.filter((t) => !seenTests.has(t.id)).map((t) => `${t.testedOn} ${t.kind}`),
        'verification tests missing from the ledger',
      ).toEqual([]);
      expect(lost).toEqual([]);
    },
  );

  it('maps a case stored without its triggering entry (as older records were) onto the obligation of its day', async () => {
    const db = database.db;
    const branch = await makeBranch(db);
    const { unit } = await makeSiteWithUnit(db, branch.id, {
      unit: { fullChargeLb: 100, refrigerant: 'R-410A', applianceCategory: 'comfort_cooling' },
    });
    const add = (date: string, pounds: number) => ({
      unitId: unit.id,
      date,
      refrigerant: 'R-410A',
      poundsAdded: pounds,
      reason: 'leak_top_off' as const,
    });
    await db.insert(refrigerantEvents).values([add('2026-01-05', 2), add('2026-02-04', 3)]);
    // 3 lb 30 days after the last addition on a 100 lb appliance: 3/100 × 365/30 × 100 = 36.5 %/yr (annualizing,
    // 40 CFR 82.152) over the 10 % comfort-cooling threshold of 40 CFR 84.106(c)(2): repair due in 30 days (84.106(d)).
    const [c] = await db
      .insert(leakCases)
      .values({
        branchId: branch.id,
        unitId: unit.id,
        triggeringEventId: null,
        openedOn: '2026-02-04',
        rule: '40 CFR 84.106',
        method: 'annualizing',
        thresholdPercent: 10,
        leakRatePercent: 36.5,
        repairDueDate: '2026-03-06',
        status: 'open',
      })
      .returning();
    const ledger = buildLedger(await loadLedgerSource(db, unit), '2026-02-10');
    expect(ledger.obligations).toHaveLength(1);
    expect(ledger.obligations[0]).toMatchObject({
      triggeredOn: '2026-02-04',
      repairDueDate: '2026-03-06',
      state: 'open',
      leakCaseId: c!.id,
    });
    expect(ledger.obligations[0]!.leakRatePercent).toBeCloseTo(36.5, 6);
  });
});
