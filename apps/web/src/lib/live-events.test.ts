import { describe, expect, it, vi } from 'vitest';
import type { QueryKey } from '@tanstack/react-query';
import type { LiveEvent } from '@coilpath/contract';
import { rosterKeys } from '@/features/roster/api';
import {
  applyLiveEvent,
  CHANGED_BY_MS,
  changedByOf,
  concerns,
  isLiveQuery,
  keepLiveStream,
  noteChangedBy,
  REOPEN_AFTER_MS,
  type LiveSource,
} from './live-events';
import { appNowMs, noteServerNow } from './now';

const A = '00000000-0000-4000-8000-00000000000a';
const B = '00000000-0000-4000-8000-00000000000b';
const base = { id: 1, at: '2027-03-01T12:00:00.000Z', by: null };
const roster = (branchId: string, extra: Partial<LiveEvent> = {}) =>
  ({ ...base, kind: 'roster', branchId, revision: 4, bookings: ['bk-1'], workOrders: [], ...extra }) as LiveEvent;

/** The keys the screens use (from the features where they are exported, as written there otherwise). */
const keys = {
  bookingsA: rosterKeys.bookings(A, '2027-03-01', '2027-03-08'),
  loadA: rosterKeys.load(A, '2027-03-01', '2027-03-07'),
  techniciansA: rosterKeys.technicians(A),
  unplacedA: rosterKeys.unplaced(A),
  bookingsB: rosterKeys.bookings(B, '2027-03-01', '2027-03-08'),
  unplacedB: rosterKeys.unplaced(B),
  dayToday: ['day', 'today'],
  dayDate: ['day', '2027-03-02'],
  currentVisit: ['visit', 'current'],
  visitV1: ['visit', 'v-1'],
  visitV2: ['visit', 'v-2'],
  alarmsA: ['watchlist', A, 'alarms'],
  repeatA: ['watchlist', A, 'repeat-alarms'],
  sourcesAll: ['watchlist', 'all', 'alarm-sources'],
  leakA: ['watchlist', A, 'leak-cases'],
  leakB: ['watchlist', B, 'leak-cases'],
  returnVisitsA: ['watchlist', A, 'return-visits'],
  session: ['session'],
} satisfies Record<string, QueryKey>;

const hit = (e: LiveEvent) =>
  Object.entries(keys)
    .filter(([, k]) => concerns(e, k))
    .map(([name]) => name);

describe('concerns: the queries each live event invalidates', () => {
  it('roster: the branch’s Roster queries, its unplaced queue and the Watchlist parts showing work orders, nothing of another branch or screen', () => {
    expect(hit(roster(A))).toEqual(['bookingsA', 'loadA', 'techniciansA', 'unplacedA', 'repeatA', 'leakA', 'returnVisitsA']);
  });

  it('visit: the branch’s bookings (the stop’s state on the chip) and that visit', () => {
    const e = {
      ...base,
      kind: 'visit',
      branchId: A,
      visitId: 'v-1',
      bookingId: 'bk-1',
      workOrderId: 'wo-1',
      techId: 't-1',
      state: 'on_site',
    } as LiveEvent;
    expect(hit(e)).toEqual(['bookingsA', 'visitV1']);
  });

  it('day: the technician’s Route on every date and their current visit', () => {
    expect(hit({ ...base, kind: 'day', branchId: A, techId: 't-1' } as LiveEvent)).toEqual(['dayToday', 'dayDate', 'currentVisit']);
  });

  it('alarm and leak-case: the Watchlist’s parts they feed, of that branch or of all branches', () => {
    expect(hit({ ...base, kind: 'alarm', branchId: A, units: [] } as LiveEvent)).toEqual(['alarmsA', 'repeatA', 'sourcesAll']);
    expect(hit({ ...base, kind: 'leak-case', branchId: A, leakCases: [] } as LiveEvent)).toEqual(['leakA']);
  });
});

describe('applyLiveEvent', () => {
  it('invalidates with the event’s predicate', () => {
    const predicates: ((k: QueryKey) => boolean)[] = [];
    applyLiveEvent(roster(B), 'me', (p) => predicates.push(p));
    expect(predicates).toHaveLength(1);
    expect(predicates[0]!(keys.bookingsB)).toBe(true);
    expect(predicates[0]!(keys.bookingsA)).toBe(false);
  });
});

describe('who changed a row', () => {
  const ana = { id: 'u-ana', name: 'Ana Lindqvist' };
  const priya = { id: 'u-priya', name: 'Priya Venkatesh' };
  const none = () => undefined;

  it('is noted for a roster change by someone else, not for one’s own, and one’s own clears it', () => {
    applyLiveEvent(roster(A, { by: ana, bookings: ['bk-7', 'bk-8'] } as Partial<LiveEvent>), priya.id, none);
    expect(changedByOf('booking', 'bk-7')).toBe('Ana Lindqvist');
    expect(changedByOf('booking', 'bk-8')).toBe('Ana Lindqvist');
    applyLiveEvent(roster(A, { by: priya, bookings: ['bk-7'] } as Partial<LiveEvent>), priya.id, none);
    expect(changedByOf('booking', 'bk-7')).toBeNull();
    expect(changedByOf('booking', 'bk-8')).toBe('Ana Lindqvist');
  });

  it('marks the work orders, units and leak cases an event names, each as its own kind of row', () => {
    applyLiveEvent(roster(A, { by: ana, bookings: [], workOrders: ['wo-1'] } as Partial<LiveEvent>), priya.id, none);
    applyLiveEvent({ ...base, kind: 'alarm', branchId: A, by: ana, units: ['unit-1'] } as LiveEvent, priya.id, none);
    applyLiveEvent({ ...base, kind: 'leak-case', branchId: A, by: priya, leakCases: ['lc-1'] } as LiveEvent, ana.id, none);
    expect(changedByOf('workOrder', 'wo-1')).toBe('Ana Lindqvist');
    expect(changedByOf('unit', 'unit-1')).toBe('Ana Lindqvist');
    expect(changedByOf('leakCase', 'lc-1')).toBe('Priya Venkatesh');
    expect(changedByOf('booking', 'wo-1')).toBeNull();
    expect(changedByOf('workOrder', 'unit-1')).toBeNull();
  });

  it('is not noted without a person (a job, an import by no one, a controller) or without the rows named', () => {
    applyLiveEvent(roster(A, { by: null, bookings: ['bk-9'], workOrders: ['wo-9'] } as Partial<LiveEvent>), priya.id, none);
    applyLiveEvent({ ...base, kind: 'alarm', branchId: A, by: null, units: ['unit-9'] } as LiveEvent, priya.id, none);
    applyLiveEvent(roster(A, { by: ana, bookings: null, workOrders: null } as Partial<LiveEvent>), priya.id, none);
    expect(changedByOf('booking', 'bk-9')).toBeNull();
    expect(changedByOf('workOrder', 'wo-9')).toBeNull();
    expect(changedByOf('unit', 'unit-9')).toBeNull();
  });

  it('fades after CHANGED_BY_MS by the app’s clock', () => {
    const at = Date.UTC(2027, 2, 1, 12);
    noteChangedBy('booking', ['bk-f'], ana.name, at);
    expect(changedByOf('booking', 'bk-f', at + CHANGED_BY_MS - 1)).toBe('Ana Lindqvist');
    expect(changedByOf('booking', 'bk-f', at + CHANGED_BY_MS)).toBeNull();
    // Noted now: gone once the app's clock (the server's, appNow) is a minute on.
    noteChangedBy('booking', ['bk-g'], ana.name);
    expect(changedByOf('booking', 'bk-g')).toBe('Ana Lindqvist');
    const browser = Date.now();
    noteServerNow(new Date(appNowMs() + CHANGED_BY_MS + 1000).toISOString(), browser);
    try {
      expect(changedByOf('booking', 'bk-g')).toBeNull();
    } finally {
      noteServerNow(new Date(browser).toISOString(), browser);
    }
  });
});

describe('keepLiveStream: the stream, its drops and reconnects', () => {
  /** A stand-in EventSource: the test says when it opens, fails or sends. */
  class FakeSource implements LiveSource {
    readyState = 0;
    onopen: ((ev: Event) => unknown) | null = null;
    onerror: ((ev: Event) => unknown) | null = null;
    closed = false;
    listeners = new Map<string, (m: MessageEvent<string>) => void>();
    addEventListener(type: string, listener: (m: MessageEvent<string>) => void) {
      this.listeners.set(type, listener);
    }
    close() {
      this.closed = true;
      this.readyState = 2;
    }
    opened() {
      this.readyState = 1;
      this.onopen?.(new Event('open'));
    }
    dropped(gaveUp: boolean) {
      this.readyState = gaveUp ? 2 : 0;
      this.onerror?.(new Event('error'));
    }
    send(e: LiveEvent) {
      this.listeners.get(e.kind)?.({ data: JSON.stringify(e) } as MessageEvent<string>);
    }
  }

  function setup() {
    const sources: FakeSource[] = [];
    const timers: { run: () => void; ms: number }[] = [];
    const invalidated: ((k: QueryKey) => boolean)[] = [];
    const close = keepLiveStream({
      open: () => {
        const s = new FakeSource();
        sources.push(s);
        return s;
      },
      userId: 'me',
      invalidate: (p) => invalidated.push(p),
      setTimer: (run, ms) => timers.push({ run, ms }),
      clearTimer: vi.fn(),
    });
    return { sources, timers, invalidated, close };
  }

  it('applies each event; the first open refetches nothing', () => {
    const { sources, invalidated } = setup();
    sources[0]!.opened();
    expect(invalidated).toEqual([]);
    sources[0]!.send(roster(A));
    expect(invalidated).toHaveLength(1);
    expect(invalidated[0]!(keys.bookingsA)).toBe(true);
    expect(invalidated[0]!(keys.bookingsB)).toBe(false);
  });

  it('after the browser reconnects by itself, refetches every live query (and nothing else)', () => {
    const { sources, invalidated, timers } = setup();
    sources[0]!.opened();
    sources[0]!.dropped(false);
    expect(timers).toEqual([]);
    expect(invalidated).toEqual([]);
    sources[0]!.opened();
    expect(invalidated).toHaveLength(1);
    const refetched = Object.entries(keys)
      .filter(([, k]) => invalidated[0]!(k))
      .map(([n]) => n);
    expect(refetched).toEqual(Object.keys(keys).filter((n) => n !== 'session'));
    expect(isLiveQuery(keys.session)).toBe(false);
    sources[0]!.opened();
    expect(invalidated).toHaveLength(1);
  });

  it('when the browser gives up, opens a new stream after REOPEN_AFTER_MS and refetches once it is open', () => {
    const { sources, invalidated, timers, close } = setup();
    sources[0]!.opened();
    sources[0]!.dropped(true);
    expect(sources[0]!.closed).toBe(true);
    expect(timers.map((t) => t.ms)).toEqual([REOPEN_AFTER_MS]);
    expect(sources).toHaveLength(1);
    timers[0]!.run();
    expect(sources).toHaveLength(2);
    expect(invalidated).toEqual([]);
    sources[1]!.opened();
    expect(invalidated).toHaveLength(1);
    expect(invalidated[0]!(keys.dayToday)).toBe(true);
    close();
    expect(sources[1]!.closed).toBe(true);
  });
});
