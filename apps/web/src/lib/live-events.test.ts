import { describe, expect, it } from 'vitest';
import type { QueryKey } from '@tanstack/react-query';
import type { LiveEvent } from '@coilpath/contract';
import { rosterKeys } from '@/features/roster/api';
import { applyLiveEvent, changedByOf, concerns } from './live-events';

const A = '00000000-0000-4000-8000-00000000000a';
const B = '00000000-0000-4000-8000-00000000000b';
const base = { id: 1, at: '2027-03-01T12:00:00.000Z', by: null };
const roster = (branchId: string, extra: Partial<LiveEvent> = {}) => ({ ...base, kind: 'roster', branchId, revision: 4, bookings: ['bk-1'], ...extra }) as LiveEvent;

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

const hit = (e: LiveEvent) => Object.entries(keys).filter(([, k]) => concerns(e, k)).map(([name]) => name);

describe('concerns: the queries each live event invalidates', () => {
  it('roster: the branch’s Roster queries and its unplaced queue, nothing of another branch or another screen', () => {
    expect(hit(roster(A))).toEqual(['bookingsA', 'loadA', 'techniciansA', 'unplacedA']);
  });

  it('visit: the branch’s bookings (the stop’s state on the chip) and that visit', () => {
    const e = { ...base, kind: 'visit', branchId: A, visitId: 'v-1', bookingId: 'bk-1', workOrderId: 'wo-1', techId: 't-1', state: 'on_site' } as LiveEvent;
    expect(hit(e)).toEqual(['bookingsA', 'visitV1']);
  });

  it('day: the technician’s Route on every date and their current visit', () => {
    expect(hit({ ...base, kind: 'day', branchId: A, techId: 't-1' } as LiveEvent)).toEqual(['dayToday', 'dayDate', 'currentVisit']);
  });

  it('alarm and leak-case: the Watchlist’s parts they feed, of that branch or of all branches', () => {
    expect(hit({ ...base, kind: 'alarm', branchId: A } as LiveEvent)).toEqual(['alarmsA', 'repeatA', 'sourcesAll']);
    expect(hit({ ...base, kind: 'leak-case', branchId: A } as LiveEvent)).toEqual(['leakA']);
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

describe('who changed a booking', () => {
  const ana = { id: 'u-ana', name: 'Ana Lindqvist' };
  const priya = { id: 'u-priya', name: 'Priya Venkatesh' };
  const none = () => undefined;

  it('is noted for a roster change by someone else, not for one’s own, and one’s own clears it', () => {
    applyLiveEvent(roster(A, { by: ana, bookings: ['bk-7', 'bk-8'] } as Partial<LiveEvent>), priya.id, none);
    expect(changedByOf('bk-7')).toBe('Ana Lindqvist');
    expect(changedByOf('bk-8')).toBe('Ana Lindqvist');
    applyLiveEvent(roster(A, { by: priya, bookings: ['bk-7'] } as Partial<LiveEvent>), priya.id, none);
    expect(changedByOf('bk-7')).toBeNull();
    expect(changedByOf('bk-8')).toBe('Ana Lindqvist');
  });

  it('is not noted without a person (a job, an import) or without the bookings named', () => {
    applyLiveEvent(roster(A, { by: null, bookings: ['bk-9'] } as Partial<LiveEvent>), priya.id, none);
    applyLiveEvent(roster(A, { by: ana, bookings: null } as Partial<LiveEvent>), priya.id, none);
    expect(changedByOf('bk-9')).toBeNull();
  });
});
