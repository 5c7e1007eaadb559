/**
 * The booking rules in a booking form: what the chosen technician and time would break, said before
 * the dispatcher confirms, and a box per rule to book against it anyway with one reason (kept with the
 * booking). The sentences are the API's own (`bookingBreaches` in @coilpath/calc).
 */
import { AlertTriangle } from 'lucide-react';
import type { RuleBreach } from '@coilpath/calc';
import type { BookingRule } from '@coilpath/contract';
import { bookingRuleLabels } from '@coilpath/contract/roster';
import { TextAreaField } from '@/components/ui/field';
import type { UseFormRegisterReturn } from 'react-hook-form';
import { offeredRules } from './rules';

export interface RuleOverrideProps {
  /** What the form's technician and times break now. */
  warnings: readonly RuleBreach[];
  /** The rules the API's last refusal named. */
  refused: readonly BookingRule[];
  /** The rules ticked to override. */
  ticked: readonly BookingRule[];
  onToggle: (rule: BookingRule, on: boolean) => void;
  /** The reason field (react-hook-form's `register('overrideReason')`). */
  reasonField: UseFormRegisterReturn<'overrideReason'>;
  reasonError?: string | undefined;
}

export function RuleOverride({ warnings, refused, ticked, onToggle, reasonField, reasonError }: RuleOverrideProps) {
  const offered = offeredRules(warnings, refused, ticked);
  return (
    // Polite: the warnings change as the dispatcher picks a technician and a time.
    <div aria-live="polite">
      {offered.length > 0 && (
        <fieldset className="flex flex-col gap-2 rounded-md border border-watch-base/50 bg-watch-tint p-3" data-testid="rule-override">
          <legend className="px-1 text-sm font-medium">Booking rules</legend>
          {warnings.length > 0 && (
            <ul className="flex flex-col gap-1 text-sm">
              {warnings.map((w) => (
                <li key={w.rule} className="flex items-start gap-2">
                  <AlertTriangle className="mt-0.5 size-4 shrink-0 text-watch" aria-hidden="true" />
                  <span>
                    <span className="font-medium">Breaks the {bookingRuleLabels[w.rule]}:</span> {w.message}
                  </span>
                </li>
              ))}
            </ul>
          )}
          {offered.map((rule) => (
            <label key={rule} className="flex items-center gap-2 text-sm">
              <input
                type="checkbox"
                className="size-5"
                checked={ticked.includes(rule)}
                onChange={(e) => onToggle(rule, e.currentTarget.checked)}
              />
              Book against the {bookingRuleLabels[rule]} anyway
            </label>
          ))}
          {ticked.length > 0 && <TextAreaField label="Why (kept with the booking and shown on it)" error={reasonError} {...reasonField} />}
        </fieldset>
      )}
    </div>
  );
}
