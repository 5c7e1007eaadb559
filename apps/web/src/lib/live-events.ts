/**
 * The screens update themselves: one `EventSource` on `/api/events` per signed-in session (started by the app
 * frame), and each event invalidates exactly the queries it concerns (`concerns`). No polling; the browser
 * reconnects by itself and sends `Last-Event-ID`, so nothing is missed. Nothing is shown about the connection.
 */
import { useEffect, useSyncExternalStore } from 'react';
import { useQueryClient, type QueryKey } from '@tanstack/react-query';
import { liveEventKinds, type LiveEvent } from '@coilpath/contract';

/** Query keys a branch-scoped screen uses: the branch's id, '' (none chosen yet) or 'all' (the owner's every branch). */
const sameBranch = (keyBranch: unknown, branchId: string) => keyBranch === branchId || keyBranch === '' || keyBranch === 'all' || keyBranch === undefined;

const watchlistParts: Record<'alarm' | 'leak-case', readonly string[]> = {
  alarm: ['alarms', 'repeat-alarms', 'alarm-sources'],
  'leak-case': ['leak-cases'],
};

/**
 * Whether a query (by its key) shows what `event` says changed. The keys are those of the features:
 * Roster `['roster', part, branchId, …]` and the unplaced queue `['work-orders', { branchId, … }]`;
 * Route `['day', date]` and the current visit `['visit', 'current']`; a visit `['visit', id]`;
 * Watchlist `['watchlist', branchId | 'all', part]`.
 */
export function concerns(event: LiveEvent, key: QueryKey): boolean {
  const [root, second, third] = key;
  switch (event.kind) {
    case 'roster':
      if (root === 'roster') return sameBranch(third, event.branchId);
      if (root === 'work-orders') return sameBranch((second as { branchId?: string } | undefined)?.branchId, event.branchId);
      return false;
    case 'visit':
      if (root === 'roster') return second === 'bookings' && sameBranch(third, event.branchId);
      return root === 'visit' && second === event.visitId;
    case 'day':
      return root === 'day' || (root === 'visit' && second === 'current');
    case 'alarm':
    case 'leak-case':
      return root === 'watchlist' && sameBranch(second, event.branchId) && watchlistParts[event.kind].includes(third as string);
  }
}

/* ------------------------------------------------- "Changed by Ana just now" on the Roster's chips */

/** How long a chip says who moved it. */
export const CHANGED_BY_MS = 60_000;

const changedBy = new Map<string, string>();
const changeListeners = new Set<() => void>();
const emitChange = () => changeListeners.forEach((l) => l());

/** One's own change of these bookings: whoever changed them before is no longer news. */
function clearChangedBy(bookingIds: readonly string[]): void {
  let any = false;
  for (const id of bookingIds) any = changedBy.delete(id) || any;
  if (any) emitChange();
}

/** Notes that `bookingIds` were changed by `name` (someone else); each note goes after `CHANGED_BY_MS`. */
export function noteChangedBy(bookingIds: readonly string[], name: string): void {
  for (const id of bookingIds) changedBy.set(id, name);
  emitChange();
  setTimeout(() => {
    for (const id of bookingIds) if (changedBy.get(id) === name) changedBy.delete(id);
    emitChange();
  }, CHANGED_BY_MS);
}

/** Who else just changed this booking (full name), or null. */
export function changedByOf(bookingId: string): string | null {
  return changedBy.get(bookingId) ?? null;
}

/** The name of whoever else just changed this booking, or null (the chip says it with `changedByLabel`). */
export function useChangedBy(bookingId: string): string | null {
  return useSyncExternalStore(
    (listener) => {
      changeListeners.add(listener);
      return () => changeListeners.delete(listener);
    },
    () => changedByOf(bookingId),
    // Rendered outside a browser (tests render to a string): no one has changed anything.
    () => null,
  );
}

/* ------------------------------------------------- the stream */

/**
 * What an event does on this screen: invalidate its queries; a roster change by someone else marks its chips
 * ("Changed by Ana just now"), one's own clears the marks of the bookings it touched.
 */
export function applyLiveEvent(event: LiveEvent, myId: string, invalidate: (predicate: (key: QueryKey) => boolean) => void): void {
  invalidate((key) => concerns(event, key));
  if (event.kind !== 'roster' || !event.by || !event.bookings?.length) return;
  if (event.by.id === myId) clearChangedBy(event.bookings);
  else noteChangedBy(event.bookings, event.by.name);
}

/** After the server refused the stream (signed out, or the server was away too long), try again this much later. */
const REOPEN_AFTER_MS = 30_000;

/** Opens the session's one stream while the signed-in frame is shown. */
export function useLiveEvents(userId: string): void {
  const qc = useQueryClient();
  useEffect(() => {
    if (typeof EventSource === 'undefined') return;
    let source: EventSource | null = null;
    let reopen: ReturnType<typeof setTimeout> | undefined;
    const invalidate = (predicate: (key: QueryKey) => boolean) => void qc.invalidateQueries({ predicate: (q) => predicate(q.queryKey) });
    const onEvent = (m: MessageEvent<string>) => {
      try {
        applyLiveEvent(JSON.parse(m.data) as LiveEvent, userId, invalidate);
      } catch {
        // A malformed event changes nothing on screen.
      }
    };
    const open = () => {
      source = new EventSource('/api/events');
      for (const kind of liveEventKinds) source.addEventListener(kind, onEvent);
      source.onerror = () => {
        // CONNECTING: the browser reconnects by itself. CLOSED: it gave up (an answer other than the stream).
        if (source?.readyState !== EventSource.CLOSED) return;
        source.close();
        reopen = setTimeout(open, REOPEN_AFTER_MS);
      };
    };
    open();
    return () => {
      clearTimeout(reopen);
      source?.close();
    };
  }, [qc, userId]);
}
