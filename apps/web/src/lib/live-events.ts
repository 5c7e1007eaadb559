/**
 * The screens update themselves: one `EventSource` on `/api/events` per signed-in session (started by the app
 * frame), and each event invalidates exactly the queries it concerns (`concerns`). No polling; the browser
 * reconnects by itself and sends `Last-Event-ID`, and once the stream is back every live query is refetched, so
 * nothing is missed (`keepLiveStream`). Nothing is shown about the connection. A row someone else changed says
 * so for a minute ("Changed by Ana just now": `useChangedBy`, shown by `components/changed-by.tsx`).
 */
import { useEffect, useSyncExternalStore } from 'react';
import { useQueryClient, type QueryKey } from '@tanstack/react-query';
import { liveEventKinds, liveEventRows } from '@coilpath/contract/events';
import type { LiveEvent } from '@coilpath/contract';
import { appNowMs } from './now';

/** Query keys a branch-scoped screen uses: the branch's id, '' (none chosen yet) or 'all' (the owner's every branch). */
const sameBranch = (keyBranch: unknown, branchId: string) =>
  keyBranch === branchId || keyBranch === '' || keyBranch === 'all' || keyBranch === undefined;

const watchlistParts: Record<'roster' | 'alarm' | 'leak-case', readonly string[]> = {
  // Work orders and visits the Watchlist shows: a leak case's repair visit, the return visits to book, the
  // visits so far of a repeat-alarm unit.
  roster: ['leak-cases', 'return-visits', 'repeat-alarms'],
  alarm: ['alarms', 'repeat-alarms', 'alarm-sources'],
  'leak-case': ['leak-cases'],
};

/**
 * Whether a query (by its key) shows what `event` says changed. The keys are those of the features:
 * Roster `['roster', part, branchId, …]` and the unplaced queue `['work-orders', { branchId, … }]`;
 * Route `['day', date]` and the current visit `['visit', 'current']`; a visit `['visit', id]`;
 * Watchlist `['watchlist', branchId | 'all', part]` (its work orders change with the Roster).
 */
export function concerns(event: LiveEvent, key: QueryKey): boolean {
  const [root, second, third] = key;
  switch (event.kind) {
    case 'roster':
      if (root === 'roster') return sameBranch(third, event.branchId);
      if (root === 'work-orders') return sameBranch((second as { branchId?: string } | undefined)?.branchId, event.branchId);
      return root === 'watchlist' && sameBranch(second, event.branchId) && watchlistParts.roster.includes(third as string);
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

/** The roots of every query some event may concern: what a screen refetches after the stream was down. */
const liveRoots: readonly unknown[] = ['roster', 'work-orders', 'day', 'visit', 'watchlist'];

/** Whether a query shows anything live (after a reconnect it may have missed a change). */
export function isLiveQuery(key: QueryKey): boolean {
  return liveRoots.includes(key[0]);
}

/* ------------------------------------------------- "Changed by Ana just now" beside a changed row */

/**
 * The rows a screen marks: a Roster booking (board chips, calendar events), a work order (the unplaced queue,
 * the Watchlist's return visits), a unit (the Watchlist's repeat-alarm rows), a leak case. Only changes by
 * a person are marked; a change by a job, an import without a person or a controller (`by: null`) is not.
 */
export type ChangedRow = 'booking' | 'workOrder' | 'unit' | 'leakCase';

const rowsOfEvent: Record<keyof ReturnType<typeof liveEventRows>, ChangedRow> = {
  bookings: 'booking',
  workOrders: 'workOrder',
  units: 'unit',
  leakCases: 'leakCase',
};

/** How long a row says who changed it, by the app's clock (`appNow()`). */
export const CHANGED_BY_MS = 60_000;

/** Who changed each row and when (the app's clock, ms). */
const changedBy = new Map<string, { name: string; at: number }>();
const changeListeners = new Set<() => void>();
const emitChange = () => changeListeners.forEach((l) => l());
const rowKey = (row: ChangedRow, id: string) => `${row}:${id}`;

/** One's own change of these rows: whoever changed them before is no longer news. */
function clearChangedBy(row: ChangedRow, ids: readonly string[]): void {
  let any = false;
  for (const id of ids) any = changedBy.delete(rowKey(row, id)) || any;
  if (any) emitChange();
}

/** Forgets the notes older than `CHANGED_BY_MS` at `now`. */
function forgetOld(now: number): void {
  for (const [k, n] of changedBy) if (now - n.at >= CHANGED_BY_MS) changedBy.delete(k);
}

/**
 * Notes that these rows were changed by `name` (someone else) at `at` (the app's clock). The note fades after
 * `CHANGED_BY_MS` by that clock; a timer only asks the screens to look again then.
 */
export function noteChangedBy(row: ChangedRow, ids: readonly string[], name: string, at: number = appNowMs()): void {
  for (const id of ids) changedBy.set(rowKey(row, id), { name, at });
  emitChange();
  setTimeout(() => {
    forgetOld(appNowMs());
    emitChange();
  }, CHANGED_BY_MS);
}

/** Who else changed this row within `CHANGED_BY_MS` before `now` (full name), or null. */
export function changedByOf(row: ChangedRow, id: string, now: number = appNowMs()): string | null {
  const n = changedBy.get(rowKey(row, id));
  return n && now - n.at < CHANGED_BY_MS ? n.name : null;
}

const subscribe = (listener: () => void) => {
  changeListeners.add(listener);
  return () => void changeListeners.delete(listener);
};

/** The name of whoever else just changed this row, or null (said with `changedByLabel`, see `ChangedByNote`). */
export function useChangedBy(row: ChangedRow, id: string): string | null {
  const snapshot = () => changedByOf(row, id);
  // The same outside a browser: tests render screens to a string.
  return useSyncExternalStore(subscribe, snapshot, snapshot);
}

/* ------------------------------------------------- the stream */

/**
 * What an event does on this screen: invalidate its queries; a change by someone else marks the rows it names
 * ("Changed by Ana just now"), one's own clears their marks.
 */
export function applyLiveEvent(event: LiveEvent, myId: string, invalidate: (predicate: (key: QueryKey) => boolean) => void): void {
  invalidate((key) => concerns(event, key));
  if (!event.by) return;
  const rows = liveEventRows(event);
  for (const [what, row] of Object.entries(rowsOfEvent) as [keyof typeof rowsOfEvent, ChangedRow][]) {
    const ids = rows[what];
    if (!ids?.length) continue;
    if (event.by.id === myId) clearChangedBy(row, ids);
    else noteChangedBy(row, ids, event.by.name);
  }
}

/** After the server refused the stream (signed out, or the server was away too long), try again this much later. */
export const REOPEN_AFTER_MS = 30_000;

/** What the stream needs of the browser's `EventSource` (a stand-in in tests). */
export interface LiveSource {
  readonly readyState: number;
  onopen: ((ev: Event) => unknown) | null;
  onerror: ((ev: Event) => unknown) | null;
  addEventListener(type: string, listener: (m: MessageEvent<string>) => void): void;
  close(): void;
}

/** `EventSource.CLOSED`: the browser gave up reconnecting. */
const CLOSED = 2;

/**
 * Keeps one stream open: each event goes through `applyLiveEvent`. The browser reconnects by itself and sends
 * `Last-Event-ID`; when it gives up (an answer other than the stream) the stream is opened again after
 * `REOPEN_AFTER_MS`, without an id. Either way, once the stream is back after being down, every live query is
 * refetched (`isLiveQuery`): whatever changed while it was down (or longer ago than the server replays) shows.
 * Answers a function that closes it.
 */
export function keepLiveStream(opts: {
  open: () => LiveSource;
  userId: string;
  invalidate: (predicate: (key: QueryKey) => boolean) => void;
  setTimer?: (run: () => void, ms: number) => unknown;
  clearTimer?: (handle: unknown) => void;
}): () => void {
  const setTimer = opts.setTimer ?? ((run, ms) => setTimeout(run, ms));
  const clearTimer = opts.clearTimer ?? ((h) => clearTimeout(h as ReturnType<typeof setTimeout>));
  let source: LiveSource | null = null;
  let reopen: unknown;
  let wasDown = false;
  const onEvent = (m: MessageEvent<string>) => {
    try {
      applyLiveEvent(JSON.parse(m.data) as LiveEvent, opts.userId, opts.invalidate);
    } catch {
      // A malformed event changes nothing on screen.
    }
  };
  const open = () => {
    const s = opts.open();
    source = s;
    for (const kind of liveEventKinds) s.addEventListener(kind, onEvent);
    s.onopen = () => {
      if (wasDown) opts.invalidate(isLiveQuery);
      wasDown = false;
    };
    s.onerror = () => {
      wasDown = true;
      // CONNECTING: the browser reconnects by itself. CLOSED: it gave up.
      if (s.readyState !== CLOSED) return;
      s.close();
      reopen = setTimer(open, REOPEN_AFTER_MS);
    };
  };
  open();
  return () => {
    clearTimer(reopen);
    source?.close();
  };
}

/** Opens the session's one stream while the signed-in frame is shown. */
export function useLiveEvents(userId: string): void {
  const qc = useQueryClient();
  useEffect(() => {
    if (typeof EventSource === 'undefined') return;
    return keepLiveStream({
      open: () => new EventSource('/api/events'),
      userId,
      invalidate: (predicate) => void qc.invalidateQueries({ predicate: (q) => predicate(q.queryKey) }),
    });
  }, [qc, userId]);
}
