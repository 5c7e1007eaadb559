import { Link } from 'react-router-dom';
import { ExternalLink } from 'lucide-react';
import { openReturnDetailsSchema, workOrderLabel } from '@coilpath/contract/work-orders';
import { workOrderStateLabels } from '@coilpath/contract/vocabulary';
import type { OpenReturnDetails } from '@coilpath/contract';
import { ApiError } from '@/lib/api-client';

/** The open return visit a 409 `open_return_exists` names; null for any other error. */
export function openReturnOf(err: unknown): OpenReturnDetails | null {
  if (!(err instanceof ApiError) || err.status !== 409 || err.code !== 'open_return_exists') return null;
  const d = openReturnDetailsSchema.safeParse(err.details);
  return d.success ? d.data : null;
}

/**
 * Where a work order opens, as the other screens link to one: its latest visit on the Visit screen, else the
 * unit's file, whose work-order list shows it (an unplaced work order has no visit yet).
 */
export function workOrderHref(wo: { visitId: string | null; unitId: string | null }): string | null {
  if (wo.visitId) return `/visits/${wo.visitId}`;
  if (wo.unitId) return `/units/${wo.unitId}`;
  return null;
}

/** A link that opens a work order (see `workOrderHref`); nothing when there is nowhere to go. */
export function OpenWorkOrderLink({
  wo,
  className = '',
}: {
  wo: { number: number | null; visitId: string | null; unitId: string | null };
  className?: string;
}) {
  const href = workOrderHref(wo);
  if (!href) return null;
  return (
    <Link
      to={href}
      className={`inline-flex min-h-11 items-center gap-1 font-medium text-coolant underline-offset-2 hover:underline ${className}`}
    >
      <ExternalLink className="size-4" aria-hidden="true" /> Open {workOrderLabel(wo.number)}
      <span className="sr-only">{wo.visitId ? ' (its visit)' : ' (in the Unit file)'}</span>
    </Link>
  );
}

/** Where a work order stands, in words. */
export const workOrderStateText = (state: OpenReturnDetails['state']) =>
  state === 'unplaced' ? 'in the Roster queue, not booked yet' : workOrderStateLabels[state].toLowerCase();

/** What the screen says after a 409 `open_return_exists`: no second visit, and the way to the open one. */
export function OpenReturnOffer({ wo, message }: { wo: OpenReturnDetails; message: string }) {
  return (
    <div
      role="alert"
      className="mt-3 flex flex-wrap items-center gap-x-3 gap-y-1 rounded-md border border-watch-base/40 bg-watch-tint px-3 py-2 text-sm text-ink"
    >
      <p className="min-w-0 flex-1">
        {message} No second visit was created; {workOrderLabel(wo.number)} is {workOrderStateText(wo.state)}.
      </p>
      <OpenWorkOrderLink wo={wo} />
    </div>
  );
}
