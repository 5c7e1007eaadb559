import argon2 from 'argon2';

/**
 * argon2id with 46 MiB, 2 passes, 1 lane: twice the work of OWASP's 46 MiB / 1 pass minimum (Password
 * Storage Cheat Sheet). OWASP's 19 MiB / 2 passes took about 40 ms here, under the 50–250 ms target that keeps
 * a guess expensive yet sign-in cheap; `npm run bench` reports the hash time on the machine at hand. Hashes
 * carry their own parameters, so hashes made at the earlier cost still verify.
 */
export const hashOptions = { type: argon2.argon2id, memoryCost: 47_104, timeCost: 2, parallelism: 1 } as const;

/**
 * The cost in test runs: argon2id at 1 MiB and 1 pass, a millisecond instead of a good part of a second
 * per hash. Chosen by `COILPATH_PASSWORD_COST=test`, which the vitest projects set (vite.config.ts); it is
 * honoured only inside vitest (`VITEST`), so a stray variable cannot weaken a real server. The hashes
 * carry these parameters, so they verify like any other; `password.test.ts` checks the production cost.
 */
export const testHashOptions = { type: argon2.argon2id, memoryCost: 1024, timeCost: 1, parallelism: 1 } as const;

/** The cost new hashes are made at: `hashOptions`, or `testHashOptions` in a test run. */
export function currentHashOptions(): typeof hashOptions | typeof testHashOptions {
  return process.env.COILPATH_PASSWORD_COST === 'test' && process.env.VITEST ? testHashOptions : hashOptions;
}

export function hashPassword(password: string): Promise<string> {
  return argon2.hash(password, currentHashOptions());
}

const dummyHashes = new Map<object, Promise<string>>();

/**
 * Verifies a password. With no stored hash (unknown e-mail), it still verifies against a dummy hash made
 * at the current cost, so the answer takes about as long as for a wrong password.
 */
export async function verifyPassword(hash: string | null | undefined, password: string): Promise<boolean> {
  if (!hash) {
    const options = currentHashOptions();
    let dummy = dummyHashes.get(options);
    if (!dummy) dummyHashes.set(options, (dummy = argon2.hash('coilpath-no-such-user', options)));
    await argon2.verify(await dummy, password).catch(() => false);
    return false;
  }
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false;
  }
}
