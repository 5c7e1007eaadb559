/**
 * The Watchlist's leak cases read the unit's refrigerant record (`leakObligations`): each case carries
 * its obligation's state, and a case does not close while the record shows its obligation unverified.
 *
 * Hand-worked (docs/reference/LEAK-RULES.md): R-22, 100 lb, comfort cooling → 40 CFR 82.157 [P],
 * threshold 10 % (82.157(c)(2) [P]). 100 lb initial charge on 2024-01-10 (exempt, 82.157(b) [P]); 5 lb on
 * 2024-07-08, 180 days later: 5/100 × 365/180 × 100 = 10.14 % > 10 → repair owed by 2024-08-07 (82.157(d) [M]).
 * Verification: an initial and a follow-up test after the repair (82.157(e) [M]); a test dated before
 * the repair does not verify it (Coilpath's reading of "verification test" of a repair, no source).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LeakCaseRow } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { leakCases, refrigerantEvents } from '../../db/schema';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let caseId: string;

beforeAll(async () => {
  t = await createTestApp({ now: '2024-08-05T17:00:00Z' });
  const db = t.ctx.db;
  f = await makeTwoBranches(db);
  const u = await makeSiteWithUnit(db, f.a.id, { unit: { refrigerant: 'R-22', fullChargeLb: 100, applianceCategory: 'comfort_cooling' } });
  const ev = await db
    .insert(refrigerantEvents)
    .values([
      { unitId: u.unit.id, date: '2024-01-10', refrigerant: 'R-22', poundsAdded: 100, reason: 'initial_charge' },
      { unitId: u.unit.id, date: '2024-07-08', refrigerant: 'R-22', poundsAdded: 5, reason: 'leak_top_off' },
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
      status: 'open',
    })
    .returning();
  caseId = c!.id;
});
afterAll(() => t.close());

const manager = () => signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
const caseNow = async () => {
  const res = await (await manager()).get('/api/leak-cases?status=all');
  return (res.body as { leakCases: LeakCaseRow[] }).leakCases.find((c) => c.id === caseId)!;
};

describe('leak cases read from the refrigerant record', () => {
  it('carries the obligation’s state: open while unrepaired', async () => {
    expect((await caseNow()).obligationState).toBe('open');
  });

  it('refuses to close while the record shows the obligation unverified (the initial test predates the repair), and changes nothing', async () => {
    const m = await manager();
    // The repair on 07-20, then an initial test dated 07-15 (before it), then a follow-up on 07-25: the case's own rules accept these.
    expect((await m.patch(`/api/leak-cases/${caseId}`).send({ action: 'repaired', repairedOn: '2024-07-20' })).status).toBe(200);
    expect(
      (await m.post(`/api/leak-cases/${caseId}/verification-tests`).send({ kind: 'initial', testedOn: '2024-07-15', passed: true })).status,
    ).toBe(201);
    expect(
      (await m.post(`/api/leak-cases/${caseId}/verification-tests`).send({ kind: 'follow_up', testedOn: '2024-07-25', passed: true }))
        .status,
    ).toBe(201);
    expect(await caseNow()).toMatchObject({ status: 'repaired', obligationState: 'repaired' });

    const refused = await m.patch(`/api/leak-cases/${caseId}`).send({ action: 'close' });
    expect(refused.status).toBe(422);
    expect(refused.body.error.message).toContain('Repaired, verification pending');
    expect((await caseNow()).status).toBe('repaired');
  });

  it('closes once a passed initial and follow-up test come after the repair; the record then says verified', async () => {
    const m = await manager();
    expect(
      (await m.post(`/api/leak-cases/${caseId}/verification-tests`).send({ kind: 'initial', testedOn: '2024-07-26', passed: true })).status,
    ).toBe(201);
    expect(
      (await m.post(`/api/leak-cases/${caseId}/verification-tests`).send({ kind: 'follow_up', testedOn: '2024-08-01', passed: true }))
        .status,
    ).toBe(201);
    expect((await m.patch(`/api/leak-cases/${caseId}`).send({ action: 'close' })).status).toBe(200);
    expect(await caseNow()).toMatchObject({ status: 'closed', obligationState: 'verified' });
  });
});
