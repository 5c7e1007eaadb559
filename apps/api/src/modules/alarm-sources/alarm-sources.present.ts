/** What the alarm-source routes answer: records turned into the contract's rows. */
import type { AlarmDeliveryRow, AlarmSourceRow } from '@coilpath/contract';
import type { DeliveryRecord, SourceRecord } from './alarm-sources.repo';

const iso = (d: Date | string | null | undefined): string | null => (d === null || d === undefined ? null : new Date(d).toISOString());

export function presentDelivery(d: DeliveryRecord): AlarmDeliveryRow {
  return {
    id: d.id,
    deliveryId: d.deliveryId,
    status: d.status,
    reason: (d.reason as AlarmDeliveryRow['reason']) ?? null,
    unitTag: d.unitTag,
    code: d.code,
    circuit: d.circuit,
    raisedAt: iso(d.raisedAt),
    message: d.message,
    receivedAt: d.receivedAt.toISOString(),
  };
}

export interface SourceHealth {
  lastDeliveryAt: Date | string | null;
  deliveriesToday: number;
  rejectedToday: number;
  recentRejected: DeliveryRecord[];
  unmatched: DeliveryRecord[];
}

export function presentSource(s: SourceRecord, siteName: string, health: SourceHealth, now: Date): AlarmSourceRow {
  const previousValid = s.previousValidUntil && s.previousValidUntil.getTime() > now.getTime() ? s.previousValidUntil : null;
  return {
    id: s.id,
    branchId: s.branchId,
    siteId: s.siteId,
    siteName,
    name: s.name,
    enabled: s.disabledAt === null,
    createdAt: s.createdAt.toISOString(),
    rotatedAt: iso(s.rotatedAt),
    previousValidUntil: iso(previousValid),
    lastDeliveryAt: iso(health.lastDeliveryAt),
    deliveriesToday: health.deliveriesToday,
    rejectedToday: health.rejectedToday,
    recentRejected: health.recentRejected.map(presentDelivery),
    unmatched: health.unmatched.map(presentDelivery),
  };
}
