import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Clock } from '../../lib/clock';
import { createTestApp, type TestApp } from '../../testing/harness';
import { makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';

/** A clock the test moves by hand. */
const clock: Clock & { at: Date; advance(seconds: number): void } = {
  at: new Date('2026-12-02T15:00:00Z'),
  now() {
    return new Date(this.at);
  },
  advance(seconds) {
    this.at = new Date(this.at.getTime() + seconds * 1000);
  },
};

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;

beforeAll(async () => {
  // 3 per address and account, 5 per account, 6 per address, within 15 minutes.
  t = await createTestApp({ clock, signInLimit: 3, signInLimits: { perAccount: 5, perAddress: 6 } });
  f = await makeTwoBranches(t.ctx.db);
});
afterAll(() => t.close());

/** A sign-in from an address (the app trusts X-Forwarded-For from loopback, as behind a local proxy). */
const signIn = (email: string, password: string, ip: string) =>
  request(t.app).post('/api/auth/sign-in').set('X-Forwarded-For', ip).send({ email, password });

describe('sign-in limits', () => {
  it('limits one account across addresses, says when to try again, and lets it in once that time has passed', async () => {
    const email = f.inA.dispatcher.email;
    const codes: number[] = [];
    for (let i = 0; i < 5; i++) {
      codes.push((await signIn(email, 'wrong-password', `203.0.113.${10 + i}`)).status);
      clock.advance(60);
    }
    expect(codes).toEqual([401, 401, 401, 401, 401]);
    // Now at +5 min: the 6th, from yet another address and with the right password, is refused.
    const refused = await signIn(email, TEST_PASSWORD, '203.0.113.99');
    expect(refused.status).toBe(429);
    expect(refused.body.error.code).toBe('too_many_attempts');
    // The first failure (at +0) leaves the 15-minute window at +15 min: 10 minutes from now.
    expect(refused.headers['retry-after']).toBe('600');
    expect(refused.body.error.details).toEqual({ retryAfterSeconds: 600, scope: 'account' });
    expect(refused.body.error.message).toBe('Too many failed sign-in attempts for this account. Try again in 10 minutes.');
    // Other accounts are not affected.
    expect((await signIn(f.inA.manager.email, TEST_PASSWORD, '203.0.113.99')).status).toBe(200);

    clock.advance(599);
    expect((await signIn(email, TEST_PASSWORD, '203.0.113.99')).headers['retry-after']).toBe('1');
    clock.advance(1);
    expect((await signIn(email, TEST_PASSWORD, '203.0.113.99')).status).toBe(200);
  });

  it('limits one address across accounts (password spraying), whether or not the accounts exist', async () => {
    clock.advance(3600);
    const ip = '198.51.100.7';
    const emails = [
      f.inA.technician.email,
      f.inB.technician.email,
      'nobody-1@test.example',
      'nobody-2@test.example',
      f.inB.manager.email,
      'nobody-3@test.example',
    ];
    for (const email of emails) expect((await signIn(email, 'Summer2026!', ip)).status).toBe(401);
    const refused = await signIn(f.owner.email, TEST_PASSWORD, ip);
    expect(refused.status).toBe(429);
    expect(refused.body.error.details.scope).toBe('address');
    expect(Number(refused.headers['retry-after'])).toBe(900);
    expect(refused.body.error.message).toBe('Too many failed sign-in attempts from this address. Try again in 15 minutes.');
    // The owner can still sign in from elsewhere.
    expect((await signIn(f.owner.email, TEST_PASSWORD, '198.51.100.8')).status).toBe(200);
  });

  it('limits one address on one account first, and a right password clears that count', async () => {
    clock.advance(3600);
    const email = f.inB.dispatcher.email;
    const ip = '192.0.2.44';
    expect((await signIn(email, 'wrong-password', ip)).status).toBe(401);
    expect((await signIn(email, 'wrong-password', ip)).status).toBe(401);
    expect((await signIn(email, TEST_PASSWORD, ip)).status).toBe(200);
    for (let i = 0; i < 3; i++) expect((await signIn(email, 'wrong-password', ip)).status).toBe(401);
    const refused = await signIn(email, TEST_PASSWORD, ip);
    expect(refused.status).toBe(429);
    expect(refused.body.error.details.scope).toBe('address_and_account');
    expect(refused.body.error.message).toContain('for this account from this address');
  });
});
