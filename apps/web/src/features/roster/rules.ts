/**
 * The booking rules on the Roster's screens. The rules themselves are @coilpath/calc's
 * (`bookingBreaches`), the same function the API runs before it books: the forms use it to warn while
 * the dispatcher is still choosing, and the API's refusal (its code, message and `details.rules`) stays
 * the last word. Nothing here decides a rule on its own.
 */
import { bookingBreaches, workOrderDueAt, type RuleBreach, type RuleJob } from '@coilpath/calc';
import type { Booking, BookingRule, BookingRuleRefusal, Technician, WorkOrder } from '@coilpath/contract';
import { andList } from '@coilpath/contract/common';
import { bookingRuleLabels, bookingRules } from '@coilpath/contract/roster';
import { ApiError } from '@/lib/api-client';

/** What the rules read of a work order from the unplaced queue. */
export const workRuleJob = (
  w: Pick<WorkOrder, 'priority' | 'requiredSkill' | 'requiredCertification' | 'slaDueAt' | 'latestAt'>,
): RuleJob => ({
  requiredSkill: w.requiredSkill,
  requiredCertification: w.requiredCertification,
  dueAt: workOrderDueAt(w),
});

/** What the rules read of a booked work order (the API sends its due time). */
export const bookingRuleJob = (b: Booking): RuleJob => ({
  requiredSkill: b.workOrder.requiredSkill,
  requiredCertification: b.workOrder.requiredCertification,
  dueAt: b.workOrder.dueAt,
});

/**
 * The rules a placement would break, in rule order: what the API would refuse. Empty while the
 * technician or the times are not chosen yet.
 */
export function placementBreaches(
  job: RuleJob,
  tech: Technician | undefined,
  timeZone: string,
  startAt: string | null,
  endAt: string | null,
): RuleBreach[] {
  if (!tech || !startAt || !endAt || !(Date.parse(endAt) > Date.parse(startAt))) return [];
  return bookingBreaches(
    { name: tech.name, skills: tech.skills, epa608: tech.epa608Type, workingHours: tech.workingHours ?? {}, timeZone },
    job,
    startAt,
    endAt,
  );
}

/** The rules an API refusal names (a 409 for the booking rules carries them in `details.rules`). */
export function refusedRules(e: unknown): BookingRule[] {
  if (!(e instanceof ApiError) || e.status !== 409) return [];
  const rules = (e.details as Partial<BookingRuleRefusal> | undefined)?.rules;
  return Array.isArray(rules) ? bookingRules.filter((r) => rules.includes(r)) : [];
}

/** The rules a form offers to override: those broken now, those the API refused, and those already ticked. */
export function offeredRules(
  warnings: readonly RuleBreach[],
  refused: readonly BookingRule[],
  ticked: readonly BookingRule[],
): BookingRule[] {
  const all = new Set<BookingRule>([...warnings.map((w) => w.rule), ...refused, ...ticked]);
  return bookingRules.filter((r) => all.has(r));
}

/** "working hours", "required skill and due time". */
export const ruleNames = (rules: readonly BookingRule[]) => andList(rules.map((r) => bookingRuleLabels[r]));

/**
 * What a booking's chip says about an override: a short badge, the reason, and a sentence for screen
 * readers and the details. Null when the booking keeps every rule.
 */
export function overrideSummary(
  b: Pick<Booking, 'overrideRules' | 'overrideReason' | 'overrideBy'>,
): { badge: string; reason: string; sentence: string } | null {
  if (!b.overrideRules.length) return null;
  const names = ruleNames(b.overrideRules);
  const reason = b.overrideReason ?? '';
  return {
    badge: `Override: ${names}`,
    reason,
    sentence: `Booked against the ${names}${b.overrideBy ? ` by ${b.overrideBy.name}` : ''}${reason ? `: “${reason}”` : ''}`,
  };
}
