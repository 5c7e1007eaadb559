import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { UnitFile, UnitSearchResult } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, TEST_PASSWORD } from '../../testing/fixtures';
import { alarms, attachments, bookings, circuits, findings, readings, refrigerantEvents, units, visits, workOrders } from '../../db/schema';
import { eq } from 'drizzle-orm';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let u1: Awaited<ReturnType<typeof makeSiteWithUnit>>; // branch A, visited by A's technician
let u2: Awaited<ReturnType<typeof makeSiteWithUnit>>; // branch A, booked for A's technician (no visit yet)
let u3: Awaited<ReturnType<typeof makeSiteWithUnit>>; // branch A, nobody assigned
let u4: Awaited<ReturnType<typeof makeSiteWithUnit>>; // branch B
let photoId: string;

beforeAll(async () => {
  t = await createTestApp({ now: '2026-07-01T12:00:00Z' });
  const db = t.ctx.db;
  f = await makeTwoBranches(db);
  u1 = await makeSiteWithUnit(db, f.a.id, { unit: { tag: 'RTU-ALPHA', serial: 'ZX-1001', fullChargeLb: 18, refrigerant: 'R-410A' } });
  u2 = await makeSiteWithUnit(db, f.a.id);
  u3 = await makeSiteWithUnit(db, f.a.id);
  u4 = await makeSiteWithUnit(db, f.b.id);
  const tech = f.inA.technician;
  const [w] = await db
    .insert(workOrders)
    .values({
      branchId: f.a.id,
      siteId: u1.site.id,
      unitId: u1.unit.id,
      kind: 'service_call',
      state: 'closed',
      createdAt: new Date('2026-03-20T08:00:00Z'),
    })
    .returning();
  const [v] = await db
    .insert(visits)
    .values({
      branchId: f.a.id,
      workOrderId: w!.id,
      techId: tech.id,
      onSiteAt: new Date('2026-03-20T10:00:00Z'),
      closedAt: new Date('2026-03-20T12:00:00Z'),
      outcome: 'resolved',
      labourMinutes: 120,
    })
    .returning();
  const cs = await db.select().from(circuits).where(eq(circuits.unitId, u1.unit.id));
  for (const c of cs) {
    await db.insert(readings).values({
      visitId: v!.id,
      unitId: u1.unit.id,
      circuitId: c.id,
      takenAt: new Date('2026-03-20T11:00:00Z'),
      refrigerant: 'R-410A',
      suctionPressure: 118 + c.number,
      superheat: 10 + c.number,
      subcooling: 9,
    });
  }
  await db.insert(findings).values({
    visitId: v!.id,
    unitId: u1.unit.id,
    causeCode: 'wiring_fault',
    origin: 'factory_defect',
    alarmCode: 'LP2',
    reportedCircuit: 2,
    actualCircuit: 1,
  });
  await db.insert(alarms).values({
    branchId: f.a.id,
    unitId: u1.unit.id,
    circuit: 2,
    code: 'LP2',
    raisedAt: new Date('2026-03-19T22:00:00Z'),
    source: 'controller',
  });
  // Refrigerant log (full charge 18 lb, R-410A, comfort cooling → 40 CFR 84.106 from 2026, threshold 10 %):
  await db.insert(refrigerantEvents).values([
    { unitId: u1.unit.id, date: '2025-06-01', refrigerant: 'R-410A', poundsAdded: 18, reason: 'initial_charge' },
    {
      unitId: u1.unit.id,
      visitId: v!.id,
      date: '2026-03-20',
      refrigerant: 'R-410A',
      poundsAdded: 1.8,
      reason: 'leak_top_off',
      techId: tech.id,
    },
    { unitId: u1.unit.id, date: '2026-04-19', refrigerant: 'R-410A', poundsAdded: 0.9, reason: 'leak_top_off' },
  ]);
  const [photo] = await db
    .insert(attachments)
    .values({
      visitId: v!.id,
      kind: 'nameplate',
      storageKey: await t.storage.put(Buffer.from('fake-jpeg'), { contentType: 'image/jpeg' }),
      displayName: 'nameplate.jpg',
      contentType: 'image/jpeg',
      sizeBytes: 9,
    })
    .returning();
  photoId = photo!.id;
  await db.update(units).set({ nameplateAttachmentId: photoId }).where(eq(units.id, u1.unit.id));
  // A booking (no visit yet) gives A's technician access to U2.
  const [w2] = await db
    .insert(workOrders)
    .values({ branchId: f.a.id, siteId: u2.site.id, unitId: u2.unit.id, kind: 'service_call', state: 'booked' })
    .returning();
  await db.insert(bookings).values({
    branchId: f.a.id,
    workOrderId: w2!.id,
    techId: tech.id,
    startAt: new Date('2026-07-02T14:00:00Z'),
    endAt: new Date('2026-07-02T15:00:00Z'),
  });
});
afterAll(() => t.close());

const as = (email: string) => signedInAgent(t.app, email, TEST_PASSWORD);

describe('GET /api/units/:id/file', () => {
  it('gives the owner everything known about the unit', async () => {
    const res = await (await as(f.owner.email)).get(`/api/units/${u1.unit.id}/file`);
    expect(res.status).toBe(200);
    const file = res.body as UnitFile;
    expect(file.unit).toMatchObject({ tag: 'RTU-ALPHA', serial: 'ZX-1001', make: 'Testmake' });
    expect(file.branch.id).toBe(f.a.id);
    expect(file.circuits.map((c) => c.number)).toEqual([1, 2]);
    expect(file.readings).toHaveLength(2);
    expect(file.readings.map((r) => r.circuitNumber).sort()).toEqual([1, 2]);
    expect(file.findings[0]).toMatchObject({ causeCode: 'wiring_fault', origin: 'factory_defect', reportedCircuit: 2, actualCircuit: 1 });
    expect(file.alarms[0]!.code).toBe('LP2');
    expect(file.workOrders).toHaveLength(1);
    expect(file.workOrders[0]!.visits[0]!.labourMinutes).toBe(120);
    expect(file.nameplate?.id).toBe(photoId);
    expect(file.attachments.map((a) => a.id)).toEqual([photoId]);
  });

  it('serves the unit’s attachments to those who may read it', async () => {
    const owner = await as(f.owner.email);
    const res = await owner.get(`/api/units/${u1.unit.id}/file/attachments/${photoId}`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('image/jpeg');
    expect((await owner.get(`/api/units/${u3.unit.id}/file/attachments/${photoId}`)).status).toBe(404);
  });

  it('lets managers and dispatchers read their own branch only', async () => {
    expect((await (await as(f.inA.manager.email)).get(`/api/units/${u1.unit.id}/file`)).status).toBe(200);
    expect((await (await as(f.inA.dispatcher.email)).get(`/api/units/${u3.unit.id}/file`)).status).toBe(200);
    expect((await (await as(f.inB.manager.email)).get(`/api/units/${u1.unit.id}/file`)).status).toBe(404);
    expect((await (await as(f.inB.dispatcher.email)).get(`/api/units/${u1.unit.id}/file`)).status).toBe(404);
  });

  it('lets a technician read the units on their visits and bookings, and no other', async () => {
    const tech = await as(f.inA.technician.email);
    expect((await tech.get(`/api/units/${u1.unit.id}/file`)).status).toBe(200);
    expect((await tech.get(`/api/units/${u2.unit.id}/file`)).status).toBe(200);
    expect((await tech.get(`/api/units/${u3.unit.id}/file`)).status).toBe(404);
    expect((await tech.get(`/api/units/${u4.unit.id}/file`)).status).toBe(404);
    const other = await makeUser(t.ctx.db, 'technician', f.a.id);
    expect((await (await as(other.email)).get(`/api/units/${u1.unit.id}/file`)).status).toBe(404);
  });

  it('answers 404 for an unknown unit, 400 for a malformed id and 401 without a session', async () => {
    const owner = await as(f.owner.email);
    expect((await owner.get('/api/units/00000000-0000-4000-8000-000000000000/file')).status).toBe(404);
    expect((await owner.get('/api/units/not-an-id/file')).status).toBe(400);
    expect((await request(t.app).get(`/api/units/${u1.unit.id}/file`)).status).toBe(401);
  });
});

describe('GET /api/unit-file (unit search)', () => {
  it('finds units in the person’s scope by tag, serial, make, model or site', async () => {
    const owner = await as(f.owner.email);
    const all = (await owner.get('/api/unit-file')).body as UnitSearchResult;
    expect(all.units).toHaveLength(4);
    const bySerial = (await owner.get('/api/unit-file?q=zx-10')).body as UnitSearchResult;
    expect(bySerial.units.map((u) => u.id)).toEqual([u1.unit.id]);
    const mgrB = (await (await as(f.inB.manager.email)).get('/api/unit-file')).body as UnitSearchResult;
    expect(mgrB.units.map((u) => u.id)).toEqual([u4.unit.id]);
    expect((await (await as(f.inB.manager.email)).get(`/api/unit-file?branchId=${f.a.id}`)).status).toBe(404);
  });

  it('shows a technician only the units on their assignments', async () => {
    const res = (await (await as(f.inA.technician.email)).get('/api/unit-file')).body as UnitSearchResult;
    expect(res.units.map((u) => u.id).sort()).toEqual([u1.unit.id, u2.unit.id].sort());
    expect(res.units.find((u) => u.id === u2.unit.id)!.openWorkOrders).toBe(1);
  });
});
