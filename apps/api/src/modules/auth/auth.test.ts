import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import argon2 from 'argon2';
import request from 'supertest';
import { SignJWT } from 'jose';
import { eq } from 'drizzle-orm';
import { signOutEverywhereAnswerSchema } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { endedSessions, users } from '../../db/schema';
import { signSession, SESSION_COOKIE } from '../../auth/session';

const NOW = new Date('2026-12-02T15:00:00Z');

/** `argon2id$v=19$m=…,t=…,p=…` of an encoded argon2 hash: its kind and cost. */
const argon2Parameters = (encoded: unknown) => String(encoded).split('$').slice(1, 4).join('$');

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;

beforeAll(async () => {
  t = await createTestApp({ now: NOW.toISOString() });
  f = await makeTwoBranches(t.ctx.db);
});
afterAll(() => t.close());

describe('sign-in', () => {
  it('signs in with the right password and sets an httpOnly SameSite=Lax cookie', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: f.inA.dispatcher.email, password: TEST_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user).toEqual({
      id: f.inA.dispatcher.id,
      name: f.inA.dispatcher.name,
      email: f.inA.dispatcher.email,
      role: 'dispatcher',
      branchId: f.a.id,
    });
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toContain(`${SESSION_COOKIE}=`);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i);
  });

  it('accepts the e-mail in any case', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: f.owner.email.toUpperCase(), password: TEST_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user.role).toBe('owner');
  });

  it('refuses a wrong password and an unknown e-mail with the same answer, after the same argon2 work', async () => {
    // What keeps the two answers equally slow: each runs exactly one argon2 verification, against a hash
    // of the same parameters (the unknown e-mail's is a dummy at the current cost). Checked directly, not
    // with a stopwatch, which the machine's load would decide.
    const verify = vi.spyOn(argon2, 'verify');
    const attempt = async (email: string) => {
      verify.mockClear();
      const res = await request(t.app).post('/api/auth/sign-in').send({ email, password: 'not-the-password' });
      expect(verify, email).toHaveBeenCalledTimes(1);
      return { res, params: argon2Parameters(verify.mock.calls[0]![0]) };
    };
    try {
      const wrong = await attempt(f.owner.email);
      const unknown = await attempt('nobody@test.example');
      expect(wrong.res.status).toBe(401);
      expect(unknown.res.status).toBe(401);
      // The same answer but for the request's own id.
      expect({ ...unknown.res.body.error, requestId: null }).toEqual({ ...wrong.res.body.error, requestId: null });
      expect(wrong.res.body.error.code).toBe('unauthorized');
      expect(wrong.params).toMatch(/^argon2id\$v=19\$m=\d+,t=\d+,p=\d+$/);
      expect(unknown.params).toBe(wrong.params);
    } finally {
      verify.mockRestore();
    }
  });

  it('refuses a deactivated user', async () => {
    const [u] = await t.ctx.db.select().from(users).where(eq(users.id, f.inB.technician.id));
    await t.ctx.db.update(users).set({ active: false }).where(eq(users.id, u!.id));
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: u!.email, password: TEST_PASSWORD });
    expect(res.status).toBe(401);
    await t.ctx.db.update(users).set({ active: true }).where(eq(users.id, u!.id));
  });

  it('answers a missing field with 400 naming it', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: f.owner.email });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid');
    expect(res.body.error.message).toContain('password');
    expect(res.body.error.details.fields[0].path).toBe('password');
  });

  it('rate-limits repeated sign-in attempts', async () => {
    const limited = await createTestApp({ signInLimit: 3 });
    try {
      const codes: number[] = [];
      for (let i = 0; i < 4; i++) {
        const r = await request(limited.app).post('/api/auth/sign-in').send({ email: 'x@test.example', password: 'wrong-password' });
        codes.push(r.status);
      }
      expect(codes).toEqual([401, 401, 401, 429]);
    } finally {
      await limited.close();
    }
  });
});

describe('sessions', () => {
  it('GET /api/auth/me answers the signed-in user, and 401 after sign-out', async () => {
    const agent = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
    const me = await agent.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.user.id).toBe(f.inA.technician.id);
    const out = await agent.post('/api/auth/sign-out');
    expect(out.status).toBe(204);
    expect((await agent.get('/api/auth/me')).status).toBe(401);
  });

  it('refuses a missing, tampered, expired or foreign-signed token with 401', async () => {
    expect((await request(t.app).get('/api/auth/me')).status).toBe(401);

    const good = await signSession(t.ctx.secret, { sub: f.owner.id, sv: 1 }, 12, NOW);
    const [h, p, s] = good.split('.');
    const payload = JSON.parse(Buffer.from(p!, 'base64url').toString());
    payload.sub = f.inA.manager.id;
    const tampered = `${h}.${Buffer.from(JSON.stringify(payload)).toString('base64url')}.${s}`;
    const expired = await signSession(t.ctx.secret, { sub: f.owner.id, sv: 1 }, 1, new Date(NOW.getTime() - 2 * 3600_000));
    const foreign = await new SignJWT({ sv: 1 })
      .setProtectedHeader({ alg: 'HS256' })
      .setSubject(f.owner.id)
      .setIssuer('coilpath')
      .setIssuedAt(NOW)
      .setExpirationTime(new Date(NOW.getTime() + 3600_000))
      .sign(new TextEncoder().encode('some-other-secret-some-other-secret!!'));

    for (const token of [tampered, expired, foreign, 'not-a-jwt']) {
      const res = await request(t.app).get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${token}`);
      expect(res.status, token.slice(0, 12)).toBe(401);
      expect(res.body.error.code).toBe('unauthorized');
    }
    const ok = await request(t.app).get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${good}`);
    expect(ok.status).toBe(200);
  });

  it('a raised session version signs every session out', async () => {
    const agent = await signedInAgent(t.app, f.inB.dispatcher.email, TEST_PASSWORD);
    expect((await agent.get('/api/auth/me')).status).toBe(200);
    await t.ctx.db.update(users).set({ sessionVersion: 2 }).where(eq(users.id, f.inB.dispatcher.id));
    expect((await agent.get('/api/auth/me')).status).toBe(401);
  });

  it('a changed role or a deactivation counts from the very next request', async () => {
    const agent = await signedInAgent(t.app, f.inB.manager.email, TEST_PASSWORD);
    expect((await agent.get('/api/auth/me')).body.user.role).toBe('branch_manager');
    await t.ctx.db.update(users).set({ role: 'dispatcher' }).where(eq(users.id, f.inB.manager.id));
    expect((await agent.get('/api/auth/me')).body.user.role).toBe('dispatcher');
    await t.ctx.db.update(users).set({ active: false }).where(eq(users.id, f.inB.manager.id));
    expect((await agent.get('/api/auth/me')).status).toBe(401);
    await t.ctx.db.update(users).set({ role: 'branch_manager', active: true }).where(eq(users.id, f.inB.manager.id));
  });
});

/** Signs in and returns the session cookie (`name=value`), as a browser would keep it. */
async function signInCookie(email: string): Promise<string> {
  const res = await request(t.app).post('/api/auth/sign-in').send({ email, password: TEST_PASSWORD });
  expect(res.status).toBe(200);
  return String(res.headers['set-cookie']).split(';')[0]!;
}
const me = (cookie: string) => request(t.app).get('/api/auth/me').set('Cookie', cookie);

describe('signing out ends sessions on the server', () => {
  it('sign-out refuses the old cookie at once (401), and only that session', async () => {
    const laptop = await signInCookie(f.inA.dispatcher.email);
    const phone = await signInCookie(f.inA.dispatcher.email);
    // Asked twice, so on the embedded database the user is answered from memory before the sign-out.
    expect((await me(laptop)).status).toBe(200);
    expect((await me(laptop)).status).toBe(200);

    const out = await request(t.app).post('/api/auth/sign-out').set('Cookie', laptop);
    expect(out.status).toBe(204);
    expect(String(out.headers['set-cookie'])).toMatch(/coilpath_session=;/);

    // Someone who kept a copy of the cookie (it was not just dropped by the browser) is refused.
    const again = await me(laptop);
    expect(again.status).toBe(401);
    expect(again.body.error.code).toBe('unauthorized');
    expect((await request(t.app).get('/api/branches').set('Cookie', laptop)).status).toBe(401);
    expect((await me(phone)).status, 'the same person on another device stays signed in').toBe(200);
  });

  it('a session ended in the database is refused from the next request, even while its user is remembered', async () => {
    const cookie = await signInCookie(f.inA.manager.email);
    expect((await me(cookie)).status).toBe(200);
    expect((await me(cookie)).status).toBe(200);
    const token = cookie.slice(cookie.indexOf('=') + 1);
    const claims = JSON.parse(Buffer.from(token.split('.')[1]!, 'base64url').toString()) as { sid: string; exp: number };
    // Written straight to the table, as another process would: no route of this app is involved.
    await t.ctx.db
      .insert(endedSessions)
      .values({ sessionId: claims.sid, userId: f.inA.manager.id, expiresAt: new Date(claims.exp * 1000), endedAt: new Date() });
    expect((await me(cookie)).status).toBe(401);
  });

  it('sign-out-everywhere ends every session of the person, this one included, and says so', async () => {
    const phone = await signInCookie(f.inB.technician.email);
    const laptop = await signInCookie(f.inB.technician.email);
    const other = await signInCookie(f.inB.dispatcher.email);
    for (const c of [phone, laptop, other]) expect((await me(c)).status).toBe(200);

    const res = await request(t.app).post('/api/auth/sign-out-everywhere').set('Cookie', laptop).send({});
    expect(res.status).toBe(200);
    const answer = signOutEverywhereAnswerSchema.parse(res.body);
    expect(answer.email).toBe(f.inB.technician.email);
    expect(Number.isNaN(Date.parse(answer.endedAt))).toBe(false);
    expect(String(res.headers['set-cookie'])).toMatch(/coilpath_session=;/);

    expect((await me(phone)).status).toBe(401);
    expect((await me(laptop)).status).toBe(401);
    expect((await me(other)).status, 'another person is not signed out').toBe(200);
    // Signing in again works, with a session that is valid.
    expect((await me(await signInCookie(f.inB.technician.email))).status).toBe(200);
    expect((await request(t.app).post('/api/auth/sign-out-everywhere').send({})).status).toBe(401);
  });

  it('signing out a token from before session ids ends it (with the person’s other sessions)', async () => {
    const [u] = await t.ctx.db.select().from(users).where(eq(users.id, f.inA.technician.id));
    const old = await new SignJWT({ sv: u!.sessionVersion })
      .setProtectedHeader({ alg: 'HS256' })
      .setSubject(u!.id)
      .setIssuer('coilpath')
      .setIssuedAt()
      .setExpirationTime('1h')
      .sign(t.ctx.secret);
    const cookie = `${SESSION_COOKIE}=${old}`;
    expect((await me(cookie)).status).toBe(200);
    expect((await request(t.app).post('/api/auth/sign-out').set('Cookie', cookie)).status).toBe(204);
    expect((await me(cookie)).status).toBe(401);
  });

  it('forgets ended sessions an hour after their token expired, at the next sign-out', async () => {
    const now = t.ctx.clock.now().getTime();
    await t.ctx.db.insert(endedSessions).values([
      { sessionId: 'long-expired', userId: f.owner.id, expiresAt: new Date(now - 2 * 3600_000), endedAt: new Date(now - 3 * 3600_000) },
      { sessionId: 'just-expired', userId: f.owner.id, expiresAt: new Date(now - 60_000), endedAt: new Date(now - 3600_000) },
    ]);
    const cookie = await signInCookie(f.owner.email);
    expect((await request(t.app).post('/api/auth/sign-out').set('Cookie', cookie)).status).toBe(204);
    const ids = (await t.ctx.db.select({ id: endedSessions.sessionId }).from(endedSessions)).map((r) => r.id);
    expect(ids).not.toContain('long-expired');
    expect(ids).toContain('just-expired');
  });
});

describe('roles, branches and errors', () => {
  it('a role that may not use a route gets 403', async () => {
    const agent = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
    const res = await agent.get('/api/outbox');
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    expect((await owner.get('/api/outbox')).status).toBe(200);
  });

  it('a branch user sees only their branch; the owner sees all', async () => {
    const mgr = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
    const mine = await mgr.get('/api/branches');
    expect(mine.body.branches.map((b: { id: string }) => b.id)).toEqual([f.a.id]);
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    const all = await owner.get('/api/branches');
    expect(all.body.branches.map((b: { id: string }) => b.id).sort()).toEqual([f.a.id, f.b.id].sort());
  });

  it('malformed JSON → 400, oversized body → 413, non-JSON body → 415, unknown route → 404', async () => {
    const bad = await request(t.app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"email": ');
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('malformed_json');

    const huge = await request(t.app)
      .post('/api/auth/sign-in')
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ email: 'a@b.example', password: 'x'.repeat(2 * 1024 * 1024) }));
    expect(huge.status).toBe(413);
    expect(huge.body.error.code).toBe('too_large');

    const form = await request(t.app).post('/api/auth/sign-in').type('form').send('email=a@b.example&password=x');
    expect(form.status).toBe(415);

    const unknown = await request(t.app).get('/api/no-such-thing');
    expect(unknown.status).toBe(404);
    expect(unknown.body).toEqual({
      error: { code: 'not_found', message: 'No such API route.', requestId: unknown.headers['x-request-id'] },
    });
  });

  it('health names the database', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ok: true, database: process.env.DATABASE_URL ? 'postgres' : 'pglite' });
  });

  it('sets helmet headers', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
  });
});
