import { createHmac } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { count, eq } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { alarmDeliveries, alarms, alarmSources } from '../../db/schema';
import type { Clock } from '../../lib/clock';
import { isMachineRoute } from '../../lib/machine-routes';
import { signatureHeader, signatureOf } from './signature';

/** A clock the tests move: 2026-12-15 09:00 in Chicago (15:00 UTC), a whole second. */
let nowMs = Date.parse('2026-12-15T15:00:00.000Z');
const clock: Clock = { now: () => new Date(nowMs) };
const HOUR = 3_600_000;

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let siteA: Awaited<ReturnType<typeof makeSiteWithUnit>>;
const agent = (u: { email: string }) => signedInAgent(t.app, u.email, TEST_PASSWORD);
let seq = 0;

beforeAll(async () => {
  t = await createTestApp({ clock });
  f = await makeTwoBranches(t.ctx.db);
  siteA = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { tag: 'RTU-7' } });
  await makeSiteWithUnit(t.ctx.db, f.b.id); // another branch's site: never offered
});
afterAll(() => t.close());

const nowSec = () => String(Math.floor(nowMs / 1000));
function body(over: Record<string, unknown> = {}) {
  return JSON.stringify({
    deliveryId: `d-${++seq}`,
    unitTag: 'RTU-7',
    code: 'LP1',
    circuit: 1,
    raisedAt: new Date(nowMs - 60_000).toISOString(),
    message: 'Low suction pressure',
    ...over,
  });
}
function post(sourceId: string, raw: string, opts: { secret?: string; ts?: string; sig?: string | null } = {}) {
  const ts = opts.ts ?? nowSec();
  const req = request(t.app).post(`/api/ingest/alarms/${sourceId}`).set('Content-Type', 'application/json').set('X-Coilpath-Timestamp', ts);
  const sig = opts.sig === undefined ? signatureHeader(opts.secret ?? '', ts, Buffer.from(raw)) : opts.sig;
  if (sig !== null) req.set('X-Coilpath-Signature', sig);
  return req.send(raw);
}
async function newSource(siteId = siteA.site.id) {
  const res = await (await agent(f.inA.manager)).post('/api/alarm-sources').send({ siteId, name: 'Roof BMS' });
  expect(res.status).toBe(201);
  return res.body as { id: string; secret: string };
}
const alarmCount = async (unitId: string) => (await t.ctx.db.select({ n: count() }).from(alarms).where(eq(alarms.unitId, unitId)))[0]!.n;

describe('the signing recipe', () => {
  it('HMAC-SHA256 is the primitive of RFC 4231 (test case 2), and the header is HMAC over "<timestamp>.<raw body>"', () => {
    // RFC 4231 §4.3, test case 2: key "Jefe", data "what do ya want for nothing?".
    const rfc = createHmac('sha256', 'Jefe').update('what do ya want for nothing?').digest('hex');
    expect(rfc).toBe('5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843');
    // The same primitive through the recipe: the message is "<timestamp>.<raw body>".
    expect(signatureOf('Jefe', 'what do ya want for nothing', Buffer.from('?')).toString('hex')).toBe(
      createHmac('sha256', 'Jefe').update('what do ya want for nothing.?').digest('hex'),
    );
    // The README's example, computed independently with OpenSSL 3 (2026-12-05):
    //   printf '%s.%s' "$TS" "$BODY" | openssl dgst -sha256 -hmac 'Jefe'
    const body =
      '{"deliveryId":"bms-2026-000123","unitTag":"RTU-3","code":"LP1","circuit":1,"raisedAt":"2026-12-15T14:58:00Z","message":"Low suction pressure"}';
    expect(signatureHeader('Jefe', '1797346680', Buffer.from(body))).toBe(
      'sha256=84fe9e17e91a54331305a9fc1289df9cde76badfd3f3f3223768a781cb49c836',
    );
  });

  it('the ingest route is listed as machine-to-machine', () => {
    expect(isMachineRoute('POST', '/api/ingest/alarms/5b0e5c2e-0000-4000-8000-000000000000')).toBe(true);
    expect(isMachineRoute('POST', '/api/alarm-sources')).toBe(false);
  });
});

describe('registering sources', () => {
  it('a manager registers a source once; the secret is shown once and is not stored in clear', async () => {
    const s = await newSource();
    expect(s.secret).toMatch(/^[A-Za-z0-9_-]{43}$/);
    const [row] = await t.ctx.db.select().from(alarmSources).where(eq(alarmSources.id, s.id));
    expect(row!.secretBox).not.toContain(s.secret);
    const list = await (await agent(f.inA.manager)).get('/api/alarm-sources');
    expect(list.status).toBe(200);
    const mine = list.body.sources.find((x: { id: string }) => x.id === s.id);
    expect(mine).toMatchObject({ name: 'Roof BMS', siteId: siteA.site.id, enabled: true, lastDeliveryAt: null, deliveriesToday: 0 });
    expect(JSON.stringify(list.body)).not.toContain(s.secret);
  });

  it("roles and branches: dispatchers and technicians 403; another branch's site or source 404", async () => {
    for (const u of [f.inA.dispatcher, f.inA.technician]) {
      const a = await agent(u);
      expect((await a.get('/api/alarm-sources')).status).toBe(403);
      expect((await a.post('/api/alarm-sources').send({ siteId: siteA.site.id, name: 'X' })).status).toBe(403);
    }
    const s = await newSource();
    const b = await agent(f.inB.manager);
    expect((await b.post('/api/alarm-sources').send({ siteId: siteA.site.id, name: 'X' })).status).toBe(404);
    expect((await b.post(`/api/alarm-sources/${s.id}/rotate`)).status).toBe(404);
    expect((await b.patch(`/api/alarm-sources/${s.id}`).send({ enabled: false })).status).toBe(404);
    expect((await b.get('/api/alarm-sources')).body.sources.map((x: { id: string }) => x.id)).not.toContain(s.id);
    expect((await b.get('/api/alarm-sources').query({ branchId: f.a.id })).status).toBe(404);
  });
});

describe('a site with an alarm source', () => {
  it('is not deleted (409 has_history naming the source) rather than failing in the database', async () => {
    const u = await makeSiteWithUnit(t.ctx.db, f.a.id);
    await newSource(u.site.id);
    const res = await (await agent(f.inA.manager)).delete(`/api/sites/${u.site.id}`);
    expect(res.status).toBe(409);
    expect(res.body.error.details.history).toMatchObject({ alarmSources: 1 });
  });
});

describe('POST /api/ingest/alarms/:sourceId', () => {
  it('accepts a signed alarm (202), stores it as a controller alarm, and shows the delivery on the source', async () => {
    const s = await newSource();
    const before = await alarmCount(siteA.unit.id);
    const raw = body();
    const res = await post(s.id, raw, { secret: s.secret });
    expect(res.status).toBe(202);
    expect(res.body).toMatchObject({ accepted: true });
    expect(await alarmCount(siteA.unit.id)).toBe(before + 1);
    const [a] = await t.ctx.db.select().from(alarms).where(eq(alarms.id, res.body.alarmId));
    expect(a).toMatchObject({ source: 'controller', code: 'LP1', circuit: 1, unitId: siteA.unit.id, branchId: f.a.id });
    const list = await (await agent(f.inA.manager)).get('/api/alarm-sources');
    expect(list.body.sources.find((x: { id: string }) => x.id === s.id)).toMatchObject({
      lastDeliveryAt: new Date(nowMs).toISOString(),
      deliveriesToday: 1,
    });
  });

  it('needs no session and ignores a session cookie', async () => {
    const s = await newSource();
    const raw = body();
    const ts = nowSec();
    const res = await request(t.app)
      .post(`/api/ingest/alarms/${s.id}`)
      .set('Content-Type', 'application/json')
      .set('Cookie', 'coilpath_session=not-a-session')
      .set('X-Coilpath-Timestamp', ts)
      .set('X-Coilpath-Signature', signatureHeader(s.secret, ts, Buffer.from(raw)))
      .send(raw);
    expect(res.status).toBe(202);
  });

  it('refuses a bad or missing signature, a body changed after signing, and an unknown source (401), recording the reason', async () => {
    const s = await newSource();
    const raw = body();
    expect((await post(s.id, raw, { secret: 'not-the-secret' })).body.error.code).toBe('bad_signature');
    expect((await post(s.id, raw, { sig: null })).status).toBe(401);
    const ts = nowSec();
    const signed = signatureHeader(s.secret, ts, Buffer.from(raw));
    // The same JSON with one space more: the signature covers the exact bytes.
    const changed = await post(s.id, raw.replace('"code":', '"code": '), { ts, sig: signed });
    expect(changed.status).toBe(401);
    expect((await post('00000000-0000-4000-8000-000000000000', raw, { secret: s.secret })).body.error.code).toBe('unknown_source');
    expect((await post('not-a-uuid', raw, { secret: s.secret })).status).toBe(401);
    const list = await (await agent(f.inA.manager)).get('/api/alarm-sources');
    const mine = list.body.sources.find((x: { id: string }) => x.id === s.id);
    expect(mine.rejectedToday).toBe(3);
    expect(mine.recentRejected.map((d: { reason: string }) => d.reason).sort()).toEqual([
      'bad_signature',
      'bad_signature',
      'missing_signature',
    ]);
    expect(mine.deliveriesToday).toBe(0);
  });

  it('clock skew: 5 minutes either side is accepted, 5 minutes and 1 second refused', async () => {
    const s = await newSource();
    const sec = Math.floor(nowMs / 1000);
    for (const d of [-300, 300]) expect((await post(s.id, body(), { secret: s.secret, ts: String(sec + d) })).status, `${d}`).toBe(202);
    for (const d of [-301, 301]) {
      const res = await post(s.id, body(), { secret: s.secret, ts: String(sec + d) });
      expect(res.status, `${d}`).toBe(401);
      expect(res.body.error.code).toBe('timestamp_skew');
    }
  });

  it('replay: the same deliveryId again answers 200 duplicate and stores nothing new', async () => {
    const s = await newSource();
    const raw = body();
    expect((await post(s.id, raw, { secret: s.secret })).status).toBe(202);
    const before = await alarmCount(siteA.unit.id);
    const again = await post(s.id, raw, { secret: s.secret });
    expect(again.status).toBe(200);
    expect(again.body).toEqual({ duplicate: true });
    expect(await alarmCount(siteA.unit.id)).toBe(before);
  });

  it('20 parallel identical deliveries store one alarm', async () => {
    const s = await newSource();
    const raw = body({ deliveryId: 'parallel-1' });
    const before = await alarmCount(siteA.unit.id);
    const ts = nowSec();
    const sig = signatureHeader(s.secret, ts, Buffer.from(raw));
    const answers = await Promise.all(Array.from({ length: 20 }, () => post(s.id, raw, { ts, sig })));
    expect(answers.map((a) => a.status).sort()).toEqual([...Array(19).fill(200), 202]);
    expect(await alarmCount(siteA.unit.id)).toBe(before + 1);
    const rows = await t.ctx.db.select().from(alarmDeliveries).where(eq(alarmDeliveries.sourceId, s.id));
    expect(rows).toHaveLength(1);
  });

  it('rotation: the old secret is still accepted at 23 h and refused at 25 h; the new one works at once', async () => {
    const start = nowMs;
    const s = await newSource();
    const rot = await (await agent(f.inA.manager)).post(`/api/alarm-sources/${s.id}/rotate`);
    expect(rot.status).toBe(200);
    expect(rot.body.secret).not.toBe(s.secret);
    expect(rot.body.previousValidUntil).toBe(new Date(start + 24 * HOUR).toISOString());
    expect((await post(s.id, body(), { secret: rot.body.secret })).status).toBe(202);
    try {
      nowMs = start + 23 * HOUR;
      expect((await post(s.id, body(), { secret: s.secret })).status).toBe(202);
      nowMs = start + 25 * HOUR;
      expect((await post(s.id, body(), { secret: s.secret })).status).toBe(401);
      expect((await post(s.id, body(), { secret: rot.body.secret })).status).toBe(202);
    } finally {
      nowMs = start;
    }
  });

  it('a disabled source is refused (401) until enabled again', async () => {
    const s = await newSource();
    const mgr = await agent(f.inA.manager);
    const off = await mgr.patch(`/api/alarm-sources/${s.id}`).send({ enabled: false });
    expect(off.status).toBe(200);
    expect(off.body.source.enabled).toBe(false);
    const res = await post(s.id, body(), { secret: s.secret });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('source_disabled');
    expect((await mgr.patch(`/api/alarm-sources/${s.id}`).send({ enabled: true })).status).toBe(200);
    expect((await post(s.id, body(), { secret: s.secret })).status).toBe(202);
  });

  it('an unknown unit tag answers 422 and is kept; a manager maps it to a unit of the site and the alarm is stored', async () => {
    const s = await newSource();
    const res = await post(s.id, body({ unitTag: 'AHU-99', code: 'FAN' }), { secret: s.secret });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('unknown_unit');
    const mgr = await agent(f.inA.manager);
    const list = await mgr.get('/api/alarm-sources');
    const d = list.body.sources.find((x: { id: string }) => x.id === s.id).unmatched[0];
    expect(d).toMatchObject({ unitTag: 'AHU-99', code: 'FAN', status: 'unmatched', reason: 'unknown_unit' });
    // Another branch's manager cannot map it; a unit of another site is refused.
    expect(
      (await (await agent(f.inB.manager)).post(`/api/alarm-sources/deliveries/${d.id}/map`).send({ unitId: siteA.unit.id })).status,
    ).toBe(404);
    const other = await makeSiteWithUnit(t.ctx.db, f.a.id);
    expect((await mgr.post(`/api/alarm-sources/deliveries/${d.id}/map`).send({ unitId: other.unit.id })).status).toBe(422);
    const before = await alarmCount(siteA.unit.id);
    const mapped = await mgr.post(`/api/alarm-sources/deliveries/${d.id}/map`).send({ unitId: siteA.unit.id });
    expect(mapped.status).toBe(200);
    expect(mapped.body.delivery.status).toBe('mapped');
    expect(await alarmCount(siteA.unit.id)).toBe(before + 1);
    expect((await mgr.post(`/api/alarm-sources/deliveries/${d.id}/map`).send({ unitId: siteA.unit.id })).status).toBe(409);
  });

  it('a body that is not JSON answers 400, a missing field 400, a body over the limit 413', async () => {
    const s = await newSource();
    expect((await post(s.id, '{"deliveryId":', { secret: s.secret })).status).toBe(400);
    const noCode = JSON.stringify({ deliveryId: 'x-1', unitTag: 'RTU-7', raisedAt: new Date(nowMs).toISOString() });
    const r = await post(s.id, noCode, { secret: s.secret });
    expect(r.status).toBe(400);
    expect(r.body.error.details.fields.map((x: { path: string }) => x.path)).toContain('code');
    expect((await post(s.id, body({ message: 'x'.repeat(20_000) }), { secret: s.secret })).status).toBe(413);
  });
});

describe('the repeat-alarm rule at once', () => {
  it('the second alarm of a code in 30 days puts the unit on the Watchlist and e-mails the managers once that day', async () => {
    const u = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { tag: 'RTU-R' } });
    const s = await newSource(u.site.id);
    const mails = () => t.mailer.sent.filter((m) => m.subject.includes('RTU-R'));
    const send = (code: string, agoMs: number) =>
      post(s.id, body({ unitTag: 'RTU-R', code, raisedAt: new Date(nowMs - agoMs).toISOString() }), { secret: s.secret });

    const first = await send('HP2', 10 * 24 * HOUR);
    expect(first.body.repeatAlarm).toBe(false);
    expect(mails()).toHaveLength(0);
    // The branch's rule (default 2 in 30 days); the code in another case is the same code.
    const second = await send('hp2', HOUR);
    expect(second.body.repeatAlarm).toBe(true);
    expect(mails().map((m) => m.to)).toEqual([f.inA.manager.email]);
    expect(mails()[0]!.html).toContain('RTU-R');
    expect(mails()[0]!.headers).toMatchObject({ 'Auto-Submitted': 'auto-generated' });
    const wl = await (await agent(f.inA.manager)).get('/api/watchlist/repeat-alarms');
    expect(wl.body.units.map((x: { unitId: string }) => x.unitId)).toContain(u.unit.id);
    // A third alarm the same day: still one e-mail.
    await send('HP2', 60_000);
    expect(mails()).toHaveLength(1);
    // The next local day: one more.
    const start = nowMs;
    try {
      nowMs = start + 24 * HOUR;
      await send('HP2', 60_000);
      expect(mails()).toHaveLength(2);
    } finally {
      nowMs = start;
    }
  });
});
