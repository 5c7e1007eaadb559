import { z } from 'zod';
import { isoDateSchema } from './common';
import type { Priority, UnitKind, VisitOutcome, WorkOrderKind, WorkOrderState } from './vocabulary';
import type { VisitStatus } from './visit-status';

/** GET /api/day?date — the date defaults to today in the technician's branch time zone. */
export const dayQuerySchema = z.object({ date: isoDateSchema.optional() });
export type DayQuery = z.infer<typeof dayQuerySchema>;

export interface DayStop {
  visitId: string;
  status: VisitStatus;
  enRouteAt: string | null;
  onSiteAt: string | null;
  closedAt: string | null;
  outcome: VisitOutcome | null;
  booking: { id: string; startAt: string; endAt: string; fixed: boolean };
  workOrder: {
    id: string;
    number: number | null;
    kind: WorkOrderKind;
    state: WorkOrderState;
    priority: Priority;
    complaint: string;
    estimatedMinutes: number;
    requestedFrom: string | null;
    requestedTo: string | null;
  };
  site: {
    id: string;
    name: string;
    address: string;
    city: string;
    lat: number;
    lon: number;
    accessNotes: string | null;
    contactName: string | null;
    contactPhone: string | null;
  };
  units: { id: string; tag: string; kind: UnitKind; make: string; model: string; refrigerant: string }[];
  /** The stop as `planRoute` sees it: minutes after `route.dayStart`. */
  routeStop: { id: string; lat: number; lon: number; serviceMinutes: number; window?: { from: number; to: number } };
}

export interface DayRouteArrival {
  id: string;
  arrive: number;
  depart: number;
  waitMinutes: number;
  lateMinutes: number;
  arriveAt: string;
  departAt: string;
  /** Drive minutes of the leg that reaches this stop. */
  legMinutes: number;
}

export interface DayRoute {
  start: { lat: number; lon: number; label: string };
  /** When the day starts (the technician's working hours, else 07:00 local). */
  dayStart: string;
  order: string[];
  arrivals: DayRouteArrival[];
  totalMiles: number;
  driveMinutes: number;
  lateStops: string[];
}

export interface DayResponse {
  date: string;
  /** The technician's next working day after `date` (their working hours; Monday to Friday when none are set): the phone keeps its route too. */
  nextWorkingDate: string;
  timeZone: string;
  branch: { id: string; name: string };
  tech: { id: string; name: string };
  stops: DayStop[];
  /** Route in the suggested order (appointment windows respected). */
  route: DayRoute;
  calendarFeed: { active: boolean; url: string | null };
}

export interface CalendarTokenResult {
  url: string;
}
