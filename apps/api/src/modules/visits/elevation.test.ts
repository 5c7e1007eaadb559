/**
 * Gauges at altitude: a branch's elevation (Team → branch settings) turns its gauge readings into
 * absolute pressure with the standard atmosphere there, so a branch at 1,609 m reads a different (and
 * right) saturation temperature from the same gauge value than one at sea level. The gauge values are
 * stored as read; the elevation used is stored with each reading.
 *
 * Check values, computed here from outside sources (not from Coilpath's atmosphere formula):
 * - ISA / ISO 2533 table by geopotential altitude: 1,600 m 83 523.5 Pa, 2,000 m 79 495.2 Pa [S] (the
 *   public reproductions named in tests/reference/atmosphere.test.ts). Pressure is close to
 *   exponential in height over 400 m, so log-linear interpolation gives 1,609 m: 83.4306 kPa (the
 *   interpolation's own error is under 1 Pa; a 1,609 m elevation as geopotential height is within 0.5 m).
 * - R-410A dew point 36.93 °F at 111.5 psig against 14.696 psia, i.e. at 126.196 psia: CoolProp 8.0.0,
 *   tests/reference/data/refrigerant-saturation.json. 1 psi = 6.894 757 kPa (NIST SP 811, B.8).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import type { BranchDetail, ReadingDto } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { branches, circuits, readings } from '../../db/schema';
import { makeBookedVisit } from './visits.fixtures';

const KPA_PER_PSI = 6.894757293168;
const ISA_1600 = 83.5235;
const ISA_2000 = 79.4952;
const ISA_1609 = ISA_1600 * Math.exp((Math.log(ISA_2000 / ISA_1600) * 9) / 400); // 83.4306 kPa
/** The gauge at 1,609 m that reads the same absolute pressure as 111.5 psig at 14.696 psia. */
const GAUGE = 111.5 + 14.696 - ISA_1609 / KPA_PER_PSI; // ≈ 114.10 psig
const DEW_AT_126_196_PSIA = 36.93;

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;

beforeAll(async () => {
  t = await createTestApp({ now: '2026-03-10T15:00:00Z' });
  f = await makeTwoBranches(t.ctx.db);
});
afterAll(() => t.close());

async function readAt(
  branchId: string,
  techEmail: string,
  techId: string,
): Promise<{ dto: ReadingDto; stored: typeof readings.$inferSelect }> {
  const place = await makeSiteWithUnit(t.ctx.db, branchId, { unit: { refrigerant: 'R-410A' } });
  const [c] = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, place.unit.id)).orderBy(circuits.number);
  const { visit } = await makeBookedVisit(t.ctx.db, {
    branchId,
    siteId: place.site.id,
    unitId: place.unit.id,
    techId,
    startAt: '2026-03-10T14:00:00Z',
    onSite: true,
  });
  const tech = await signedInAgent(t.app, techEmail, TEST_PASSWORD);
  const res = await tech.post(`/api/visits/${visit.id}/readings`).send({
    units: { pressure: 'psig', temperature: 'F' },
    readings: [{ circuitId: c!.id, suctionPressure: GAUGE, suctionLineTemp: 48 }],
  });
  expect(res.status).toBe(200);
  const [stored] = await t.ctx.db.select().from(readings).where(eq(readings.visitId, visit.id));
  return { dto: (res.body as { readings: ReadingDto[] }).readings[0]!, stored: stored! };
}

describe('branch elevation', () => {
  it('is a branch setting the owner sets, validated by the contract (metres)', async () => {
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    const bad = await owner.patch(`/api/branches/${f.a.id}`).send({ elevationMeters: 6000 });
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toContain('elevationMeters');
    expect((await t.ctx.db.select().from(branches).where(eq(branches.id, f.a.id)))[0]!.elevationMeters).toBe(0);
    const ok = await owner.patch(`/api/branches/${f.a.id}`).send({ elevationMeters: 1609 });
    expect(ok.status).toBe(200);
    expect((ok.body as BranchDetail).elevationMeters).toBe(1609);
    // The Visit screen gets it with the branch.
    expect((await owner.get(`/api/branches/${f.a.id}`)).body.elevationMeters).toBe(1609);
  });

  it('gives a branch at 1,609 m the saturation temperature of the ISA atmosphere there, and a sea-level branch another', async () => {
    expect(GAUGE).toBeCloseTo(114.095, 2);
    const high = await readAt(f.a.id, f.inA.technician.email, f.inA.technician.id);
    const sea = await readAt(f.b.id, f.inB.technician.email, f.inB.technician.id);
    // The same absolute pressure as the reference point: its dew point (DTO rounds computed values to 0.1 °F).
    expect(Math.abs(high.dto.suctionSaturationTemp! - DEW_AT_126_196_PSIA)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(high.stored.suctionSaturationTemp! - DEW_AT_126_196_PSIA)).toBeLessThanOrEqual(0.03);
    // At sea level the same gauge is 2.6 psi more absolute pressure: a warmer dew point, about 1.2 °F.
    expect(sea.stored.suctionSaturationTemp! - high.stored.suctionSaturationTemp!).toBeGreaterThan(1.1);
    expect(sea.stored.suctionSaturationTemp! - high.stored.suctionSaturationTemp!).toBeLessThan(1.3);
    // Superheat follows: line 48 °F − dew.
    expect(high.stored.superheat!).toBeCloseTo(48 - high.stored.suctionSaturationTemp!, 9);
    // Gauge values stay as read; the elevation used is stored with the reading and answered with it.
    expect(high.stored.suctionPressure).toBeCloseTo(GAUGE, 9);
    expect(high.stored.elevationMeters).toBe(1609);
    expect(high.dto.elevationMeters).toBe(1609);
    expect(sea.stored.elevationMeters).toBe(0);
  });
});
