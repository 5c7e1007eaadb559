/**
 * The request log: one JSON line per request with its id, the signed-in user, status and duration; the id
 * answered in `X-Request-Id` and in every error body; no password, cookie, token or Authorization value in
 * any line. The lines are captured from a memory destination (pino writes one JSON object per `write`).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import request from 'supertest';
import { DrizzleQueryError } from 'drizzle-orm/errors';
import { createApp } from '../app';
import { createTestApp, type TestApp } from '../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder, TEST_PASSWORD } from '../testing/fixtures';
import { attachments, visits } from '../db/schema';
import { SESSION_COOKIE } from '../auth/session';
import { createLogger, scrubUrl } from './logger';

interface Line {
  level: number;
  msg: string;
  requestId?: string;
  userId?: string;
  status?: number;
  durationMs?: number;
  req?: { method: string; url: string };
  err?: { message: string; params?: unknown; stack?: string };
  [k: string]: unknown;
}

const written: string[] = [];
const lines = () => written.map((l) => JSON.parse(l) as Line);
const lineOf = (requestId: string) => {
  const found = lines().filter((l) => l.requestId === requestId && l.status !== undefined);
  expect(found, `one request line for ${requestId}`).toHaveLength(1);
  return found[0]!;
};

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;

beforeAll(async () => {
  t = await createTestApp({ logger: createLogger({ level: 'info', destination: { write: (s: string) => void written.push(s) } }) });
  f = await makeTwoBranches(t.ctx.db);
});
afterAll(() => t.close());

describe('one line per request', () => {
  it('logs a signed-in request with its id (echoed in X-Request-Id), the user, the status and the duration', async () => {
    const signIn = await request(t.app).post('/api/auth/sign-in').send({ email: f.inA.dispatcher.email, password: TEST_PASSWORD });
    expect(signIn.status).toBe(200);
    const cookie = String(signIn.headers['set-cookie']).split(';')[0]!;

    const me = await request(t.app).get('/api/auth/me').set('Cookie', cookie);
    expect(me.status).toBe(200);
    const id = me.headers['x-request-id'] as string;
    expect(id).toMatch(/^[0-9a-f-]{36}$/);
    const line = lineOf(id);
    expect(line).toMatchObject({ level: 30, userId: f.inA.dispatcher.id, status: 200, req: { method: 'GET', url: '/api/auth/me' } });
    expect(typeof line.durationMs).toBe('number');
    expect(line.durationMs).toBeGreaterThanOrEqual(0);
    expect(typeof line.time).toBe('string');

    // Signed out: no user on the line.
    const anon = await request(t.app).get('/api/auth/me');
    expect(lineOf(anon.headers['x-request-id'] as string).userId).toBeUndefined();
  });

  it('gives each request its own id, and keeps a well-formed id from a proxy in front', async () => {
    const a = await request(t.app).get('/api/health');
    const b = await request(t.app).get('/api/health');
    expect(a.headers['x-request-id']).not.toBe(b.headers['x-request-id']);
    const proxied = await request(t.app).get('/api/health').set('X-Request-Id', 'lb-7f3a9c21e0');
    expect(proxied.headers['x-request-id']).toBe('lb-7f3a9c21e0');
    const forged = await request(t.app).get('/api/health').set('X-Request-Id', 'x" {"level":60}');
    expect(forged.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
  });
});

describe('the request id in every error body', () => {
  it('is in a 401, a 400, a 404 and a rate limiter 429, equal to X-Request-Id and to the log line', async () => {
    const wrong = await request(t.app).post('/api/auth/sign-in').send({ email: f.inA.dispatcher.email, password: 'not-the-password' });
    const invalid = await request(t.app).post('/api/auth/sign-in').send({ email: 'not an address' });
    const unknown = await request(t.app).get('/api/no-such-route');
    const limited = createApp({ ...t.ctx, config: { ...t.ctx.config, signInLimit: 1 } });
    await request(limited).post('/api/auth/sign-in').send({ email: 'someone@test.example', password: 'whatever-it-is' });
    const tooMany = await request(limited).post('/api/auth/sign-in').send({ email: 'someone@test.example', password: 'whatever-it-is' });
    const answers = [
      [wrong, 401],
      [invalid, 400],
      [unknown, 404],
      [tooMany, 429],
    ] as const;
    for (const [res, status] of answers) {
      expect(res.status).toBe(status);
      const id = res.headers['x-request-id'] as string;
      expect(res.body.error.requestId, `${status}`).toBe(id);
      expect(typeof res.body.error.code).toBe('string');
      expect(typeof res.body.error.message).toBe('string');
      expect(lineOf(id).status).toBe(status);
    }
    // Existing fields are kept (a zod failure's details).
    expect(invalid.body.error.details.fields.length).toBeGreaterThan(0);
  });

  it('logs an unexpected failure at level error with its error, statement kept and parameters not', async () => {
    const cause = new Error('connection reset');
    vi.spyOn(t.ctx.db, 'execute').mockRejectedValueOnce(new DrizzleQueryError('select 1 where $1 = $2', ['param-value-9c1e', 'x'], cause));
    const res = await request(t.app).get('/api/health');
    expect(res.status).toBe(500);
    expect(res.body.error.code).toBe('internal');
    expect(res.body.error.requestId).toBe(res.headers['x-request-id']);
    const line = lineOf(res.headers['x-request-id'] as string);
    expect(line.level).toBe(50);
    expect(line.err?.message).toContain('Failed query: select 1 where $1 = $2');
    expect(line.err?.params).toBeUndefined();
    expect(JSON.stringify(line)).not.toContain('param-value-9c1e');
  });
});

describe('a missing stored file', () => {
  it('answers 410 and logs the storage key for the administrator, with the request id, at level warn', async () => {
    const { site, unit } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const wo = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: site.id, unitId: unit.id });
    const [v] = await t.ctx.db.insert(visits).values({ branchId: f.a.id, workOrderId: wo.id, techId: f.inA.technician.id }).returning();
    const storageKey = await t.storage.put(Buffer.from('gone'), { contentType: 'image/png' });
    await t.storage.remove(storageKey);
    const [a] = await t.ctx.db
      .insert(attachments)
      .values({
        visitId: v!.id,
        unitId: unit.id,
        kind: 'photo',
        storageKey,
        displayName: 'coil.png',
        contentType: 'image/png',
        sizeBytes: 4,
      })
      .returning();
    const signIn = await request(t.app).post('/api/auth/sign-in').send({ email: f.owner.email, password: TEST_PASSWORD });
    const res = await request(t.app).get(`/api/attachments/${a!.id}`).set('Cookie', String(signIn.headers['set-cookie']).split(';')[0]!);
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe('file_missing');
    const id = res.headers['x-request-id'] as string;
    expect(res.body.error.requestId).toBe(id);
    const warning = lines().find((l) => l.requestId === id && l.level === 40);
    expect(warning?.storageKey).toBe(storageKey);
    expect(warning?.msg).toContain('a stored file is missing');
    expect(lineOf(id)).toMatchObject({ status: 410, userId: f.owner.id });
  });
});

describe('no secrets in the log', () => {
  it('never writes a password, the session cookie, an Authorization value or a link token', async () => {
    const password = 'Correct-Horse-Battery-7e2d';
    const owner = f.owner;
    // A sign-in with a password that is wrong (logged at 401) and one that is right (sets the cookie).
    await request(t.app).post('/api/auth/sign-in').send({ email: owner.email, password });
    const ok = await request(t.app).post('/api/auth/sign-in').send({ email: owner.email, password: TEST_PASSWORD });
    expect(ok.status).toBe(200);
    const setCookie = String(ok.headers['set-cookie']);
    const session = setCookie.split(';')[0]!.slice(`${SESSION_COOKIE}=`.length);
    expect(session.length).toBeGreaterThan(20);

    await request(t.app)
      .get('/api/auth/me')
      .set('Cookie', `${SESSION_COOKIE}=${session}`)
      .set('Authorization', 'Bearer bearer-secret-51ab');
    await request(t.app).post('/api/auth/reset-password/check').send({ token: 'reset-token-in-body-3d9f' });
    await request(t.app).get('/api/health?token=query-token-8b2c&keep=yes');
    await request(t.app).get('/api/calendar/feed-token-77aa.ics');

    const text = written.join('');
    for (const secret of [
      password,
      TEST_PASSWORD,
      session,
      'bearer-secret-51ab',
      'reset-token-in-body-3d9f',
      'query-token-8b2c',
      'feed-token-77aa',
    ]) {
      expect(text, secret).not.toContain(secret);
    }
    expect(text).not.toMatch(/set-cookie/i);
    // The requests are there, with their addresses scrubbed.
    const urls = lines().map((l) => l.req?.url);
    expect(urls).toContain('/api/health?token=[redacted]&keep=yes');
    expect(urls).toContain('/api/calendar/[redacted].ics');
  });

  it('redacts secrets in anything else logged with a request or an object', () => {
    const out: string[] = [];
    const log = createLogger({ destination: { write: (s: string) => void out.push(s) } });
    log.info(
      {
        req: { headers: { cookie: 'c=cookie-1', authorization: 'Basic auth-2' } },
        body: { password: 'pw-3', token: 'tk-4' },
        password: 'pw-5',
      },
      'x',
    );
    log.info({ res: { headers: { 'set-cookie': 'c=cookie-6' } }, user: { profile: { password: 'pw-7' } } }, 'y');
    const text = out.join('');
    for (const s of ['cookie-1', 'auth-2', 'pw-3', 'tk-4', 'pw-5', 'cookie-6', 'pw-7']) expect(text, s).not.toContain(s);
    expect(text).toContain('[redacted]');
  });

  it('scrubs credential query parameters and the calendar feed token from addresses', () => {
    expect(scrubUrl('/reset-password?token=abc.def')).toBe('/reset-password?token=[redacted]');
    expect(scrubUrl('/accept-invitation?x=1&token=abc#top')).toBe('/accept-invitation?x=1&token=[redacted]#top');
    expect(scrubUrl('/api/calendar/abcdef.ics?x=1')).toBe('/api/calendar/[redacted].ics?x=1');
    expect(scrubUrl('/api/work-orders?page=2')).toBe('/api/work-orders?page=2');
  });
});
