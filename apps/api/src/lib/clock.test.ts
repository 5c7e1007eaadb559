import { describe, expect, it } from 'vitest';
import { shiftedClock } from './clock';
import { clockFromEnv, readEnv } from './config';

describe('COILPATH_NOW', () => {
  it('starts the clock at the given instant and lets it run on with real time', () => {
    let real = Date.UTC(2026, 11, 4, 17, 0);
    const clock = shiftedClock('2027-03-15T06:00:00-05:00', () => real);
    expect(clock.now().toISOString()).toBe('2027-03-15T11:00:00.000Z');
    real += 90_000;
    expect(clock.now().toISOString()).toBe('2027-03-15T11:01:30.000Z');
  });

  it('is ignored unless set (an empty value counts as unset)', () => {
    expect(clockFromEnv(readEnv({})).overridden).toBe(false);
    expect(clockFromEnv(readEnv({ COILPATH_NOW: '' })).overridden).toBe(false);
    const set = clockFromEnv(readEnv({ COILPATH_NOW: '2027-12-31T16:30:00-06:00' }));
    expect(set.overridden).toBe(true);
    // The clock started at that instant a moment ago: within a minute of it, never before it.
    const ms = set.clock.now().getTime() - Date.parse('2027-12-31T22:30:00Z');
    expect(ms).toBeGreaterThanOrEqual(0);
    expect(ms).toBeLessThan(60_000);
  });

  it('refuses a value that is not an instant with an offset, naming the variable', () => {
    expect(() => readEnv({ COILPATH_NOW: '2027-03-15' })).toThrow(/COILPATH_NOW/);
    expect(() => readEnv({ COILPATH_NOW: '2027-03-15T06:00:00' })).toThrow(/COILPATH_NOW/);
  });
});

describe('the API says its clock only when it is overridden', async () => {
  const { createTestApp } = await import('../testing/harness');
  const request = (await import('supertest')).default;
  it('adds X-Coilpath-Now to every API answer when COILPATH_NOW set the clock', async () => {
    const t = await createTestApp({ now: '2027-03-15T11:00:00Z' });
    try {
      const plain = await request(t.app).get('/api/config');
      expect(plain.headers['x-coilpath-now']).toBeUndefined();
      t.ctx.config.clockOverridden = true;
      const res = await request(t.app).get('/api/config');
      expect(res.headers['x-coilpath-now']).toBe('2027-03-15T11:00:00.000Z');
    } finally {
      await t.close();
    }
  });
});
