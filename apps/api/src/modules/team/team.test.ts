import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { eq } from 'drizzle-orm';
import type { Clock } from '../../lib/clock';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeTwoBranches, makeUser, TEST_PASSWORD, weekdayHours } from '../../testing/fixtures';
import { branches, users } from '../../db/schema';
import { signLinkToken } from '../../auth/link-tokens';

/** A clock the test can move (expiry of links). */
const clock: Clock & { at: Date; advance(hours: number): void } = {
  at: new Date('2026-12-02T15:00:00Z'),
  now() {
    return new Date(this.at);
  },
  advance(hours) {
    this.at = new Date(this.at.getTime() + hours * 3600_000);
  },
};

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let owner: Agent;
let managerA: Agent;
let dispatcherA: Agent;
let technicianA: Agent;

beforeAll(async () => {
  t = await createTestApp({ clock });
  f = await makeTwoBranches(t.ctx.db);
  owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
  managerA = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
  dispatcherA = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
  technicianA = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
});
afterAll(() => t.close());

/** The link in the last e-mail sent to an address. */
function linkIn(to: string): string {
  const m = [...t.mailer.sent].reverse().find((x) => x.to === to);
  if (!m) throw new Error(`no mail to ${to}`);
  const link = /https?:\/\/\S+/.exec(m.text)?.[0];
  if (!link) throw new Error('no link in the mail');
  return link;
}
const tokenOf = (link: string) => new URL(link).searchParams.get('token')!;

const branchBody = {
  name: 'Denver',
  code: 'den',
  timeZone: 'America/Denver',
  baseAddress: '1 Depot Way, Denver',
  baseLat: 39.74,
  baseLon: -104.99,
  holidays: ['2026-12-25', '2026-12-24', '2026-12-25'],
  labourRate: 96.5,
  sensorTolerancePercent: 3,
  sensorToleranceAbsolute: 5,
  repeatAlarmCount: 3,
  repeatAlarmDays: 14,
  callbackWindowDays: 30,
};

const techProfile = (branchId: string) => ({
  name: 'Robin Field',
  role: 'technician',
  branchId,
  skills: ['Rooftop units', 'brazing'],
  epa608Type: 'universal',
  epa608Number: 'EPA-608-123456',
  workingHours: weekdayHours,
  startAddress: '12 Home St',
  startLat: 39.7,
  startLon: -105.0,
});

describe('branches', () => {
  it('the owner adds a branch with its own IANA time zone and thresholds; others get 403', async () => {
    for (const a of [managerA, dispatcherA, technicianA]) {
      const res = await a.post('/api/branches').send(branchBody);
      expect(res.status).toBe(403);
    }
    const bad = await owner.post('/api/branches').send({ ...branchBody, timeZone: 'Mountain Time' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.fields[0].path).toBe('timeZone');

    const res = await owner.post('/api/branches').send(branchBody);
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({
      name: 'Denver',
      code: 'DEN',
      timeZone: 'America/Denver',
      holidays: ['2026-12-24', '2026-12-25'],
      labourRate: 96.5,
      repeatAlarmCount: 3,
      repeatAlarmDays: 14,
    });
    const [row] = await t.ctx.db.select().from(branches).where(eq(branches.id, res.body.id));
    expect(row!.labourRateCents).toBe(9650);

    const list = await owner.get('/api/branches');
    expect(list.body.branches.map((b: { name: string }) => b.name)).toContain('Denver');

    const dup = await owner.post('/api/branches').send({ ...branchBody, name: 'Denver 2' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.code).toBe('code_taken');
  });

  it('PATCH changes only the fields sent', async () => {
    // Fields with a schema default (holidays, currency, units, elevation) must not fall back to it on a partial PATCH.
    const set = await owner
      .patch(`/api/branches/${f.a.id}`)
      .send({ holidays: ['2026-12-25'], currency: 'CAD', unitSystem: 'si', elevationMeters: 1609 });
    expect(set.status).toBe(200);
    const res = await owner.patch(`/api/branches/${f.a.id}`).send({ callbackWindowDays: 45 });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ callbackWindowDays: 45, timeZone: 'America/Chicago', name: 'Alpha' });
    expect(res.body).toMatchObject({ holidays: ['2026-12-25'], currency: 'CAD', unitSystem: 'si', elevationMeters: 1609 });
    expect((await managerA.patch(`/api/branches/${f.a.id}`).send({ callbackWindowDays: 1 })).status).toBe(403);
    // A manager reads their own branch's settings, not another's.
    expect((await managerA.get(`/api/branches/${f.a.id}`)).status).toBe(200);
    expect((await managerA.get(`/api/branches/${f.b.id}`)).status).toBe(404);
  });
});

describe('people', () => {
  it('managers and dispatchers read their own branch; technicians get 403; writes are owner-only', async () => {
    const mine = await dispatcherA.get('/api/users').query({ role: 'technician' });
    expect(mine.status).toBe(200);
    expect(mine.body.rows.map((u: { id: string }) => u.id)).toEqual([f.inA.technician.id]);
    expect(mine.body.rows[0]).toMatchObject({ workingHours: weekdayHours, epa608Type: 'universal', colorIndex: 0 });
    expect(mine.body.rows[0].passwordHash).toBeUndefined();
    expect((await dispatcherA.get('/api/users').query({ branchId: f.b.id })).status).toBe(404);
    expect((await dispatcherA.get(`/api/users/${f.inB.technician.id}`)).status).toBe(404);
    expect((await technicianA.get('/api/users')).status).toBe(403);
    expect((await managerA.patch(`/api/users/${f.inA.technician.id}`).send(techProfile(f.a.id))).status).toBe(403);
    expect((await managerA.post(`/api/users/${f.inA.technician.id}/deactivate`)).status).toBe(403);
    expect((await managerA.post('/api/invitations').send({ email: 'x@test.example', profile: techProfile(f.a.id) })).status).toBe(403);
    expect((await managerA.get('/api/invitations')).status).toBe(403);
  });

  it('deactivation signs the person out of every session and keeps the record', async () => {
    const victim = await makeUser(t.ctx.db, 'dispatcher', f.b.id);
    const session = await signedInAgent(t.app, victim.email, TEST_PASSWORD);
    expect((await session.get('/api/auth/me')).status).toBe(200);
    const res = await owner.post(`/api/users/${victim.id}/deactivate`);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ active: false, deactivatedAt: clock.now().toISOString() });
    expect((await session.get('/api/auth/me')).status).toBe(401);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: victim.email, password: TEST_PASSWORD })).status).toBe(401);
    const [row] = await t.ctx.db.select().from(users).where(eq(users.id, victim.id));
    expect(row).toBeDefined();
    expect((await owner.post(`/api/users/${victim.id}/reactivate`)).body.active).toBe(true);
  });

  it('nobody can remove the last owner (demote or deactivate)', async () => {
    const demote = await owner.patch(`/api/users/${f.owner.id}`).send({ name: f.owner.name, role: 'branch_manager', branchId: f.a.id });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe('last_owner');
    const second = await makeUser(t.ctx.db, 'owner', null);
    const ownerTwo = await signedInAgent(t.app, second.email, TEST_PASSWORD);
    // With two owners, one may deactivate the other, but then the remaining one is the last.
    const off = await ownerTwo.post(`/api/users/${f.owner.id}/deactivate`);
    expect(off.status).toBe(200);
    const self = await ownerTwo.post(`/api/users/${second.id}/deactivate`);
    expect(self.status).toBe(403);
    const [o] = await t.ctx.db.select().from(users).where(eq(users.id, second.id));
    expect(o!.active).toBe(true);
    expect((await ownerTwo.post(`/api/users/${f.owner.id}/reactivate`)).status).toBe(200);
    owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
  });

  it('an owner has no branch; other roles need one', async () => {
    const res = await owner.patch(`/api/users/${f.inA.manager.id}`).send({ name: 'M', role: 'branch_manager', branchId: null });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields.map((x: { path: string }) => x.path)).toContain('branchId');
  });
});

describe('invitations', () => {
  it('invites a technician who signs up from the e-mailed link, gets the least-used colour and a session', async () => {
    const den = await owner.post('/api/branches').send({ ...branchBody, name: 'Boulder', code: 'BLD', timeZone: 'America/Denver' });
    expect(den.status).toBe(201);
    // One technician already in the branch holds colour 0.
    await makeUser(t.ctx.db, 'technician', den.body.id, { colorIndex: 0 });

    const inv = await owner.post('/api/invitations').send({ email: 'Robin.Field@test.example', profile: techProfile(den.body.id) });
    expect(inv.status).toBe(201);
    expect(inv.body).toMatchObject({ email: 'robin.field@test.example', role: 'technician', status: 'pending', branchName: 'Boulder' });
    expect(new Date(inv.body.expiresAt).getTime() - clock.now().getTime()).toBe(72 * 3600_000);

    const mail = t.mailer.sent.at(-1)!;
    expect(mail.to).toBe('robin.field@test.example');
    expect(mail.subject).toContain('invited you to Coilpath');
    const link = linkIn('robin.field@test.example');
    expect(link.startsWith('http://coilpath.test/accept-invitation?token=')).toBe(true);
    const token = tokenOf(link);

    const preview = await request(t.app).post('/api/invitations/check').send({ token });
    expect(preview.status).toBe(200);
    expect(preview.body.invitation).toMatchObject({ email: 'robin.field@test.example', branchName: 'Boulder', role: 'technician' });

    const agent = request.agent(t.app);
    // The password rule (auth/password-rules.ts): not one containing the name, not a common one.
    const withName = await agent
      .post('/api/invitations/accept')
      .send({ token, name: 'Robin Field', password: 'robin-field-2026', confirm: 'robin-field-2026' });
    expect(withName.status).toBe(400);
    expect(withName.body.error.code).toBe('weak_password');
    expect(withName.body.error.message).toContain('"robin');
    expect(withName.body.error.details.fields[0].path).toBe('password');
    const common = await agent
      .post('/api/invitations/accept')
      .send({ token, name: 'Robin Field', password: 'password123', confirm: 'password123' });
    expect(common.body.error.code).toBe('weak_password');
    expect(common.body.error.message).toContain('commonly used password');
    const accepted = await agent
      .post('/api/invitations/accept')
      .send({ token, name: 'Robin Field', password: 'a-long-password-1', confirm: 'a-long-password-1' });
    expect(accepted.status).toBe(201);
    expect(accepted.body.user).toMatchObject({ email: 'robin.field@test.example', role: 'technician', branchId: den.body.id });
    expect((await agent.get('/api/auth/me')).body.user.email).toBe('robin.field@test.example');

    const [u] = await t.ctx.db.select().from(users).where(eq(users.email, 'robin.field@test.example'));
    expect(u).toMatchObject({
      epa608Type: 'universal',
      epa608Number: 'EPA-608-123456',
      skills: ['rooftop units', 'brazing'],
      colorIndex: 1,
      startLat: 39.7,
    });
    expect(u!.workingHours).toEqual(weekdayHours);

    // Reuse of the same link is refused with a clear message; the new person signs in normally.
    const reuse = await request(t.app)
      .post('/api/invitations/accept')
      .send({ token, name: 'Someone', password: 'another-password-2', confirm: 'another-password-2' });
    expect(reuse.status).toBe(410);
    expect(reuse.body.error.code).toBe('link_used');
    expect(reuse.body.error.message).toContain('already been used');
    expect(
      (await request(t.app).post('/api/auth/sign-in').send({ email: 'robin.field@test.example', password: 'a-long-password-1' })).status,
    ).toBe(200);

    // The Roster's source lists the new technician for the branch's dispatcher.
    const list = await owner.get('/api/users').query({ branchId: den.body.id, role: 'technician' });
    expect(list.body.rows.map((r: { email: string }) => r.email)).toContain('robin.field@test.example');
    // Inviting an address that has an account is refused.
    const again = await owner.post('/api/invitations').send({ email: 'robin.field@test.example', profile: techProfile(den.body.id) });
    expect(again.status).toBe(409);
  });

  it('refuses an expired, a tampered and a withdrawn invitation link', async () => {
    await owner.post('/api/invitations').send({ email: 'late@test.example', profile: { ...techProfile(f.a.id), name: 'Late Lee' } });
    const token = tokenOf(linkIn('late@test.example'));

    const tampered = token.slice(0, 5) + (token[5] === 'A' ? 'B' : 'A') + token.slice(6);
    const t1 = await request(t.app)
      .post('/api/invitations/accept')
      .send({ token: tampered, name: 'X', password: 'a-long-password-1', confirm: 'a-long-password-1' });
    expect(t1.status).toBe(400);
    expect(t1.body.error.code).toBe('link_invalid');
    const unsigned = token.split('.')[0]!;
    expect((await request(t.app).post('/api/invitations/check').send({ token: unsigned })).body.error.code).toBe('link_invalid');

    clock.advance(72.01);
    // Sessions last 12 hours: the owner signs in again three days later.
    const ownerLater = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    try {
      const expired = await request(t.app)
        .post('/api/invitations/accept')
        .send({ token, name: 'Late Lee', password: 'a-long-password-1', confirm: 'a-long-password-1' });
      expect(expired.status).toBe(410);
      expect(expired.body.error.code).toBe('link_expired');
      expect(expired.body.error.message).toContain('expired');
      expect(await t.ctx.db.select().from(users).where(eq(users.email, 'late@test.example'))).toHaveLength(0);
      const listed = await ownerLater.get('/api/invitations');
      expect(listed.body.invitations.find((i: { email: string }) => i.email === 'late@test.example').status).toBe('expired');

      // Resending issues a fresh link; the old one stops working.
      const id = listed.body.invitations.find((i: { email: string }) => i.email === 'late@test.example').id;
      expect((await ownerLater.post(`/api/invitations/${id}/resend`)).body.status).toBe('pending');
      const fresh = tokenOf(linkIn('late@test.example'));
      expect(fresh).not.toBe(token);
      expect((await request(t.app).post('/api/invitations/check').send({ token })).body.error.code).toBe('link_invalid');
      // Withdrawn: refused.
      expect((await ownerLater.delete(`/api/invitations/${id}`)).body.status).toBe('revoked');
      expect((await request(t.app).post('/api/invitations/check').send({ token: fresh })).body.error.code).toBe('link_revoked');
    } finally {
      clock.advance(-72.01);
    }
  });
});

describe('password reset', () => {
  it('answers the same whether or not the address exists, and mails only real accounts', async () => {
    const before = t.mailer.sent.length;
    const known = await request(t.app).post('/api/auth/forgot-password').send({ email: f.inB.manager.email });
    await t.ctx.jobs.idle();
    const unknown = await request(t.app).post('/api/auth/forgot-password').send({ email: 'nobody@test.example' });
    await t.ctx.jobs.idle();
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(known.body);
    expect(t.mailer.sent.length).toBe(before + 1);
    expect(t.mailer.sent.at(-1)!.to).toBe(f.inB.manager.email);
    expect(linkIn(f.inB.manager.email).startsWith('http://coilpath.test/reset-password?token=')).toBe(true);
  });

  it('resets once, signs out other sessions, keeps the resetting browser signed in, and refuses reuse', async () => {
    const person = await makeUser(t.ctx.db, 'branch_manager', f.b.id);
    const otherDevice = await signedInAgent(t.app, person.email, TEST_PASSWORD);
    await request(t.app).post('/api/auth/forgot-password').send({ email: person.email });
    await t.ctx.jobs.idle();
    const token = tokenOf(linkIn(person.email));

    const check = await request(t.app).post('/api/auth/reset-password/check').send({ token });
    expect(check.body).toEqual({ email: person.email });

    const mismatch = await request(t.app)
      .post('/api/auth/reset-password')
      .send({ token, password: 'new-password-123', confirm: 'different-456' });
    expect(mismatch.status).toBe(400);

    // Common passwords are refused, with the reason, and the link stays usable.
    for (const weak of ['password123', 'qwerty2024']) {
      const refused = await request(t.app).post('/api/auth/reset-password').send({ token, password: weak, confirm: weak });
      expect(refused.status, weak).toBe(400);
      expect(refused.body.error.code).toBe('weak_password');
      expect(refused.body.error.message).toMatch(/too easy to guess\. This is (similar to )?a commonly used password\./);
    }
    const browser = request.agent(t.app);
    const res = await browser.post('/api/auth/reset-password').send({ token, password: 'new-password-123', confirm: 'new-password-123' });
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe(person.email);
    expect((await browser.get('/api/auth/me')).status).toBe(200);
    expect((await otherDevice.get('/api/auth/me')).status).toBe(401);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: person.email, password: TEST_PASSWORD })).status).toBe(401);
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: person.email, password: 'new-password-123' })).status).toBe(200);

    const reuse = await request(t.app)
      .post('/api/auth/reset-password')
      .send({ token, password: 'third-password-789', confirm: 'third-password-789' });
    expect(reuse.status).toBe(410);
    expect(reuse.body.error.code).toBe('link_used');
  });

  it('refuses an expired or tampered reset link, and an older link once a newer one was sent', async () => {
    const person = await makeUser(t.ctx.db, 'dispatcher', f.a.id);
    await request(t.app).post('/api/auth/forgot-password').send({ email: person.email });
    await t.ctx.jobs.idle();
    const first = tokenOf(linkIn(person.email));
    await request(t.app).post('/api/auth/forgot-password').send({ email: person.email });
    await t.ctx.jobs.idle();
    const second = tokenOf(linkIn(person.email));
    expect((await request(t.app).post('/api/auth/reset-password/check').send({ token: first })).body.error.code).toBe('link_used');

    const [raw, sig] = second.split('.');
    const forged = `${raw}.${Buffer.from('forged-signature-forged-signature').toString('base64url')}`;
    const bad = await request(t.app)
      .post('/api/auth/reset-password')
      .send({ token: forged, password: 'new-password-123', confirm: 'new-password-123' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('link_invalid');
    // The same token signed for another purpose (an invitation) does not open a reset.
    expect(sig).toBeTruthy();
    const crossPurpose = signLinkToken(t.ctx.secret, 'invitation', raw!);
    expect((await request(t.app).post('/api/auth/reset-password/check').send({ token: crossPurpose })).body.error.code).toBe(
      'link_invalid',
    );

    clock.advance(1.01);
    try {
      const expired = await request(t.app)
        .post('/api/auth/reset-password')
        .send({ token: second, password: 'new-password-123', confirm: 'new-password-123' });
      expect(expired.status).toBe(410);
      expect(expired.body.error.code).toBe('link_expired');
    } finally {
      clock.advance(-1.01);
    }
    expect((await request(t.app).post('/api/auth/sign-in').send({ email: person.email, password: TEST_PASSWORD })).status).toBe(200);
  });

  it('rate-limits forgot-password', async () => {
    const limited = await createTestApp({ signInLimit: 2 });
    try {
      const codes: number[] = [];
      for (let i = 0; i < 3; i++)
        codes.push((await request(limited.app).post('/api/auth/forgot-password').send({ email: 'x@test.example' })).status);
      expect(codes).toEqual([202, 202, 429]);
    } finally {
      await limited.close();
    }
  });
});
