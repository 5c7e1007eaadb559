import { createHash, createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import { HttpError } from '../lib/errors';

export type LinkPurpose = 'invitation' | 'password-reset' | 'owner-setup';

/** A single-use link token: the link carries the token, the database only its SHA-256. */
export function newLinkToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashLinkToken(token) };
}

export function hashLinkToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

/**
 * Signs a link token for one purpose (HMAC-SHA-256 with the app secret), so a tampered or
 * foreign link is refused before any database lookup. The link carries `<token>.<signature>`.
 */
export function signLinkToken(secret: Uint8Array, purpose: LinkPurpose, token: string): string {
  return `${token}.${linkSignature(secret, purpose, token)}`;
}

/** The token inside a signed link, or `null` when the signature does not match. */
export function verifyLinkToken(secret: Uint8Array, purpose: LinkPurpose, signed: string): string | null {
  const dot = signed.lastIndexOf('.');
  if (dot <= 0) return null;
  const token = signed.slice(0, dot);
  const given = Buffer.from(signed.slice(dot + 1), 'base64url');
  const expected = Buffer.from(linkSignature(secret, purpose, token), 'base64url');
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) return null;
  return token;
}

function linkSignature(secret: Uint8Array, purpose: string, token: string): string {
  return createHmac('sha256', secret).update(`coilpath:${purpose}:${token}`).digest('base64url');
}

/** The refusals of a link (invitation, password reset, first-owner setup), the same words for each. */
export const linkErrors = {
  invalid: (what: string) =>
    new HttpError(
      400,
      'link_invalid',
      `This ${what} link is not valid (it may be incomplete or altered). Copy the whole link from the e-mail, or ask for a new one.`,
    ),
  used: (what: string, next: string) => new HttpError(410, 'link_used', `This ${what} link has already been used. ${next}`),
  expired: (what: string, next: string) => new HttpError(410, 'link_expired', `This ${what} link has expired. ${next}`),
};
