/** Every query of the alarm sources: sources, their deliveries, the alarms they store, the repeat-alarm notices. */
import { and, desc, eq, gte, inArray, isNull, lte, ne, sql, type SQL } from 'drizzle-orm';
import type { Db, Tx } from '../../db/client';
import { alarmDeliveries, alarmSources, alarms, branches, repeatAlarmNotices, sites, units, users } from '../../db/schema';

type Q = Db | Tx;
export type SourceRecord = typeof alarmSources.$inferSelect;
export type DeliveryRecord = typeof alarmDeliveries.$inferSelect;
export type BranchRecord = typeof branches.$inferSelect;

export async function findSite(db: Q, siteId: string) {
  const [s] = await db
    .select({ id: sites.id, branchId: sites.branchId, name: sites.name, archivedAt: sites.archivedAt })
    .from(sites)
    .where(eq(sites.id, siteId))
    .limit(1);
  return s;
}

export async function findBranch(db: Q, branchId: string): Promise<BranchRecord | undefined> {
  const [b] = await db.select().from(branches).where(eq(branches.id, branchId)).limit(1);
  return b;
}

export async function insertSource(db: Q, values: typeof alarmSources.$inferInsert): Promise<SourceRecord> {
  const [s] = await db.insert(alarmSources).values(values).returning();
  return s!;
}

export async function findSource(db: Q, id: string): Promise<SourceRecord | undefined> {
  const [s] = await db.select().from(alarmSources).where(eq(alarmSources.id, id)).limit(1);
  return s;
}

export async function updateSource(db: Q, id: string, set: Partial<typeof alarmSources.$inferInsert>): Promise<SourceRecord> {
  const [s] = await db.update(alarmSources).set(set).where(eq(alarmSources.id, id)).returning();
  return s!;
}

/** Sources matching the branch filter, with their site's name and their branch's time zone. */
export async function listSources(db: Q, where: SQL | undefined) {
  return db
    .select({ source: alarmSources, siteName: sites.name, timeZone: branches.timeZone })
    .from(alarmSources)
    .innerJoin(sites, eq(sites.id, alarmSources.siteId))
    .innerJoin(branches, eq(branches.id, alarmSources.branchId))
    .where(where)
    .orderBy(sites.name, alarmSources.name);
}

/** Per source: the last signed delivery and the counts of signed and rejected requests since `since`. */
export async function deliveryStats(db: Q, sourceIds: string[], since: Date) {
  if (sourceIds.length === 0) return [];
  return db
    .select({
      sourceId: alarmDeliveries.sourceId,
      lastDeliveryAt: sql<Date | string | null>`max(${alarmDeliveries.receivedAt}) filter (where ${alarmDeliveries.status} <> 'rejected')`,
      signedSince: sql<number>`(count(*) filter (where ${alarmDeliveries.status} <> 'rejected' and ${alarmDeliveries.receivedAt} >= ${since.toISOString()}))::int`,
      rejectedSince: sql<number>`(count(*) filter (where ${alarmDeliveries.status} = 'rejected' and ${alarmDeliveries.receivedAt} >= ${since.toISOString()}))::int`,
    })
    .from(alarmDeliveries)
    .where(inArray(alarmDeliveries.sourceId, sourceIds))
    .groupBy(alarmDeliveries.sourceId);
}

export async function recentRejected(db: Q, sourceId: string, limit: number): Promise<DeliveryRecord[]> {
  return db
    .select()
    .from(alarmDeliveries)
    .where(and(eq(alarmDeliveries.sourceId, sourceId), eq(alarmDeliveries.status, 'rejected')))
    .orderBy(desc(alarmDeliveries.receivedAt))
    .limit(limit);
}

export async function unmatchedDeliveries(db: Q, sourceIds: string[]): Promise<DeliveryRecord[]> {
  if (sourceIds.length === 0) return [];
  return db
    .select()
    .from(alarmDeliveries)
    .where(and(inArray(alarmDeliveries.sourceId, sourceIds), eq(alarmDeliveries.status, 'unmatched')))
    .orderBy(desc(alarmDeliveries.receivedAt))
    .limit(500);
}

/** Records a refused request (never with its delivery id: a forged request must not hold a real one's id). */
export async function insertRejected(db: Q, v: { sourceId: string; branchId: string; reason: string; receivedAt: Date }) {
  await db.insert(alarmDeliveries).values({ ...v, status: 'rejected', deliveryId: null });
}

/** Stores a signed delivery once per (source, delivery id); undefined when that id was already received. */
export async function claimDelivery(db: Q, v: typeof alarmDeliveries.$inferInsert): Promise<string | undefined> {
  const [row] = await db
    .insert(alarmDeliveries)
    .values(v)
    .onConflictDoNothing({ target: [alarmDeliveries.sourceId, alarmDeliveries.deliveryId] })
    .returning({ id: alarmDeliveries.id });
  return row?.id;
}

export async function linkDeliveryAlarm(db: Q, deliveryId: string, alarmId: string) {
  await db.update(alarmDeliveries).set({ alarmId }).where(eq(alarmDeliveries.id, deliveryId));
}

/** Marks an unmatched delivery mapped; false when it no longer is unmatched (mapped meanwhile). */
export async function markMapped(db: Q, deliveryId: string, alarmId: string): Promise<boolean> {
  const rows = await db
    .update(alarmDeliveries)
    .set({ status: 'mapped', alarmId })
    .where(and(eq(alarmDeliveries.id, deliveryId), eq(alarmDeliveries.status, 'unmatched')))
    .returning({ id: alarmDeliveries.id });
  return rows.length === 1;
}

export async function findDelivery(db: Q, id: string) {
  const [d] = await db
    .select({ delivery: alarmDeliveries, siteId: alarmSources.siteId })
    .from(alarmDeliveries)
    .innerJoin(alarmSources, eq(alarmSources.id, alarmDeliveries.sourceId))
    .where(eq(alarmDeliveries.id, id))
    .limit(1);
  return d;
}

/** Units at a site whose tag is `tag` (compared without regard to case), not archived. */
export async function unitsByTag(db: Q, siteId: string, tag: string) {
  return db
    .select({ id: units.id, tag: units.tag })
    .from(units)
    .where(and(eq(units.siteId, siteId), isNull(units.archivedAt), sql`upper(${units.tag}) = upper(${tag})`));
}

export async function findUnit(db: Q, unitId: string) {
  const [u] = await db
    .select({ id: units.id, branchId: units.branchId, siteId: units.siteId, tag: units.tag, siteName: sites.name })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(eq(units.id, unitId))
    .limit(1);
  return u;
}

export async function insertAlarm(
  db: Q,
  v: { branchId: string; unitId: string; circuit: number | null; code: string; description: string | null; raisedAt: Date },
): Promise<string> {
  const [a] = await db
    .insert(alarms)
    .values({ ...v, source: 'controller' })
    .returning({ id: alarms.id });
  return a!.id;
}

/** A unit's alarms raised in [from, to]. */
export async function unitAlarms(db: Q, unitId: string, from: Date, to: Date) {
  return db
    .select({ unitId: alarms.unitId, circuit: alarms.circuit, code: alarms.code, raisedAt: alarms.raisedAt })
    .from(alarms)
    .where(and(eq(alarms.unitId, unitId), gte(alarms.raisedAt, from), lte(alarms.raisedAt, to)));
}

/** Claims the unit's repeat-alarm e-mail of a local day; false when it was already sent that day. */
export async function claimNotice(db: Q, v: typeof repeatAlarmNotices.$inferInsert): Promise<boolean> {
  const rows = await db.insert(repeatAlarmNotices).values(v).onConflictDoNothing().returning({ unitId: repeatAlarmNotices.unitId });
  return rows.length === 1;
}

export async function releaseNotice(db: Q, unitId: string, day: string) {
  await db.delete(repeatAlarmNotices).where(and(eq(repeatAlarmNotices.unitId, unitId), eq(repeatAlarmNotices.day, day)));
}

export async function branchManagers(db: Q, branchId: string) {
  return db
    .select({ email: users.email, name: users.name })
    .from(users)
    .where(and(eq(users.branchId, branchId), eq(users.role, 'branch_manager'), eq(users.active, true), ne(users.email, '')));
}
