/**
 * The alarm sources' credentials: a random secret per source, kept encrypted at rest, and the request
 * signature `sha256=<hex>` = HMAC-SHA256(secret, `<timestamp>.<raw body>`) compared in constant time.
 *
 * HMAC needs the secret itself (a hash of it would not do), so the database holds it sealed with
 * AES-256-GCM under a key derived (HKDF-SHA256) from the server's secret (`ctx.secret`, the
 * `session-secret` file or `COILPATH_SECRET`): a copy of the database alone does not reveal a source's
 * secret. Changing the server's secret makes the stored ones unreadable — every source then needs a
 * rotation (`POST /api/alarm-sources/:id/rotate`).
 */
import { createCipheriv, createDecipheriv, createHmac, hkdfSync, randomBytes, timingSafeEqual } from 'node:crypto';

const INFO = 'coilpath alarm-source secrets v1';

function boxKey(serverSecret: Uint8Array): Buffer {
  return Buffer.from(hkdfSync('sha256', serverSecret, Buffer.alloc(0), INFO, 32));
}

/** A new source secret: 32 random bytes as base64url (43 characters, safe to paste into a shell). */
export function newSourceSecret(): string {
  return randomBytes(32).toString('base64url');
}

/** Seals a source secret for the database: `v1.<iv>.<tag>.<ciphertext>` (base64url). */
export function sealSecret(serverSecret: Uint8Array, secret: string): string {
  const iv = randomBytes(12);
  const cipher = createCipheriv('aes-256-gcm', boxKey(serverSecret), iv);
  const ct = Buffer.concat([cipher.update(secret, 'utf8'), cipher.final()]);
  return ['v1', iv.toString('base64url'), cipher.getAuthTag().toString('base64url'), ct.toString('base64url')].join('.');
}

/** Opens a sealed secret; null when it cannot be read (another server secret, damaged). */
export function openSecret(serverSecret: Uint8Array, box: string): string | null {
  const [v, iv, tag, ct] = box.split('.');
  if (v !== 'v1' || !iv || !tag || ct === undefined) return null;
  try {
    const d = createDecipheriv('aes-256-gcm', boxKey(serverSecret), Buffer.from(iv, 'base64url'));
    d.setAuthTag(Buffer.from(tag, 'base64url'));
    return Buffer.concat([d.update(Buffer.from(ct, 'base64url')), d.final()]).toString('utf8');
  } catch {
    return null;
  }
}

/** HMAC-SHA256 with the secret (its UTF-8 bytes, as `openssl dgst -sha256 -hmac "$SECRET"` uses it) over `<timestamp>.<raw body>`. */
export function signatureOf(secret: string, timestamp: string, rawBody: Buffer): Buffer {
  return createHmac('sha256', Buffer.from(secret, 'utf8')).update(`${timestamp}.`, 'utf8').update(rawBody).digest();
}

/** The header value a controller sends: `sha256=<lower-case hex>`. */
export function signatureHeader(secret: string, timestamp: string, rawBody: Buffer): string {
  return `sha256=${signatureOf(secret, timestamp, rawBody).toString('hex')}`;
}

const HEADER = /^sha256=([0-9a-fA-F]{64})$/;

/** The 32 bytes a `sha256=<hex>` header carries, or null when it is not one. */
export function readSignatureHeader(value: string | undefined): Buffer | null {
  const m = HEADER.exec(value?.trim() ?? '');
  return m ? Buffer.from(m[1]!, 'hex') : null;
}

/** Whether `given` is the signature of the body under any of `secrets` (each compared in constant time). */
export function signatureMatches(secrets: string[], timestamp: string, rawBody: Buffer, given: Buffer): boolean {
  let ok = false;
  for (const s of secrets) {
    const expected = signatureOf(s, timestamp, rawBody);
    // Every secret is compared, so the time taken does not say which one matched.
    if (expected.length === given.length && timingSafeEqual(expected, given)) ok = true;
  }
  return ok;
}
