import argon2 from 'argon2';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { currentHashOptions, hashOptions, hashPassword, testHashOptions, verifyPassword } from './password';

/** `argon2id$v=19$m=…,t=…,p=…` of an encoded argon2 hash: its kind and cost. */
const parameters = (encoded: string) => encoded.split('$').slice(1, 4).join('$');

afterEach(() => {
  vi.unstubAllEnvs();
  vi.restoreAllMocks();
});

describe('password hashing', () => {
  it('hashes at the production cost outside a test run: argon2id, 46 MiB, 2 passes, 1 lane', async () => {
    vi.stubEnv('COILPATH_PASSWORD_COST', undefined);
    expect(currentHashOptions()).toBe(hashOptions);
    const hash = await hashPassword('correct horse battery staple');
    expect(parameters(hash)).toBe('argon2id$v=19$m=47104,t=2,p=1');
    expect(await verifyPassword(hash, 'correct horse battery staple')).toBe(true);
    expect(await verifyPassword(hash, 'correct horse battery stapler')).toBe(false);
  });

  it('keeps the production cost when the test cost is asked for outside vitest', () => {
    vi.stubEnv('COILPATH_PASSWORD_COST', 'test');
    vi.stubEnv('VITEST', undefined);
    expect(currentHashOptions()).toBe(hashOptions);
  });

  it('hashes cheaply in a test run (vite.config.ts), and hashes of either cost verify', async () => {
    expect(process.env.COILPATH_PASSWORD_COST).toBe('test');
    expect(currentHashOptions()).toBe(testHashOptions);
    const cheap = await hashPassword('correct horse battery staple');
    expect(parameters(cheap)).toBe('argon2id$v=19$m=1024,t=1,p=1');
    const production = await argon2.hash('correct horse battery staple', hashOptions);
    for (const hash of [cheap, production]) {
      expect(await verifyPassword(hash, 'correct horse battery staple')).toBe(true);
      expect(await verifyPassword(hash, 'Correct horse battery staple')).toBe(false);
    }
    expect(await verifyPassword('not-a-hash', 'correct horse battery staple')).toBe(false);
  });

  it('checks an unknown user against a dummy hash at the current cost, and refuses', async () => {
    const verify = vi.spyOn(argon2, 'verify');
    for (const cost of ['test', undefined]) {
      vi.stubEnv('COILPATH_PASSWORD_COST', cost);
      verify.mockClear();
      expect(await verifyPassword(null, 'coilpath-no-such-user')).toBe(false);
      expect(verify).toHaveBeenCalledTimes(1);
      const o = currentHashOptions();
      expect(parameters(verify.mock.calls[0]![0])).toBe(`argon2id$v=19$m=${o.memoryCost},t=${o.timeCost},p=${o.parallelism}`);
    }
  });
});
