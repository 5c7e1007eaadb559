import { TZDate } from '@date-fns/tz';

/** A `datetime-local` value read as wall time in a zone, as an ISO instant ('' when empty or unreadable). */
export function localToIso(value: string, timeZone: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})/.exec(value);
  if (!m) return '';
  const t = new TZDate(+m[1]!, +m[2]! - 1, +m[3]!, +m[4]!, +m[5]!, 0, timeZone).getTime();
  return Number.isFinite(t) ? new Date(t).toISOString() : '';
}
