/**
 * Alarm sources: a building controller at a site that posts alarms to Coilpath over HTTP, each request
 * signed with the source's secret (HMAC-SHA256). The format is documented in README.md ("Alarm sources").
 */
import { z } from 'zod';
import { idSchema, instantSchema, limits, pickedIdSchema } from './common';
import type { AlarmDeliveryStatus, AlarmRejectionReason } from './vocabulary';
import { alarmCodeSchema, circuitNumberSchema } from './watchlist';

/** Header carrying the request's Unix time in seconds. */
export const ALARM_TIMESTAMP_HEADER = 'X-Coilpath-Timestamp';
/** Header carrying `sha256=<hex>`: HMAC-SHA256 with the secret over `<timestamp>.<raw body>`. */
export const ALARM_SIGNATURE_HEADER = 'X-Coilpath-Signature';
/** A timestamp further than this from the server's clock is refused (replay window). */
export const ALARM_MAX_SKEW_SECONDS = 300;
/** After a rotation the previous secret is accepted this long. */
export const ALARM_PREVIOUS_SECRET_HOURS = 24;
/** Largest body an alarm source may send. */
export const ALARM_BODY_LIMIT_BYTES = 16 * 1024;

export const alarmSourceNameSchema = z.string().trim().min(1, 'Name the controller, e.g. "Roof BMS"').max(limits.name);

export const alarmSourceCreateSchema = z.strictObject({
  siteId: pickedIdSchema('a site'),
  name: alarmSourceNameSchema,
});
export type AlarmSourceCreate = z.input<typeof alarmSourceCreateSchema>;

export const alarmSourcePatchSchema = z
  .strictObject({
    name: alarmSourceNameSchema.optional(),
    enabled: z.boolean().optional(),
  })
  .refine((p) => p.name !== undefined || p.enabled !== undefined, { message: 'Change the name or enable/disable the source' });
export type AlarmSourcePatch = z.input<typeof alarmSourcePatchSchema>;

export const alarmSourceListQuerySchema = z.object({ branchId: idSchema.optional() });

export const mapDeliverySchema = z.strictObject({ unitId: pickedIdSchema('a unit') });
export type MapDelivery = z.input<typeof mapDeliverySchema>;

/** The JSON a controller posts (unknown fields are ignored, so a controller may send more). */
export const alarmDeliverySchema = z.object({
  deliveryId: z.string().trim().min(1, 'deliveryId is required').max(200),
  unitTag: z.string().trim().min(1, 'unitTag is required').max(60),
  code: alarmCodeSchema,
  circuit: circuitNumberSchema.nullable().optional(),
  raisedAt: instantSchema,
  message: z
    .string()
    .trim()
    .max(limits.shortText * 5)
    .optional(),
});
export type AlarmDelivery = z.input<typeof alarmDeliverySchema>;

/** `201` of a new source and `200` of a rotation: the secret, shown this once. */
export interface AlarmSourceSecret {
  id: string;
  secret: string;
  /** After a rotation: the previous secret is accepted until then. */
  previousValidUntil: string | null;
}

export interface AlarmDeliveryRow {
  id: string;
  deliveryId: string | null;
  status: AlarmDeliveryStatus;
  reason: AlarmRejectionReason | 'unknown_unit' | 'ambiguous_unit' | null;
  unitTag: string | null;
  code: string | null;
  circuit: number | null;
  raisedAt: string | null;
  message: string | null;
  receivedAt: string;
}

export interface AlarmSourceRow {
  id: string;
  branchId: string;
  siteId: string;
  siteName: string;
  name: string;
  enabled: boolean;
  createdAt: string;
  rotatedAt: string | null;
  previousValidUntil: string | null;
  /** The last signed delivery (accepted, unmatched or mapped), if any. */
  lastDeliveryAt: string | null;
  /** Signed deliveries received since midnight in the branch's time zone. */
  deliveriesToday: number;
  rejectedToday: number;
  /** The latest rejected requests, newest first (at most 5). */
  recentRejected: AlarmDeliveryRow[];
  /** Signed deliveries whose unit tag matched no unit at the site: a manager maps them. */
  unmatched: AlarmDeliveryRow[];
}

export interface AlarmSourceList {
  sources: AlarmSourceRow[];
}
