/**
 * The one place the Roster turns database rows into @coilpath/calc's scheduling shapes. The
 * computations themselves (load, ranking, evening out, certification, drive time) live in calc.
 */
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import {
  addDays,
  driveMinutes,
  localDayBounds,
  weekdayOf,
  zonedDate,
  type Booking as CalcBooking,
  type Technician as CalcTechnician,
} from '@coilpath/calc';
import type { Priority, WorkingHours } from '@coilpath/contract';

export interface TechRow {
  id: string;
  name: string;
  skills: string[];
  epa608Type: CalcTechnician['epa608'];
  workingHours: WorkingHours | null;
  startLat: number | null;
  startLon: number | null;
}

export interface BranchRow {
  id: string;
  timeZone: string;
  baseLat: number;
  baseLon: number;
  /** The branch's holidays: nobody is rostered on them (calc's `workingWindow`). */
  holidays: string[];
}

export function toCalcTechnician(t: TechRow, branch: BranchRow): CalcTechnician {
  return {
    id: t.id,
    name: t.name,
    skills: t.skills,
    epa608: t.epa608Type,
    workingHours: t.workingHours ?? {},
    timeZone: branch.timeZone,
    start: { lat: t.startLat ?? branch.baseLat, lon: t.startLon ?? branch.baseLon },
    holidays: branch.holidays,
  };
}

export interface BookingRow {
  id: string;
  techId: string;
  startAt: Date;
  endAt: Date;
  fixed: boolean;
  workOrderId: string;
  unitId: string | null;
  lat: number;
  lon: number;
}

export function toCalcBooking(b: BookingRow): CalcBooking {
  return {
    id: b.id,
    techId: b.techId,
    start: b.startAt,
    end: b.endAt,
    lat: b.lat,
    lon: b.lon,
    fixed: b.fixed,
    jobId: b.workOrderId,
    ...(b.unitId ? { unitId: b.unitId } : {}),
  };
}

/** evenOut places higher priorities first. */
export const priorityRank: Record<Priority, number> = { emergency: 3, high: 2, normal: 1, low: 0 };

/** Every local day from `from` to `to`, inclusive. */
export function eachDay(from: string, to: string): string[] {
  const out: string[] = [];
  for (let d = from; d <= to; d = addDays(d, 1)) out.push(d);
  return out;
}

/** The Monday of the week holding `day` (weeks run Monday to Sunday). */
export function mondayOf(day: string): string {
  return addDays(day, -((weekdayOf(day) + 6) % 7));
}

/** Instants covering local days `from`..`to` in a zone: [start of from, end of to). */
export function localRange(from: string, to: string, timeZone: string): { start: Date; end: Date } {
  return { start: new Date(localDayBounds(from, timeZone).start), end: new Date(localDayBounds(to, timeZone).end) };
}

export const localDay = (at: Date, timeZone: string) => zonedDate(at, timeZone);
export const localTime = (at: Date | number, timeZone: string, pattern = 'HH:mm') =>
  format(new TZDate(new Date(at).getTime(), timeZone), pattern);

/**
 * Estimated drive minutes of each technician's days: from the day's start point through the stops
 * in time order (calc's drive-time estimate per leg). Used to compare before/after an even-out.
 */
export function weekDriveMinutes(
  techs: readonly CalcTechnician[],
  stops: readonly { techId: string; start: Date; lat: number; lon: number }[],
): number {
  const byTechDay = new Map<string, { start: Date; lat: number; lon: number }[]>();
  const tz = new Map(techs.map((t) => [t.id, t]));
  for (const s of stops) {
    const tech = tz.get(s.techId);
    if (!tech) continue;
    const key = `${s.techId}|${zonedDate(s.start, tech.timeZone)}`;
    const list = byTechDay.get(key) ?? [];
    list.push(s);
    byTechDay.set(key, list);
  }
  let total = 0;
  for (const [key, list] of byTechDay) {
    const tech = tz.get(key.split('|')[0] as string) as CalcTechnician;
    list.sort((a, b) => a.start.getTime() - b.start.getTime());
    let at = tech.start;
    for (const s of list) {
      total += driveMinutes(at, { lat: s.lat, lon: s.lon });
      at = { lat: s.lat, lon: s.lon };
    }
  }
  return Math.round(total);
}
