import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { alarms, circuits, refrigerantEvents, sites, units } from '../../db/schema';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let siteA: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let siteB: Awaited<ReturnType<typeof makeSiteWithUnit>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
const agents = {} as Record<'owner' | 'managerA' | 'dispatcherA' | 'technicianA' | 'managerB', Agent>;

beforeAll(async () => {
  t = await createTestApp({ now: '2026-12-02T15:00:00Z' });
  f = await makeTwoBranches(t.ctx.db);
  siteA = await makeSiteWithUnit(t.ctx.db, f.a.id);
  siteB = await makeSiteWithUnit(t.ctx.db, f.b.id);
  agents.owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
  agents.managerA = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
  agents.dispatcherA = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
  agents.technicianA = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
  agents.managerB = await signedInAgent(t.app, f.inB.manager.email, TEST_PASSWORD);
});
afterAll(() => t.close());

const unitBody = (siteId: string, over: Record<string, unknown> = {}) => ({
  siteId,
  tag: 'RTU-9',
  kind: 'rooftop_unit',
  make: 'Examplemake',
  model: 'EX-90',
  serial: `EX-${Math.random().toString(36).slice(2, 10)}`,
  installDate: '2022-04-01',
  warrantyEnd: '2027-04-01',
  refrigerant: 'R-410A',
  fullChargeLb: 14.5,
  applianceCategory: 'comfort_cooling',
  circuits: [
    { number: 1, compressorCount: 2 },
    { number: 2, compressorCount: 1 },
  ],
  ...over,
});

describe('authorization matrix', () => {
  const lists = ['/api/customers', '/api/sites', '/api/units'];
  it('technicians get 403 on every office list and write route', async () => {
    for (const path of lists) {
      const res = await agents.technicianA.get(path);
      expect(res.status, path).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    expect((await agents.technicianA.post('/api/sites').send({})).status).toBe(403);
    expect((await agents.technicianA.post('/api/units/import').send({})).status).toBe(403);
    expect((await agents.technicianA.delete(`/api/units/${siteA.unit.id}`)).status).toBe(403);
  });

  it('without a session every route answers 401', async () => {
    const { default: request } = await import('supertest');
    for (const path of [...lists, `/api/sites/${siteA.site.id}`]) expect((await request(t.app).get(path)).status, path).toBe(401);
  });

  it('branch people see only their own branch; the owner sees all or the chosen branch', async () => {
    const mine = await agents.managerA.get('/api/sites');
    expect(mine.status).toBe(200);
    expect(mine.body.rows.map((s: { id: string }) => s.id)).toEqual([siteA.site.id]);
    const all = await agents.owner.get('/api/sites');
    expect(all.body.rows.map((s: { id: string }) => s.id).sort()).toEqual([siteA.site.id, siteB.site.id].sort());
    const chosen = await agents.owner.get('/api/sites').query({ branchId: f.b.id });
    expect(chosen.body.rows.map((s: { id: string }) => s.id)).toEqual([siteB.site.id]);
    expect(chosen.body).toMatchObject({ total: 1, page: 1, pageSize: 25 });
  });

  it("another branch's records answer 404 (never 403) for reads, writes, archive and delete", async () => {
    const cases: [string, string, object?][] = [
      ['get', `/api/sites/${siteB.site.id}`],
      ['patch', `/api/sites/${siteB.site.id}`, { name: 'Mine now' }],
      ['post', `/api/sites/${siteB.site.id}/archive`],
      ['delete', `/api/sites/${siteB.site.id}`],
      ['get', `/api/units/${siteB.unit.id}`],
      ['post', `/api/units/${siteB.unit.id}/archive`],
      ['get', `/api/customers/${siteB.customer.id}`],
      ['get', '/api/sites?branchId=' + f.b.id],
    ];
    for (const [method, path, body] of cases) {
      const req = (agents.dispatcherA as unknown as Record<string, (p: string) => { send(b: object): Promise<{ status: number }> }>)[
        method
      ]!(path);
      const res = await req.send(body ?? {});
      expect(res.status, `${method} ${path}`).toBe(404);
    }
    const [still] = await t.ctx.db.select().from(sites).where(eq(sites.id, siteB.site.id));
    expect(still!.name).toBe(siteB.site.name);
    expect(still!.archivedAt).toBeNull();
    // Creating a site under another branch's customer is refused the same way.
    const res = await agents.dispatcherA
      .post('/api/sites')
      .send({ customerId: siteB.customer.id, name: 'X', address: '1 Road', lat: 40, lon: -100 });
    expect(res.status).toBe(404);
  });
});

describe('customers, sites and units', () => {
  it('a dispatcher creates a customer, a site and a unit with circuits in their branch', async () => {
    const c = await agents.dispatcherA
      .post('/api/customers')
      .send({ name: 'Northgate Schools', contactEmail: 'FACILITIES@northgate.example' });
    expect(c.status).toBe(201);
    expect(c.body).toMatchObject({
      branchId: f.a.id,
      name: 'Northgate Schools',
      contactEmail: 'facilities@northgate.example',
      siteCount: 0,
    });

    const s = await agents.dispatcherA.post('/api/sites').send({
      customerId: c.body.id,
      name: 'Northgate Middle School',
      address: '400 School Lane',
      city: 'Springfield',
      lat: 41.95,
      lon: -87.7,
      accessNotes: 'Roof hatch key at the front desk',
      contactName: 'Pat Doe',
      contactEmail: 'pat@northgate.example',
    });
    expect(s.status).toBe(201);
    expect(s.body).toMatchObject({
      branchId: f.a.id,
      customerName: 'Northgate Schools',
      unitCount: 0,
      accessNotes: 'Roof hatch key at the front desk',
    });

    const u = await agents.dispatcherA.post('/api/units').send(unitBody(s.body.id, { serial: 'NG-0001' }));
    expect(u.status).toBe(201);
    expect(u.body).toMatchObject({ siteId: s.body.id, branchId: f.a.id, serial: 'NG-0001', refrigerant: 'R-410A', fullChargeLb: 14.5 });
    expect(u.body.circuits.map((x: { number: number; compressorCount: number }) => [x.number, x.compressorCount])).toEqual([
      [1, 2],
      [2, 1],
    ]);

    const listed = await agents.dispatcherA.get('/api/sites').query({ q: 'northgate' });
    expect(listed.body.rows).toHaveLength(1);
    expect(listed.body.rows[0].unitCount).toBe(1);
  });

  it('the owner must name the branch of a new customer', async () => {
    const res = await agents.owner.post('/api/customers').send({ name: 'Anywhere Inc' });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields[0].path).toBe('branchId');
    const ok = await agents.owner.post('/api/customers').send({ name: 'Anywhere Inc', branchId: f.b.id });
    expect(ok.status).toBe(201);
    expect(ok.body.branchId).toBe(f.b.id);
  });

  it('refuses an unknown refrigerant, a bad date order and a duplicate make + serial with clear reasons', async () => {
    const bad = await agents.managerA.post('/api/units').send(unitBody(siteA.site.id, { refrigerant: 'R-999' }));
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.fields[0]).toMatchObject({ path: 'refrigerant' });
    expect(bad.body.error.details.fields[0].message).toContain('Unknown refrigerant "R-999"');

    const dates = await agents.managerA
      .post('/api/units')
      .send(unitBody(siteA.site.id, { installDate: '2024-01-01', warrantyEnd: '2023-01-01' }));
    expect(dates.status).toBe(400);
    expect(dates.body.error.details.fields[0].path).toBe('warrantyEnd');

    const dup = await agents.managerA.post('/api/units').send(unitBody(siteA.site.id, { make: 'Testmake', serial: siteA.unit.serial }));
    expect(dup.status).toBe(409);
    expect(dup.body.error.code).toBe('duplicate_serial');
    expect(dup.body.error.message).toContain(siteA.unit.tag);
  });

  it('sorts, filters and pages on the server', async () => {
    const c = await agents.managerA.post('/api/customers').send({ name: 'Paging Foods' });
    const s = await agents.managerA
      .post('/api/sites')
      .send({ customerId: c.body.id, name: 'Paging Foods DC', address: '9 Dock Rd', lat: 41, lon: -88 });
    for (const tag of ['WIC-3', 'WIC-1', 'WIC-2']) {
      expect((await agents.managerA.post('/api/units').send(unitBody(s.body.id, { tag, kind: 'walk_in_cooler' }))).status).toBe(201);
    }
    const p1 = await agents.managerA.get('/api/units').query({ siteId: s.body.id, sort: 'tag', dir: 'desc', pageSize: 2, page: 1 });
    expect(p1.body.total).toBe(3);
    expect(p1.body.rows.map((u: { tag: string }) => u.tag)).toEqual(['WIC-3', 'WIC-2']);
    const p2 = await agents.managerA.get('/api/units').query({ siteId: s.body.id, sort: 'tag', dir: 'desc', pageSize: 2, page: 2 });
    expect(p2.body.rows.map((u: { tag: string }) => u.tag)).toEqual(['WIC-1']);
    const q = await agents.managerA.get('/api/units').query({ siteId: s.body.id, q: 'wic-2' });
    expect(q.body.rows.map((u: { tag: string }) => u.tag)).toEqual(['WIC-2']);
    // An unknown sort key falls back to the default instead of failing or injecting SQL.
    const odd = await agents.managerA.get('/api/units').query({ siteId: s.body.id, sort: 'tag; drop table units' });
    expect(odd.status).toBe(200);
    expect(odd.body.rows.map((u: { tag: string }) => u.tag)).toEqual(['WIC-1', 'WIC-2', 'WIC-3']);
  });

  it('editing a unit saves the whole unit and matches circuits by number', async () => {
    const u = await agents.managerA.post('/api/units').send(unitBody(siteA.site.id));
    const edited = await agents.managerA.put(`/api/units/${u.body.id}`).send({
      ...unitBody(siteA.site.id),
      serial: u.body.serial,
      siteId: undefined,
      model: 'EX-91',
      circuits: [{ number: 1, compressorCount: 3 }],
    });
    expect(edited.status).toBe(200);
    expect(edited.body.model).toBe('EX-91');
    expect(edited.body.circuits).toHaveLength(1);
    expect(edited.body.circuits[0].compressorCount).toBe(3);
  });
});

describe('archiving versus deleting', () => {
  it('deletes a unit and a site without history', async () => {
    const fresh = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const delUnit = await agents.managerA.delete(`/api/units/${fresh.unit.id}`);
    expect(delUnit.status).toBe(204);
    expect(await t.ctx.db.select().from(units).where(eq(units.id, fresh.unit.id))).toHaveLength(0);
    expect(await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, fresh.unit.id))).toHaveLength(0);
    const other = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const delSite = await agents.managerA.delete(`/api/sites/${other.site.id}`);
    expect(delSite.status).toBe(204);
    expect(await t.ctx.db.select().from(sites).where(eq(sites.id, other.site.id))).toHaveLength(0);
  });

  it('refuses to delete a unit or site with history (409, naming it) and archives instead', async () => {
    const h = await makeSiteWithUnit(t.ctx.db, f.a.id);
    await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: h.site.id, unitId: h.unit.id });
    await t.ctx.db
      .insert(alarms)
      .values({ branchId: f.a.id, unitId: h.unit.id, code: 'LP1', raisedAt: new Date('2026-11-01T10:00:00Z'), source: 'form' });
    await t.ctx.db
      .insert(refrigerantEvents)
      .values({ unitId: h.unit.id, date: '2026-11-02', refrigerant: 'R-410A', poundsAdded: 2, reason: 'leak_top_off' });

    const delUnit = await agents.managerA.delete(`/api/units/${h.unit.id}`);
    expect(delUnit.status).toBe(409);
    expect(delUnit.body.error.code).toBe('has_history');
    expect(delUnit.body.error.message).toContain('1 work order');
    expect(delUnit.body.error.message).toContain('1 alarm');
    expect(delUnit.body.error.message).toContain('1 refrigerant event');
    expect(delUnit.body.error.message).toContain('Archive it instead');
    expect(delUnit.body.error.details.history).toMatchObject({ workOrders: 1, alarms: 1, refrigerantEvents: 1, readings: 0 });

    const delSite = await agents.managerA.delete(`/api/sites/${h.site.id}`);
    expect(delSite.status).toBe(409);
    expect(await t.ctx.db.select().from(units).where(eq(units.id, h.unit.id))).toHaveLength(1);

    // Archiving the site hides it and its units from the usual lists; the records stay.
    const arch = await agents.managerA.post(`/api/sites/${h.site.id}/archive`);
    expect(arch.status).toBe(200);
    expect(arch.body.archivedAt).toBe('2026-12-02T15:00:00.000Z');
    const active = await agents.managerA.get('/api/sites').query({ pageSize: 200 });
    expect(active.body.rows.some((s: { id: string }) => s.id === h.site.id)).toBe(false);
    const archived = await agents.managerA.get('/api/sites').query({ status: 'archived' });
    expect(archived.body.rows.map((s: { id: string }) => s.id)).toContain(h.site.id);
    const [u] = await t.ctx.db.select().from(units).where(eq(units.id, h.unit.id));
    expect(u!.archivedAt).not.toBeNull();

    // A unit of an archived site cannot come back alone; unarchiving the site brings it back.
    const lone = await agents.managerA.post(`/api/units/${h.unit.id}/unarchive`);
    expect(lone.status).toBe(409);
    expect((await agents.managerA.post(`/api/sites/${h.site.id}/unarchive`)).body.archivedAt).toBeNull();
    const [back] = await t.ctx.db.select().from(units).where(eq(units.id, h.unit.id));
    expect(back!.archivedAt).toBeNull();
  });

  it('a unit archived on its own stays archived when its site comes back', async () => {
    const s = await makeSiteWithUnit(t.ctx.db, f.a.id);
    expect((await agents.managerA.post(`/api/units/${s.unit.id}/archive`)).status).toBe(200);
    // Archived on its own earlier than the site (the test clock is fixed, so set the earlier instant directly).
    await t.ctx.db
      .update(units)
      .set({ archivedAt: new Date('2026-11-30T00:00:00Z') })
      .where(eq(units.id, s.unit.id));
    await agents.managerA.post(`/api/sites/${s.site.id}/archive`);
    await agents.managerA.post(`/api/sites/${s.site.id}/unarchive`);
    const [u] = await t.ctx.db.select().from(units).where(eq(units.id, s.unit.id));
    expect(u!.archivedAt?.toISOString()).toBe('2026-11-30T00:00:00.000Z');
  });

  it('a customer with sites cannot be deleted', async () => {
    const res = await agents.managerA.delete(`/api/customers/${siteA.customer.id}`);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('has_sites');
  });
});
