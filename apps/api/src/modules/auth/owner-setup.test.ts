import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { eq } from 'drizzle-orm';
import type { Clock } from '../../lib/clock';
import { createTestApp, type TestApp } from '../../testing/harness';
import { appMeta, auditEvents } from '../../db/schema';
import { issueOwnerSetup, SETUP_HOURS } from './owner-setup.service';

const clock: Clock & { at: Date } = {
  at: new Date('2026-12-02T15:00:00Z'),
  now() {
    return new Date(this.at);
  },
};

// A new database: migrated, nobody in it (the test app loads no demo data).
let t: TestApp;
beforeAll(async () => {
  t = await createTestApp({ clock });
});
afterAll(() => t.close());

const tokenOf = (link: string) => decodeURIComponent(new URL(link).searchParams.get('token')!);
const setup = (token: string, over: Record<string, string> = {}) =>
  request(t.app)
    .post('/api/setup')
    .send({
      token,
      name: 'Morgan Reyes',
      email: 'morgan@acme-hvac.test',
      password: 'Kettle-Orbit-Fjord-47',
      confirm: 'Kettle-Orbit-Fjord-47',
      ...over,
    });

describe('first-owner setup link (production start)', () => {
  it('shows no demo password on a production start, whatever the database holds', async () => {
    await t.ctx.db.insert(appMeta).values({ key: 'demo_seeded', value: { today: '2026-12-02' } });
    t.ctx.config.demoMode = false;
    expect((await request(t.app).get('/api/config')).body).toEqual({ demo: false, demoPassword: null });
    t.ctx.config.demoMode = true;
    expect((await request(t.app).get('/api/config')).body).toEqual({ demo: true, demoPassword: 'coilpath-demo' });
    t.ctx.config.demoMode = false;
    await t.ctx.db.delete(appMeta).where(eq(appMeta.key, 'demo_seeded'));
  });

  it('lets the first owner set name, e-mail and password once, with the newest link only', async () => {
    const first = await issueOwnerSetup(t.ctx);
    const link = await issueOwnerSetup(t.ctx); // a restart prints a new link; the older one stops working
    expect(link).toMatch(/^http:\/\/coilpath\.test\/setup\?token=/);
    expect(
      (
        await request(t.app)
          .post('/api/setup/check')
          .send({ token: tokenOf(first!) })
      ).body.error.code,
    ).toBe('link_invalid');
    const token = tokenOf(link!);
    expect((await request(t.app).post('/api/setup/check').send({ token })).body).toEqual({ ok: true });

    // The password rule holds here too.
    const weak = await setup(token, { password: 'password123', confirm: 'password123' });
    expect(weak.status).toBe(400);
    expect(weak.body.error.code).toBe('weak_password');

    const agent = request.agent(t.app);
    const res = await agent.post('/api/setup').send({
      token,
      name: 'Morgan Reyes',
      email: 'Morgan@Acme-HVAC.test',
      password: 'Kettle-Orbit-Fjord-47',
      confirm: 'Kettle-Orbit-Fjord-47',
    });
    expect(res.status).toBe(201);
    expect(res.body.user).toMatchObject({ name: 'Morgan Reyes', email: 'morgan@acme-hvac.test', role: 'owner', branchId: null });
    expect((await agent.get('/api/auth/me')).body.user.role).toBe('owner');
    const audited = await t.ctx.db.select().from(auditEvents).where(eq(auditEvents.action, 'owner.setup'));
    expect(audited).toHaveLength(1);

    // Once: the same link, and any later start, set up nobody else.
    const again = await setup(token, { email: 'other@acme-hvac.test' });
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe('setup_done');
    expect(await issueOwnerSetup(t.ctx)).toBeNull();
    expect(
      (await request(t.app).post('/api/auth/sign-in').send({ email: 'morgan@acme-hvac.test', password: 'Kettle-Orbit-Fjord-47' })).status,
    ).toBe(200);
  });

  it(`refuses a link older than ${SETUP_HOURS} hours`, async () => {
    const other = await createTestApp({ clock });
    try {
      const token = tokenOf((await issueOwnerSetup(other.ctx))!);
      clock.at = new Date(clock.at.getTime() + SETUP_HOURS * 3600_000);
      const res = await request(other.app).post('/api/setup/check').send({ token });
      expect(res.status).toBe(410);
      expect(res.body.error.code).toBe('link_expired');
    } finally {
      await other.close();
    }
  });
});
