import type { Response } from 'express';

/**
 * Types a browser may show in the page (`inline`): raster images only. A PDF, an SVG (which can carry script),
 * HTML or anything else a stored file or an e-mailed attachment might be is downloaded (`attachment`).
 */
const inlineTypes = new Set(['image/jpeg', 'image/png', 'image/webp', 'image/gif', 'image/heic', 'image/heif', 'image/avif']);

export const shownInline = (contentType: string) => inlineTypes.has(contentType.split(';')[0]!.trim().toLowerCase());

/** RFC 8187 §3.2.1 `attr-char`: everything else in a `filename*` value is percent-encoded (UTF-8). */
const encodeExtValue = (s: string) => encodeURIComponent(s).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);

/**
 * `Content-Disposition` (RFC 6266) for a stored file: `inline` or `attachment`, a plain ASCII `filename` for old
 * clients (other characters, quotes and backslashes as `_`) and the exact name as `filename*=UTF-8''…`
 * (RFC 8187), which current browsers prefer (RFC 6266 §4.3).
 */
export function contentDisposition(type: 'inline' | 'attachment', name: string): string {
  const clean = name.replace(/[\u0000-\u001f\u007f]/g, '').trim() || 'file';
  const ascii = clean
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/[^\x20-\x7e]|["\\]/g, '_');
  return `${type}; filename="${ascii}"; filename*=UTF-8''${encodeExtValue(clean.normalize('NFC'))}`;
}

/**
 * Sends a stored file's bytes: its type, never sniffed (`X-Content-Type-Options: nosniff`), shown inline only
 * when it is a raster image and otherwise downloaded under its name.
 */
export function sendStoredFile(res: Response, file: { content: Buffer; contentType: string; name: string; cacheControl?: string }) {
  res.setHeader('Content-Type', file.contentType);
  res.setHeader('Content-Length', String(file.content.length));
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.setHeader('Content-Disposition', contentDisposition(shownInline(file.contentType) ? 'inline' : 'attachment', file.name));
  if (file.cacheControl) res.setHeader('Cache-Control', file.cacheControl);
  res.send(file.content);
}
