/** Answers of `/api/bookings`, `/api/roster` and `/api/work-orders` (the Roster): the contract's own schemas. */
import { z } from 'zod';
import {
  bookingListSchema,
  bookingSchema,
  evenOutApplyResultSchema,
  evenOutPreviewSchema,
  loadSchema,
  rosterSiteListSchema,
  suggestResultSchema,
  technicianListSchema,
} from '../roster';
import { workOrderListSchema, workOrderSchema } from '../work-orders';

export {
  bookingListSchema,
  evenOutApplyResultSchema,
  evenOutPreviewSchema,
  loadSchema,
  rosterSiteListSchema,
  suggestResultSchema,
  technicianListSchema,
  workOrderListSchema,
};
export const bookingAnswerSchema = z.object({ booking: bookingSchema });
export const workOrderAnswerSchema = z.object({ workOrder: workOrderSchema });
