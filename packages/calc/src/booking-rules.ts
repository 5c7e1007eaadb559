/**
 * The booking rules a dispatcher may override with a reason: the technician's skill and EPA 608
 * certification for the work, the technician's working hours, and the work order's due time. Defined
 * here once: the API refuses a booking that breaks one (409) unless the request overrides it, the
 * Roster's suggestions and evening out never propose a booking that breaks one, and the booking forms
 * warn with the same sentences before the dispatcher confirms.
 *
 * Not overridable, and so not here: a technician of another branch or no longer active, and two
 * bookings of one technician at once (the API refuses those outright).
 */
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { certificationSatisfies, type Epa608Requirement } from './certification';
import { instantMs, type Instant } from './dates';
import { workingWindow, zonedDate, type Technician } from './schedule';

/** The overridable booking rules, in the order they are checked and named. */
export const bookingRules = ['skill', 'certification', 'working_hours', 'due_time'] as const;
export type BookingRule = (typeof bookingRules)[number];

/** What the rules read of a technician. */
export type RuleTechnician = Pick<Technician, 'name' | 'skills' | 'epa608' | 'workingHours' | 'timeZone' | 'holidays'>;

/** What the rules read of the work. */
export interface RuleJob {
  requiredSkill?: string | null | undefined;
  /** EPA 608 type the refrigerant work needs ('universal' satisfies any). */
  requiredCertification?: Epa608Requirement | null | undefined;
  /** The work order's due time: a booking must start by it (see `workOrderDueAt`). */
  dueAt?: Instant | null | undefined;
}

export interface RuleBreach {
  rule: BookingRule;
  /** Short, for a list of reasons under the technician's name: `Lacks the skill "chiller"`. */
  reason: string;
  /** A sentence naming the technician (or the work) and what is wrong, with local times. */
  message: string;
}

/**
 * A work order's due time, the latest a booking may start: its latest acceptable start (leak-repair
 * deadlines, return visits, planned maintenance's grace) and, for an emergency, its SLA due time — the
 * earlier of the two. The SLA time of other priorities is a target the dispatcher balances, not a rule.
 * Null when there is none.
 */
export function workOrderDueAt(w: {
  priority?: string | null | undefined;
  slaDueAt?: Instant | null | undefined;
  latestAt?: Instant | null | undefined;
}): string | null {
  const times = [w.latestAt, w.priority === 'emergency' ? w.slaDueAt : null]
    .filter((t): t is Instant => t !== null && t !== undefined)
    .map((t) => instantMs(t, 'due time'));
  return times.length ? new Date(Math.min(...times)).toISOString() : null;
}

const certLabel = (l: string) => (l === 'universal' ? 'Universal' : `Type ${l}`);
/** "Wednesday, March 10". */
const longDay = (ms: number, timeZone: string) => format(new TZDate(ms, timeZone), 'EEEE, MMMM d');
const hm = (ms: number, timeZone: string) => format(new TZDate(ms, timeZone), 'HH:mm');

/** The short reason the certification rule gives for a technician (also used by the suggestions). */
function certificationReason(has: RuleTechnician['epa608'], needs: Epa608Requirement): string {
  return has === 'none'
    ? `No EPA 608 certification; the refrigerant work needs ${certLabel(needs)}`
    : `EPA 608 ${certLabel(has)} does not cover the ${certLabel(needs)} refrigerant work`;
}

/** The rules about who: the skill and the EPA 608 certification the work needs. */
export function technicianBreaches(tech: RuleTechnician, job: RuleJob): RuleBreach[] {
  const out: RuleBreach[] = [];
  if (job.requiredSkill && !tech.skills.includes(job.requiredSkill)) {
    out.push({
      rule: 'skill',
      reason: `Lacks the skill "${job.requiredSkill}"`,
      message: `${tech.name} lacks the skill "${job.requiredSkill}" this work needs${tech.skills.length ? ` (has ${tech.skills.map((s) => `"${s}"`).join(', ')})` : ''}.`,
    });
  }
  if (job.requiredCertification && !certificationSatisfies(tech.epa608, job.requiredCertification)) {
    const has = tech.epa608 === 'none' ? 'holds no EPA 608 certification' : `holds EPA 608 ${certLabel(tech.epa608)}`;
    out.push({
      rule: 'certification',
      reason: certificationReason(tech.epa608, job.requiredCertification),
      message: `${tech.name} is not certified for this refrigerant work (needs EPA 608 ${certLabel(job.requiredCertification)}; ${tech.name} ${has}).`,
    });
  }
  return out;
}

/** The working-hours rule for a booking [start, end): inside the technician's hours of its start day. */
export function workingHoursBreach(tech: RuleTechnician, start: Instant, end: Instant): RuleBreach | null {
  const s = instantMs(start, 'start');
  const e = instantMs(end, 'end');
  const tz = tech.timeZone;
  const day = zonedDate(new Date(s), tz);
  const win = workingWindow(tech as Technician, day);
  if (win && s >= win.start && e <= win.end) return null;
  const dayName = longDay(s, tz);
  if (!win && tech.holidays?.includes(day)) {
    return {
      rule: 'working_hours',
      reason: `Branch holiday on ${day}`,
      message: `${dayName} is a branch holiday; ${tech.name} is not rostered to work.`,
    };
  }
  if (!win) {
    return { rule: 'working_hours', reason: `Not working on ${day}`, message: `${tech.name} does not work on ${dayName}.` };
  }
  const runs = `${hm(s, tz)}–${hm(e, tz)}${zonedDate(new Date(e), tz) !== day ? ' the next day' : ''}`;
  return {
    rule: 'working_hours',
    reason: `Outside working hours (${hm(win.start, tz)}–${hm(win.end, tz)} on ${day})`,
    message: `${tech.name} works ${hm(win.start, tz)}–${hm(win.end, tz)} on ${dayName}; this booking runs ${runs} (${tz}).`,
  };
}

/** The due-time rule: a booking starts no later than the work order's due time. */
export function dueTimeBreach(job: RuleJob, start: Instant, timeZone: string): RuleBreach | null {
  if (job.dueAt === null || job.dueAt === undefined) return null;
  const due = instantMs(job.dueAt, 'due time');
  const s = instantMs(start, 'start');
  if (s <= due) return null;
  const dueText = `${longDay(due, timeZone)} at ${hm(due, timeZone)}`;
  return {
    rule: 'due_time',
    reason: `Starts after the due time (${dueText})`,
    message: `This work is due by ${dueText} (${timeZone}); this booking starts ${longDay(s, timeZone)} at ${hm(s, timeZone)}, after it.`,
  };
}

/** Every overridable rule a booking of `tech` for `job` over [start, end) breaks, in rule order. */
export function bookingBreaches(tech: RuleTechnician, job: RuleJob, start: Instant, end: Instant): RuleBreach[] {
  return [...technicianBreaches(tech, job), workingHoursBreach(tech, start, end), dueTimeBreach(job, start, tech.timeZone)].filter(
    (b): b is RuleBreach => b !== null,
  );
}

/** The breaches an override does not cover: what still stops the booking. */
export function unoverridden(breaches: readonly RuleBreach[], overridden: readonly string[] | null | undefined): RuleBreach[] {
  const ok = new Set(overridden ?? []);
  return breaches.filter((b) => !ok.has(b.rule));
}
