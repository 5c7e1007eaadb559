import argon2 from 'argon2';

/**
 * argon2id at OWASP's recommended minimum (19 MiB, 2 passes, 1 lane). `npm run bench` reports the
 * hash time on this machine; the target is 50–250 ms per hash.
 */
export const hashOptions = { type: argon2.argon2id, memoryCost: 19_456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
  return argon2.hash(password, hashOptions);
}

let dummyHash: Promise<string> | undefined;

/**
 * Verifies a password. With no stored hash (unknown e-mail), it still verifies against a dummy hash so
 * the answer takes about as long as for a wrong password.
 */
export async function verifyPassword(hash: string | null | undefined, password: string): Promise<boolean> {
  if (!hash) {
    dummyHash ??= argon2.hash('coilpath-no-such-user', hashOptions);
    await argon2.verify(await dummyHash, password).catch(() => false);
    return false;
  }
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false;
  }
}
