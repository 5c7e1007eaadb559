/**
 * The customer's sign-off at close-out (`closeSignatureSchema` in @coilpath/contract): the signature image is
 * decoded in full here — a general-purpose PNG decoder (pngjs) reads every chunk and checks every CRC — so
 * nothing but a whole PNG of a bounded size is stored or drawn into the customer's PDF.
 */
import { PNG } from 'pngjs';
import { signatureMaxBytes, type VisitSignatureDto } from '@coilpath/contract';
import type { Tx } from '../../db/client';
import { signatureRow } from './visits.repo';
import { HttpError } from '../../lib/errors';

/** Largest canvas a signature may come from, in pixels: a phone at 3× density gives about 1,200 × 500. */
export const SIGNATURE_MAX_WIDTH = 3000;
export const SIGNATURE_MAX_HEIGHT = 1500;

const refuse = (message: string) => new HttpError(400, 'signature_invalid', message, { fields: [{ path: 'signature.imagePng', message }] });

/**
 * The PNG's bytes from its base64 text, or 400 `signature_invalid` naming `signature.imagePng`. The size in pixels
 * is read from the header before anything is inflated, so a small file that claims a huge image is refused
 * without decoding it.
 */
export function decodeSignaturePng(base64: string): Buffer {
  const bytes = Buffer.from(base64, 'base64');
  if (bytes.length > signatureMaxBytes)
    throw refuse(`The signature image is larger than ${signatureMaxBytes / 1024} KB; clear the pad and sign again.`);
  // PNG spec §5.2–5.3: the 8-byte signature, then the IHDR chunk (length 13) with width and height first.
  if (bytes.length < 33 || bytes.readUInt32BE(8) !== 13 || bytes.toString('latin1', 12, 16) !== 'IHDR') {
    throw refuse('The signature image is not a PNG. Clear the pad and sign again.');
  }
  const width = bytes.readUInt32BE(16);
  const height = bytes.readUInt32BE(20);
  if (width < 1 || height < 1 || width > SIGNATURE_MAX_WIDTH || height > SIGNATURE_MAX_HEIGHT) {
    throw refuse(
      `The signature image must be at most ${SIGNATURE_MAX_WIDTH} × ${SIGNATURE_MAX_HEIGHT} pixels; this one is ${width} × ${height}.`,
    );
  }
  try {
    PNG.sync.read(bytes);
  } catch {
    throw refuse('The signature image is damaged: it does not decode as a PNG. Clear the pad and sign again.');
  }
  return bytes;
}

/**
 * When the customer signed: the phone's time (the close-out may have waited offline) when it lies between
 * arriving on site and now, else the server's now.
 */
export function signedAtOf(claimed: string | undefined, onSiteAt: Date | null, now: Date): Date {
  if (!claimed) return now;
  const at = new Date(claimed);
  if (Number.isNaN(at.getTime()) || at > now || (onSiteAt && at < onSiteAt)) return now;
  return at;
}

/** A visit's sign-off as the API answers it (without the image: that is at `imageUrl`). */
export async function visitSignatureDto(db: Tx, visitId: string): Promise<VisitSignatureDto | null> {
  const row = await signatureRow(db, visitId);
  if (!row) return null;
  if (row.signerName === null || row.signedAt === null) return { kind: 'customer_not_available', recordedAt: row.recordedAt.toISOString() };
  return { kind: 'signed', signerName: row.signerName, signedAt: row.signedAt.toISOString(), imageUrl: `/api/visits/${visitId}/signature` };
}

/** The signature image of a visit, or null (not signed). */
export { signatureImage } from './visits.repo';
