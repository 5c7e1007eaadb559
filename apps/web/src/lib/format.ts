import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { appNow } from './now';

/** Formats an instant in a branch's time zone, e.g. "Wed 2 Dec, 14:05". */
export function formatInZone(instant: string | Date, timeZone: string, pattern = 'EEE d MMM, HH:mm'): string {
  return format(new TZDate(new Date(instant).getTime(), timeZone), pattern);
}

/** Short zone label (e.g. "CST") for an instant in a zone. */
export function zoneAbbreviation(instant: string | Date, timeZone: string): string {
  const parts = new Intl.DateTimeFormat('en-US', { timeZone, timeZoneName: 'short' }).formatToParts(new Date(instant));
  return parts.find((p) => p.type === 'timeZoneName')?.value ?? timeZone;
}

/** True when the viewer's own zone differs from the branch's, so times need a label. */
export function viewerZoneDiffers(timeZone: string): boolean {
  return Intl.DateTimeFormat().resolvedOptions().timeZone !== timeZone;
}

/** Today's date `YYYY-MM-DD` in a zone. */
export function todayInZone(timeZone: string, now = appNow()): string {
  return format(new TZDate(now.getTime(), timeZone), 'yyyy-MM-dd');
}

export const formatNumber = (n: number | null | undefined, digits = 1) =>
  n === null || n === undefined || Number.isNaN(n)
    ? '—'
    : n.toLocaleString('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits });

export const formatPercent = (f: number | null | undefined, digits = 1) =>
  f === null || f === undefined ? '—' : `${(f * 100).toFixed(digits)} %`;

export const formatMoney = (cents: number | null | undefined, currency = 'USD') =>
  cents === null || cents === undefined
    ? '—'
    : (cents / 100).toLocaleString('en-US', { style: 'currency', currency, maximumFractionDigits: 0 });

export function formatMinutes(minutes: number): string {
  const h = Math.floor(minutes / 60);
  const m = Math.round(minutes % 60);
  return h ? `${h} h ${m.toString().padStart(2, '0')} min` : `${m} min`;
}
