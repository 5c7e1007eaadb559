/** Test factories for booked visits (kept beside the module so shared fixtures stay untouched). */
import type { Db } from '../../db/client';
import { bookings, visits, workOrders } from '../../db/schema';

export async function makeBookedVisit(
  db: Db,
  v: {
    branchId: string;
    siteId: string;
    unitId?: string | null;
    techId: string;
    startAt: string;
    minutes?: number;
    fixed?: boolean;
    /** The technician is on site (en route and on site at the booked start): readings, findings and refrigerant may be recorded. */
    onSite?: boolean;
    workOrder?: Partial<typeof workOrders.$inferInsert>;
  },
) {
  const minutes = v.minutes ?? 90;
  const [wo] = await db
    .insert(workOrders)
    .values({
      branchId: v.branchId,
      siteId: v.siteId,
      unitId: v.unitId ?? null,
      kind: 'service_call',
      state: v.onSite ? 'on_site' : 'booked',
      complaint: 'Low suction alarm on circuit 1',
      estimatedMinutes: minutes,
      ...v.workOrder,
    })
    .returning();
  const startAt = new Date(v.startAt);
  const [b] = await db
    .insert(bookings)
    .values({
      branchId: v.branchId,
      workOrderId: wo!.id,
      techId: v.techId,
      startAt,
      endAt: new Date(startAt.getTime() + minutes * 60_000),
      fixed: v.fixed ?? false,
    })
    .returning();
  const [visit] = await db
    .insert(visits)
    .values({
      branchId: v.branchId,
      workOrderId: wo!.id,
      bookingId: b!.id,
      techId: v.techId,
      ...(v.onSite ? { enRouteAt: startAt, onSiteAt: startAt } : {}),
    })
    .returning();
  return { workOrder: wo!, booking: b!, visit: visit! };
}

/** A 1×1 PNG (valid signature and chunks). */
export const tinyPng = Buffer.from(
  'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==',
  'base64',
);

/** The smallest PDF file-type recognises (signature + header). */
export const tinyPdf = Buffer.from('%PDF-1.4\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n');

/** The close-out's sign-off when the test is not about it: the customer was not available to sign. */
export const NOT_AVAILABLE = { kind: 'customer_not_available' } as const;
