import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

/** The session-signing secret: from the environment, else generated once and kept in the data directory. */
export function loadSecret(fromEnv: string | undefined, dataDir: string): Uint8Array {
  if (fromEnv) return new TextEncoder().encode(fromEnv);
  mkdirSync(dataDir, { recursive: true });
  const file = join(dataDir, 'session-secret');
  if (!existsSync(file)) writeFileSync(file, randomBytes(48).toString('base64url'), { mode: 0o600, flag: 'wx' });
  return new TextEncoder().encode(readFileSync(file, 'utf8').trim());
}
