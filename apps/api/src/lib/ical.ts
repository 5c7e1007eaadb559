/**
 * A small iCalendar (RFC 5545) writer for Coilpath's feeds. Content lines are folded at 75 *octets*
 * of UTF-8 (§3.1), never inside a character — nor between a letter and the accent that follows it —
 * so a description in Polish or Vietnamese reaches a phone's calendar intact.
 */

const encoder = new TextEncoder();
const octets = (s: string) => encoder.encode(s).length;

/** Longest physical line, CRLF not counted (RFC 5545 §3.1). */
export const ICAL_LINE_OCTETS = 75;

const graphemes = new Intl.Segmenter('en', { granularity: 'grapheme' });

/** Pieces no fold may split: grapheme clusters, or a cluster's code points when one alone is too long. */
function pieces(line: string, max: number): string[] {
  const out: string[] = [];
  for (const { segment } of graphemes.segment(line)) {
    if (octets(segment) <= max) out.push(segment);
    else out.push(...Array.from(segment));
  }
  return out;
}

/** Folds one content line: each physical line at most 75 octets; continuation lines start with a space. */
export function foldLine(line: string): string {
  if (octets(line) <= ICAL_LINE_OCTETS) return line;
  const lines: string[] = [];
  let current = '';
  let size = 0;
  // A continuation line's leading space counts towards its 75 octets.
  let limit = ICAL_LINE_OCTETS;
  for (const piece of pieces(line, ICAL_LINE_OCTETS - 1)) {
    const n = octets(piece);
    if (size + n > limit) {
      lines.push(current);
      current = '';
      size = 0;
      limit = ICAL_LINE_OCTETS - 1;
    }
    current += piece;
    size += n;
  }
  lines.push(current);
  return lines.join('\r\n ');
}

/** TEXT value escaping (§3.3.11): backslash, semicolon, comma and line breaks. */
export function escapeText(value: string): string {
  return value
    .replace(/\\/g, '\\\\')
    .replace(/;/g, '\\;')
    .replace(/,/g, '\\,')
    .replace(/\r\n|\r|\n/g, '\\n');
}

/** DATE-TIME in UTC (§3.3.5, form #2): 20261204T151500Z. */
export function utcDateTime(d: Date): string {
  return d
    .toISOString()
    .replace(/[-:]/g, '')
    .replace(/\.\d{3}Z$/, 'Z');
}

export interface CalendarEvent {
  uid: string;
  start: Date;
  end: Date;
  summary: string;
  description?: string;
  location?: string;
  geo?: { lat: number; lon: number } | null;
  url?: string;
  status?: 'TENTATIVE' | 'CONFIRMED' | 'CANCELLED';
  sequence?: number;
  lastModified?: Date;
}

export interface Calendar {
  productId: string;
  name?: string;
  /** DTSTAMP of every event: when the feed was produced (the server's clock). */
  stamp: Date;
  events: CalendarEvent[];
}

/** The whole VCALENDAR, every content line folded and ended by CRLF. */
export function writeCalendar(cal: Calendar): string {
  const lines: string[] = ['BEGIN:VCALENDAR', 'VERSION:2.0', `PRODID:${cal.productId}`, 'CALSCALE:GREGORIAN', 'METHOD:PUBLISH'];
  if (cal.name) lines.push(`X-WR-CALNAME:${escapeText(cal.name)}`);
  for (const e of cal.events) {
    lines.push(
      'BEGIN:VEVENT',
      `UID:${e.uid}`,
      `DTSTAMP:${utcDateTime(cal.stamp)}`,
      `DTSTART:${utcDateTime(e.start)}`,
      `DTEND:${utcDateTime(e.end)}`,
    );
    lines.push(`SUMMARY:${escapeText(e.summary)}`);
    if (e.description) lines.push(`DESCRIPTION:${escapeText(e.description)}`);
    if (e.location) lines.push(`LOCATION:${escapeText(e.location)}`);
    if (e.geo && Number.isFinite(e.geo.lat) && Number.isFinite(e.geo.lon)) lines.push(`GEO:${e.geo.lat};${e.geo.lon}`);
    if (e.url) lines.push(`URL:${e.url}`);
    if (e.status) lines.push(`STATUS:${e.status}`);
    lines.push('TRANSP:OPAQUE');
    if (e.sequence !== undefined) lines.push(`SEQUENCE:${e.sequence}`);
    if (e.lastModified) lines.push(`LAST-MODIFIED:${utcDateTime(e.lastModified)}`);
    lines.push('END:VEVENT');
  }
  lines.push('END:VCALENDAR');
  return lines.map(foldLine).join('\r\n') + '\r\n';
}
