/** Answers of `/api/day` and `/api/calendar` (the technician's Route). */
import { z } from 'zod';
import type { CalendarTokenResult, DayResponse, DayRoute, DayStop } from '../day';
import type { Agree, AllAgree } from './agree';
import { prioritySchema, unitKindSchema, visitOutcomeSchema, workOrderKindSchema, workOrderStateSchema } from '../vocabulary-schemas';

export const dayRouteArrivalSchema = z.object({
  id: z.string(),
  arrive: z.number(),
  depart: z.number(),
  waitMinutes: z.number(),
  lateMinutes: z.number(),
  arriveAt: z.string(),
  departAt: z.string(),
  legMinutes: z.number(),
});

export const dayRouteSchema = z.object({
  start: z.object({
    lat: z.number(),
    lon: z.number(),
    label: z.string(),
  }),
  dayStart: z.string(),
  order: z.array(z.string()),
  arrivals: z.array(dayRouteArrivalSchema),
  totalMiles: z.number(),
  driveMinutes: z.number(),
  lateStops: z.array(z.string()),
});

export const calendarTokenResultSchema = z.object({
  url: z.string(),
});

const visitStatusSchema = z.enum(['booked', 'en_route', 'on_site', 'closed']);

export const dayStopSchema = z.object({
  visitId: z.string(),
  status: visitStatusSchema,
  enRouteAt: z.string().nullable(),
  onSiteAt: z.string().nullable(),
  closedAt: z.string().nullable(),
  outcome: visitOutcomeSchema.nullable(),
  booking: z.object({
    id: z.string(),
    startAt: z.string(),
    endAt: z.string(),
    fixed: z.boolean(),
  }),
  workOrder: z.object({
    id: z.string(),
    number: z.number().nullable(),
    kind: workOrderKindSchema,
    state: workOrderStateSchema,
    priority: prioritySchema,
    complaint: z.string(),
    estimatedMinutes: z.number(),
    requestedFrom: z.string().nullable(),
    requestedTo: z.string().nullable(),
  }),
  site: z.object({
    id: z.string(),
    name: z.string(),
    address: z.string(),
    city: z.string(),
    lat: z.number(),
    lon: z.number(),
    accessNotes: z.string().nullable(),
    contactName: z.string().nullable(),
    contactPhone: z.string().nullable(),
  }),
  units: z.array(
    z.object({
      id: z.string(),
      tag: z.string(),
      kind: unitKindSchema,
      make: z.string(),
      model: z.string(),
      refrigerant: z.string(),
    }),
  ),
  routeStop: z.object({
    id: z.string(),
    lat: z.number(),
    lon: z.number(),
    serviceMinutes: z.number(),
    window: z
      .object({
        from: z.number(),
        to: z.number(),
      })
      .optional(),
  }),
});

export const dayResponseSchema = z.object({
  date: z.string(),
  nextWorkingDate: z.string(),
  timeZone: z.string(),
  branch: z.object({
    id: z.string(),
    name: z.string(),
  }),
  tech: z.object({
    id: z.string(),
    name: z.string(),
  }),
  stops: z.array(dayStopSchema),
  route: dayRouteSchema,
  calendarFeed: z.object({
    active: z.boolean(),
    url: z.string().nullable(),
  }),
});

export type DayChecks = AllAgree<
  [
    Agree<DayStop, typeof dayStopSchema>,
    Agree<DayRoute, typeof dayRouteSchema>,
    Agree<DayResponse, typeof dayResponseSchema>,
    Agree<CalendarTokenResult, typeof calendarTokenResultSchema>,
  ]
>;
