/** Answers of `/api/alarm-sources` (controllers that send alarms), tied to `../alarm-sources`. */
import { z } from 'zod';
import type { AlarmDeliveryRow, AlarmSourceList, AlarmSourceRow, AlarmSourceSecret } from '../alarm-sources';
import { alarmRejectionReasons } from '../vocabulary';
import { alarmDeliveryStatusSchema } from '../vocabulary-schemas';
import type { Agree, AllAgree } from './agree';

export const alarmSourceSecretSchema = z.object({ id: z.string(), secret: z.string(), previousValidUntil: z.string().nullable() });

export const alarmDeliveryRowSchema = z.object({
  id: z.string(),
  deliveryId: z.string().nullable(),
  status: alarmDeliveryStatusSchema,
  reason: z.enum([...alarmRejectionReasons, 'unknown_unit', 'ambiguous_unit']).nullable(),
  unitTag: z.string().nullable(),
  code: z.string().nullable(),
  circuit: z.number().nullable(),
  raisedAt: z.string().nullable(),
  message: z.string().nullable(),
  receivedAt: z.string(),
});

export const alarmSourceRowSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  siteId: z.string(),
  siteName: z.string(),
  name: z.string(),
  enabled: z.boolean(),
  createdAt: z.string(),
  rotatedAt: z.string().nullable(),
  previousValidUntil: z.string().nullable(),
  lastDeliveryAt: z.string().nullable(),
  deliveriesToday: z.number(),
  rejectedToday: z.number(),
  recentRejected: z.array(alarmDeliveryRowSchema),
  unmatched: z.array(alarmDeliveryRowSchema),
});

export const alarmSourceListSchema = z.object({ sources: z.array(alarmSourceRowSchema) });
export const alarmSourceAnswerSchema = z.object({ source: alarmSourceRowSchema });
export const mappedDeliveryAnswerSchema = z.object({ delivery: alarmDeliveryRowSchema, alarmId: z.string() });

export type AlarmSourcesChecks = AllAgree<
  [
    Agree<AlarmSourceSecret, typeof alarmSourceSecretSchema>,
    Agree<AlarmDeliveryRow, typeof alarmDeliveryRowSchema>,
    Agree<AlarmSourceRow, typeof alarmSourceRowSchema>,
    Agree<AlarmSourceList, typeof alarmSourceListSchema>,
  ]
>;
