/**
 * `PUT /api/units/:id/circuits/:number/targets`: the office sets or clears a circuit's target superheat and
 * subcooling ranges; stored as °F differences, answered in the branch's system on the Unit file, the visit
 * and the briefing; a range with min above max (or one end) is refused and changes nothing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import type { UnitFile } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeBranch, makeSiteWithUnit, makeTwoBranches, makeUser, TEST_PASSWORD } from '../../testing/fixtures';
import { circuits } from '../../db/schema';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let u: Awaited<ReturnType<typeof makeSiteWithUnit>>;

const as = (email: string) => signedInAgent(t.app, email, TEST_PASSWORD);
const stored = async (unitId: string, number: number) =>
  (
    await t.ctx.db
      .select()
      .from(circuits)
      .where(and(eq(circuits.unitId, unitId), eq(circuits.number, number)))
  )[0]!;
const path = (unitId: string, n: number) => `/api/units/${unitId}/circuits/${n}/targets`;

beforeAll(async () => {
  t = await createTestApp();
  f = await makeTwoBranches(t.ctx.db);
  u = await makeSiteWithUnit(t.ctx.db, f.a.id);
});
afterAll(() => t.close());

describe('circuit target ranges', () => {
  it('a manager sets both ranges in °F; the Unit file answers them, the other circuit keeps none', async () => {
    const manager = await as(f.inA.manager.email);
    const res = await manager
      .put(path(u.unit.id, 1))
      .send({ temperature: 'F', superheatMin: 8, superheatMax: 12, subcoolingMin: '10', subcoolingMax: '15', source: 'Nameplate' });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({
      unitId: u.unit.id,
      circuit: 1,
      targets: { superheat: { min: 8, max: 12 }, subcooling: { min: 10, max: 15 }, source: 'Nameplate' },
    });
    const c = await stored(u.unit.id, 1);
    expect([c.targetSuperheatMinF, c.targetSuperheatMaxF, c.targetSubcoolingMinF, c.targetSubcoolingMaxF, c.targetSource]).toEqual([
      8,
      12,
      10,
      15,
      'Nameplate',
    ]);
    const file = (await manager.get(`/api/units/${u.unit.id}/file`)).body as UnitFile;
    expect(file.circuits.map((x) => [x.number, x.targets])).toEqual([
      [1, { superheat: { min: 8, max: 12 }, subcooling: { min: 10, max: 15 }, source: 'Nameplate' }],
      [2, { superheat: null, subcooling: null, source: null }],
    ]);
    const briefing = (await manager.get(`/api/units/${u.unit.id}/briefing`)).body as { circuits: { number: number; targets: unknown }[] };
    expect(briefing.circuits[0]!.targets).toEqual({
      superheat: { min: 8, max: 12 },
      subcooling: { min: 10, max: 15 },
      source: 'Nameplate',
    });
  });

  it('refuses min above max and a range with one end, naming the field, and changes nothing', async () => {
    const dispatcher = await as(f.inA.dispatcher.email);
    const res = await dispatcher
      .put(path(u.unit.id, 1))
      .send({ temperature: 'F', superheatMin: 14, superheatMax: 12, subcoolingMin: 10, subcoolingMax: 15 });
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body.error)).toContain('superheatMax');
    expect(JSON.stringify(res.body.error)).toContain('cannot be below the lowest');
    const half = await dispatcher.put(path(u.unit.id, 1)).send({ temperature: 'F', subcoolingMin: 10 });
    expect(half.status).toBe(400);
    expect(JSON.stringify(half.body.error)).toContain('subcoolingMax');
    const implausible = await dispatcher.put(path(u.unit.id, 1)).send({ temperature: 'F', superheatMin: 5, superheatMax: 80 });
    expect(implausible.status).toBe(400);
    const c = await stored(u.unit.id, 1);
    expect([c.targetSuperheatMinF, c.targetSuperheatMaxF, c.targetSubcoolingMinF, c.targetSubcoolingMaxF]).toEqual([8, 12, 10, 15]);
  });

  it('a dispatcher clears a range by sending it blank; the other range and the source stay as sent', async () => {
    const dispatcher = await as(f.inA.dispatcher.email);
    const res = await dispatcher.put(path(u.unit.id, 1)).send({
      temperature: 'F',
      superheatMin: '',
      superheatMax: '',
      subcoolingMin: 10,
      subcoolingMax: 15,
      source: 'Installation manual p. 14',
    });
    expect(res.status).toBe(200);
    expect(res.body.targets).toEqual({ superheat: null, subcooling: { min: 10, max: 15 }, source: 'Installation manual p. 14' });
    const c = await stored(u.unit.id, 1);
    expect([c.targetSuperheatMinF, c.targetSuperheatMaxF]).toEqual([null, null]);
  });

  it('an SI branch sets kelvin, stores °F differences (× 9/5) and answers kelvin', async () => {
    const si = await makeBranch(t.ctx.db, { unitSystem: 'si' });
    const manager = await makeUser(t.ctx.db, 'branch_manager', si.id);
    const unit = await makeSiteWithUnit(t.ctx.db, si.id);
    const agent = await as(manager.email);
    const res = await agent.put(path(unit.unit.id, 2)).send({ temperature: 'C', superheatMin: 5, superheatMax: 7.5 });
    expect(res.status).toBe(200);
    expect(res.body.targets.superheat).toEqual({ min: 5, max: 7.5 });
    const c = await stored(unit.unit.id, 2);
    expect(c.targetSuperheatMinF).toBeCloseTo(9, 9);
    expect(c.targetSuperheatMaxF).toBeCloseTo(13.5, 9);
    // A body in °F to an SI branch is converted, not refused: 18 °F = 10 K.
    const f18 = await agent.put(path(unit.unit.id, 2)).send({ temperature: 'F', subcoolingMin: 9, subcoolingMax: 18 });
    expect(f18.body.targets.subcooling).toEqual({ min: 5, max: 10 });
  });

  it('technicians may not set targets; another branch’s unit and a circuit the unit lacks are not found', async () => {
    const body = { temperature: 'F', superheatMin: 8, superheatMax: 12 };
    expect((await (await as(f.inA.technician.email)).put(path(u.unit.id, 1)).send(body)).status).toBe(403);
    expect((await (await as(f.inB.manager.email)).put(path(u.unit.id, 1)).send(body)).status).toBe(404);
    const manager = await as(f.inA.manager.email);
    const missing = await manager.put(path(u.unit.id, 3)).send(body);
    expect(missing.status).toBe(404);
    expect(missing.body.error.message).toBe('No such circuit.');
  });
});
