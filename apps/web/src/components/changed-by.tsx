/**
 * "Changed by Ana just now" beside a row someone else changed (a Roster booking, a queued work order, a
 * Watchlist row): said in words, not by colour alone, and gone after a minute by the app's clock
 * (`useChangedBy` in lib/live-events.ts). Changes made by no person (a job, a controller) say nothing.
 */
import { changedByLabel } from '@coilpath/contract/events';
import { useChangedBy, type ChangedRow } from '@/lib/live-events';

/** The note's element id, for an `aria-describedby` of an element whose name is set by `aria-label`. */
export const changedByNoteId = (row: ChangedRow, id: string) => `changed-by-${row}-${id}`;

export function ChangedByNote({
  row,
  id,
  className = 'text-xs font-medium text-copper-hover',
}: {
  row: ChangedRow;
  id: string;
  className?: string;
}) {
  const name = useChangedBy(row, id);
  if (!name) return null;
  return (
    <span id={changedByNoteId(row, id)} data-testid="changed-by" className={className}>
      {changedByLabel(name)}
    </span>
  );
}
