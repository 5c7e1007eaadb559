import type { Role } from './vocabulary';

/**
 * What `GET /api/events` (Server-Sent Events) sends: one `event:` per change a screen shows, its `id:` the
 * row of `live_events`, its `data:` a `LiveEvent` as JSON. A reconnecting screen sends the last id it got as
 * `Last-Event-ID` and first receives what it missed.
 */
export const liveEventKinds = ['roster', 'day', 'visit', 'alarm', 'leak-case'] as const;
export type LiveEventKind = (typeof liveEventKinds)[number];

/**
 * Who hears which kind, within their branches (the owner: every branch): the Roster's people hear `roster` and
 * `visit`; the Watchlist's people also `alarm` and `leak-case`; a technician hears `day`, and only their own.
 */
export function liveKindsFor(role: Role): readonly LiveEventKind[] {
  switch (role) {
    case 'technician':
      return ['day'];
    case 'dispatcher':
      return ['roster', 'visit'];
    case 'branch_manager':
    case 'owner':
      return ['roster', 'visit', 'alarm', 'leak-case'];
  }
}

/** Who made the change: the signed-in person whose request made it; null when no person did (a job, a controller). */
export type LiveActor = { id: string; name: string } | null;

interface LiveEventBase {
  id: number;
  branchId: string;
  /** ISO-8601 instant the row was written. */
  at: string;
  by: LiveActor;
}

export type LiveEvent =
  | (LiveEventBase & {
      kind: 'roster';
      /** The branch's roster revision after the change. */
      revision: number;
      /** The bookings the change touched; null when many (more than 50). */
      bookings: string[] | null;
      /** The work orders the change touched (the unplaced queue, return visits); null when many. */
      workOrders: string[] | null;
    })
  | (LiveEventBase & { kind: 'day'; techId: string })
  | (LiveEventBase & {
      kind: 'visit';
      visitId: string;
      bookingId: string | null;
      workOrderId: string;
      techId: string;
      state: 'booked' | 'en_route' | 'on_site' | 'closed';
    })
  | (LiveEventBase & {
      kind: 'alarm';
      /** The units whose alarms the change touched (the Watchlist's repeat-alarm rows); null when many. */
      units: string[] | null;
    })
  | (LiveEventBase & {
      kind: 'leak-case';
      /** The leak cases the change touched; null when many. */
      leakCases: string[] | null;
    });

/** The rows an event names, by what they are (absent: it names none of that kind; null: many). */
export function liveEventRows(e: LiveEvent): {
  bookings?: string[] | null;
  workOrders?: string[] | null;
  units?: string[] | null;
  leakCases?: string[] | null;
} {
  switch (e.kind) {
    case 'roster':
      return { bookings: e.bookings, workOrders: e.workOrders };
    case 'alarm':
      return { units: e.units };
    case 'leak-case':
      return { leakCases: e.leakCases };
    default:
      return {};
  }
}

/** "Ana" of "Ana Pereira": how a screen names who made a change. */
export function firstName(name: string): string {
  return name.trim().split(/\s+/)[0] ?? name;
}

/** What a chip or row says after someone else changed it (changes by a job or a controller say nothing). */
export function changedByLabel(name: string): string {
  return `Changed by ${firstName(name)} just now`;
}
