import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, signedInAgent, type TestApp } from '../testing/harness';
import { makeTwoBranches, TEST_PASSWORD } from '../testing/fixtures';
import { crossOriginProblem } from './same-origin';
import { MACHINE_ROUTES } from '../lib/machine-routes';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let owner: Awaited<ReturnType<typeof signedInAgent>>;

beforeAll(async () => {
  t = await createTestApp();
  f = await makeTwoBranches(t.ctx.db);
  owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
});
afterAll(() => t.close());

/** A branch edit: a state-changing request a forged page would want. */
const rename = (headers: Record<string, string>) => {
  let r = owner.patch(`/api/branches/${f.a.id}`);
  for (const [k, v] of Object.entries(headers)) r = r.set(k, v);
  return r.send({ name: 'Alpha North' });
};

describe('state-changing requests come from the same origin only', () => {
  it('refuses a foreign Origin with 403 cross_origin, changing nothing, whatever the body', async () => {
    const res = await rename({ Origin: 'https://evil.example' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('cross_origin');
    expect(res.body.error.message).toContain('https://evil.example');
    expect((await owner.get(`/api/branches/${f.a.id}`)).body.name).toBe(f.a.name);
    // A form post (not JSON) from elsewhere, and a sign-in from elsewhere (login CSRF), are refused the same way.
    const form = await request(t.app).post('/api/auth/sign-out').set('Origin', 'https://evil.example').type('form').send('a=1');
    expect(form.body.error.code).toBe('cross_origin');
    const signIn = await request(t.app)
      .post('/api/auth/sign-in')
      .set('Origin', 'null')
      .send({ email: f.owner.email, password: TEST_PASSWORD });
    expect(signIn.status).toBe(403);
  });

  it('refuses Sec-Fetch-Site cross-site or same-site when Origin is absent', async () => {
    expect((await rename({ 'Sec-Fetch-Site': 'cross-site' })).status).toBe(403);
    expect((await rename({ 'Sec-Fetch-Site': 'same-site' })).status).toBe(403);
  });

  it('accepts the same origin (the request host or PUBLIC_URL), and requests with neither header', async () => {
    // The page at the origin the request was sent to (its Host) may write.
    expect((await rename({ Host: 'office.coilpath.local:8080', Origin: 'http://office.coilpath.local:8080' })).status).toBe(200);
    expect((await rename({ Origin: 'http://coilpath.test' })).status).toBe(200); // PUBLIC_URL of the test app
    expect((await rename({ 'Sec-Fetch-Site': 'same-origin' })).status).toBe(200);
    expect((await rename({})).status).toBe(200); // curl, scripts
    // Reading is never refused.
    expect((await owner.get(`/api/branches/${f.a.id}`).set('Origin', 'https://evil.example')).status).toBe(200);
  });

  it('exempts only the listed machine-to-machine routes (a controller’s signed alarm) and compares origins by host', async () => {
    expect(MACHINE_ROUTES.map((r) => `${r.method} ${r.path}`)).toEqual(['POST /api/ingest/alarms/:sourceId']);
    // From another site, the alarm ingest is not refused as cross-origin (its signature decides: 401 here).
    const ingest = await request(t.app)
      .post('/api/ingest/alarms/5b0e5c2e-0000-4000-8000-000000000000')
      .set('Origin', 'https://controls.example')
      .send({});
    expect(ingest.status).not.toBe(403);
    expect(ingest.body.error?.code).not.toBe('cross_origin');
    // A look-alike path is not exempt.
    const lookalike = await owner.post('/api/ingest/alarms-export').set('Origin', 'https://evil.example').send({});
    expect(lookalike.body.error?.code).toBe('cross_origin');
    expect(crossOriginProblem({ origin: 'http://a.test:3000', host: 'a.test:3000' }, 'http://b.test')).toBeNull();
    expect(crossOriginProblem({ origin: 'http://a.test:3001', host: 'a.test:3000' }, 'http://b.test')).toMatch(/another site/);
  });
});

describe('Cache-Control', () => {
  it('signed-in JSON answers carry no-store; public ones are left alone', async () => {
    expect((await owner.get('/api/auth/me')).headers['cache-control']).toBe('no-store');
    expect((await owner.get('/api/branches')).headers['cache-control']).toBe('no-store');
    expect((await request(t.app).get('/api/config')).headers['cache-control']).toBeUndefined();
  });
});
