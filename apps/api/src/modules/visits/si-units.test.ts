/**
 * A branch that reads in SI: readings arrive in kPa(g)/°C (the body says so), are stored in psig/°F,
 * and come back in the branch's units with the units stated — on the visit, the briefing, the Unit
 * file and the service summary. A body in mixed or unknown units is a 400 that writes nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { branches, circuits, readings } from '../../db/schema';
import { makeBookedVisit, NOT_AVAILABLE } from './visits.fixtures';

const NOW = '2026-03-10T15:00:00Z';
const KPA_G_C = { pressure: 'kPag', temperature: 'C' } as const;
const PSIG_F = { pressure: 'psig', temperature: 'F' } as const;
/** 1 psi in kPa: NIST SP 811 (2008), B.8 (6.894 757), exact from 1 lbf = 4.448 221 615 260 5 N and 1 in = 0.0254 m. */
const KPA_PER_PSI = 6.894757293168;

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let place: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let circuitIds: string[];
let tech: Awaited<ReturnType<typeof signedInAgent>>;
let manager: Awaited<ReturnType<typeof signedInAgent>>;

beforeAll(async () => {
  t = await createTestApp({ now: NOW });
  f = await makeTwoBranches(t.ctx.db);
  await t.ctx.db.update(branches).set({ unitSystem: 'si' }).where(eq(branches.id, f.a.id));
  place = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { refrigerant: 'R-410A' } });
  const cs = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, place.unit.id)).orderBy(circuits.number);
  circuitIds = cs.map((c) => c.id);
  tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
  manager = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
});
afterAll(() => t.close());

const setSystem = (unitSystem: 'imperial' | 'si') => t.ctx.db.update(branches).set({ unitSystem }).where(eq(branches.id, f.a.id));

async function visitOnSite() {
  const { visit } = await makeBookedVisit(t.ctx.db, {
    branchId: f.a.id,
    siteId: place.site.id,
    unitId: place.unit.id,
    techId: f.inA.technician.id,
    startAt: '2026-03-10T14:00:00Z',
  });
  expect((await tech.patch(`/api/visits/${visit.id}`).send({ state: 'on_site' })).status).toBe(200);
  return visit;
}

const rowCount = async () => Number((await t.ctx.db.select({ n: sql<number>`count(*)` }).from(readings))[0]!.n);

describe('readings on an SI branch', () => {
  it('takes kPa(g)/°C, stores psig/°F, and answers in kPa(g)/°C with superheat and subcooling in kelvin', async () => {
    const visit = await visitOnSite();
    // Check values: tests/reference/data/refrigerant-saturation.json (CoolProp 8.0.0), R-410A
    // 768.8 kPa(g) dew 2.74 °C; 2412.5 kPa(g) bubble 41.48 °C.
    const res = await tech.post(`/api/visits/${visit.id}/readings`).send({
      units: KPA_G_C,
      readings: [
        {
          circuitId: circuitIds[0],
          suctionPressure: 768.8,
          suctionPressureController: 790,
          suctionLineTemp: 9.3,
          liquidPressure: 2412.5,
          liquidLineTemp: 35.8,
          outdoorTemp: -4.5,
        },
      ],
    });
    expect(res.status).toBe(200);
    const r = res.body.readings[0];
    expect(r.units).toEqual(KPA_G_C);
    // As entered, not 768.8000000001.
    expect(r).toMatchObject({
      suctionPressure: 768.8,
      suctionPressureController: 790,
      suctionLineTemp: 9.3,
      liquidPressure: 2412.5,
      liquidLineTemp: 35.8,
      outdoorTemp: -4.5,
    });
    expect(Math.abs(r.suctionSaturationTemp - 2.74)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.superheat - (9.3 - 2.74))).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.liquidSaturationTemp - 41.48)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.subcooling - (41.48 - 35.8))).toBeLessThanOrEqual(0.1);

    // Stored in psig/°F: kPa ÷ 6.894757293168, °C × 9/5 + 32; superheat and subcooling as °F differences.
    const [row] = await t.ctx.db.select().from(readings).where(eq(readings.id, r.id));
    expect(row!.suctionPressure).toBeCloseTo(768.8 / KPA_PER_PSI, 9);
    expect(row!.suctionPressureController).toBeCloseTo(790 / KPA_PER_PSI, 9);
    expect(row!.liquidPressure).toBeCloseTo(2412.5 / KPA_PER_PSI, 9);
    expect(row!.suctionLineTemp).toBeCloseTo(48.74, 9);
    expect(row!.outdoorTemp).toBeCloseTo(23.9, 9);
    expect(row!.suctionSaturationTemp).toBeCloseTo(2.74 * 1.8 + 32, 0);
    // A difference converts by × 5/9 with no offset: the answer is the stored °F superheat × 5/9.
    expect(r.superheat).toBe(Math.round(((row!.superheat! * 5) / 9) * 10) / 10);
    expect(r.subcooling).toBe(Math.round(((row!.subcooling! * 5) / 9) * 10) / 10);

    // The same stored reading read by an imperial branch: psig/°F (CoolProp: 111.5 psig dew 36.93 °F).
    await setSystem('imperial');
    try {
      const imperial = (await manager.get(`/api/visits/${visit.id}`)).body;
      expect(imperial.branch.unitSystem).toBe('imperial');
      const ri = imperial.readings[0];
      expect(ri.units).toEqual(PSIG_F);
      expect(ri.suctionPressure).toBeCloseTo(111.5, 0);
      expect(ri.suctionLineTemp).toBe(48.74);
      expect(Math.abs(ri.suctionSaturationTemp - 36.93)).toBeLessThanOrEqual(0.2);
      expect(ri.superheat).toBe(Math.round(row!.superheat! * 10) / 10);
    } finally {
      await setSystem('si');
    }
  });

  it('round-trips what the technician typed, and the visit says which system it reads in', async () => {
    const visit = await visitOnSite();
    const typed = {
      circuitId: circuitIds[1],
      suctionPressure: 765.3,
      liquidPressure: 2750,
      dischargePressure: 2801.7,
      suctionLineTemp: 4.4,
      liquidLineTemp: 38.1,
      outdoorTemp: 31.2,
    };
    expect((await tech.post(`/api/visits/${visit.id}/readings`).send({ units: KPA_G_C, readings: [typed] })).status).toBe(200);
    const detail = (await tech.get(`/api/visits/${visit.id}`)).body;
    expect(detail.branch).toMatchObject({ unitSystem: 'si', sensorToleranceAbsolute: 5 });
    expect(detail.readings[0]).toMatchObject({ ...typed, units: KPA_G_C });
  });

  it('converts a body that states psig/°F on an SI branch (the body says what it is in)', async () => {
    const visit = await visitOnSite();
    const res = await tech
      .post(`/api/visits/${visit.id}/readings`)
      .send({ units: PSIG_F, readings: [{ circuitId: circuitIds[0], suctionPressure: 118, suctionLineTemp: 50 }] });
    expect(res.status).toBe(200);
    expect(res.body.readings[0]).toMatchObject({
      units: KPA_G_C,
      suctionPressure: Math.round(118 * KPA_PER_PSI * 100) / 100,
      suctionLineTemp: 10,
    });
    const [row] = await t.ctx.db.select().from(readings).where(eq(readings.id, res.body.readings[0].id));
    expect(row).toMatchObject({ suctionPressure: 118, suctionLineTemp: 50 });
  });

  it('refuses mixed, unknown and missing units and out-of-range values with a 400 naming the field, writing nothing', async () => {
    const visit = await visitOnSite();
    const before = await rowCount();
    const post = (body: unknown) => tech.post(`/api/visits/${visit.id}/readings`).send(body as object);
    const reading = { circuitId: circuitIds[0], suctionPressure: 768.8, suctionLineTemp: 9.3 };

    const mixed = await post({ units: { pressure: 'kPag', temperature: 'F' }, readings: [reading] });
    expect(mixed.status).toBe(400);
    expect(mixed.body.error.details.fields).toEqual([
      { path: 'units.temperature', message: 'Pressure and temperature units must come from one system: psig with F, or kPag with C' },
    ]);

    const bar = await post({ units: { pressure: 'bar', temperature: 'C' }, readings: [reading] });
    expect(bar.status).toBe(400);
    expect(bar.body.error.details.fields[0]).toEqual({ path: 'units.pressure', message: 'State the pressure unit: psig or kPag' });

    const missing = await post({ readings: [reading] });
    expect(missing.status).toBe(400);
    expect(missing.body.error.details.fields.map((x: { path: string }) => x.path)).toContain('units');

    // 2,412.5 is a liquid pressure in kPa(g), but no gauge reads 2,412.5 psig.
    const wrongScale = await post({ units: PSIG_F, readings: [{ circuitId: circuitIds[0], liquidPressure: 2412.5 }] });
    expect(wrongScale.status).toBe(400);
    expect(wrongScale.body.error.details.fields).toEqual([{ path: 'readings.0.liquidPressure', message: 'Above 1,000 psig' }]);

    const hot = await post({ units: KPA_G_C, readings: [{ circuitId: circuitIds[0], suctionLineTemp: 250, dischargePressure: 7200 }] });
    expect(hot.status).toBe(400);
    expect(hot.body.error.details.fields).toEqual([
      { path: 'readings.0.dischargePressure', message: 'Above 6,900 kPa(g)' },
      { path: 'readings.0.suctionLineTemp', message: 'Above 205 °C' },
    ]);

    expect(await rowCount()).toBe(before);
  });
});

describe('readings shown elsewhere on an SI branch', () => {
  it('the briefing and the Unit file answer in kPa(g)/°C with the units stated', async () => {
    const visit = await visitOnSite();
    await tech
      .post(`/api/visits/${visit.id}/readings`)
      .send({ units: KPA_G_C, readings: [{ circuitId: circuitIds[0], suctionPressure: 768.8, suctionLineTemp: 9.3 }] });
    const b = (await tech.get(`/api/units/${place.unit.id}/briefing`)).body;
    expect(b.units).toEqual(KPA_G_C);
    const c1 = b.lastReadings.find((r: { circuitNumber: number }) => r.circuitNumber === 1);
    expect(c1).toMatchObject({ units: KPA_G_C, suctionPressure: 768.8, suctionLineTemp: 9.3 });
    expect(Math.abs(c1.superheat - 6.56)).toBeLessThanOrEqual(0.1);

    const file = (await manager.get(`/api/units/${place.unit.id}/file`)).body;
    expect(file.branch.unitSystem).toBe('si');
    expect(file.readings.length).toBeGreaterThan(0);
    for (const r of file.readings) expect(r.units).toEqual(KPA_G_C);
    expect(file.readings.at(-1)).toMatchObject({ suctionPressure: 768.8, suctionLineTemp: 9.3 });
  });

  it('the service summary e-mail prints kPa(g), °C and K on every value', async () => {
    const visit = await visitOnSite();
    await tech.post(`/api/visits/${visit.id}/readings`).send({
      units: KPA_G_C,
      readings: [
        {
          circuitId: circuitIds[0],
          suctionPressure: 768.8,
          suctionPressureController: 790,
          suctionLineTemp: 9.3,
          liquidPressure: 2412.5,
          liquidLineTemp: 35.8,
        },
      ],
    });
    t.mailer.sent.length = 0;
    expect((await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' })).status).toBe(200);
    const text = t.mailer.sent[0]!.text;
    expect(text).toContain('Suction pressure 768.8 kPa(g) (controller 790.0 kPa(g)), saturation 2.7 °C');
    expect(text).toMatch(/Suction line 9\.3 °C, superheat 6\.[5-6] K/);
    expect(text).toMatch(/Liquid pressure 2412\.5 kPa\(g\) \(controller -\), saturation 41\.[4-5] °C/);
    expect(text).toMatch(/Liquid line 35\.8 °C, subcooling 5\.[6-7] K/);
    expect(text).not.toMatch(/psig|°F/);
  });
});
