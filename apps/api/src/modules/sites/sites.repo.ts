/** Every query of customers and sites, and of the history that keeps them from being deleted (history.ts). */
import { and, count, eq, inArray, isNotNull, isNull, sql, type SQL } from 'drizzle-orm';
import type { z } from 'zod';
import type { HistoryCounts, RecordStatus, customersQuerySchema, sitesQuerySchema } from '@coilpath/contract';
import type { Tx } from '../../db/client';
import {
  agreements,
  agreementUnits,
  alarms,
  alarmSources,
  attachments,
  branches,
  customers,
  findings,
  leakCases,
  readings,
  refrigerantEvents,
  sites,
  units,
  visits,
  workOrders,
} from '../../db/schema';
import { orderFor, pageWindow, searchAny } from './list-query';

type CustomersQuery = z.output<typeof customersQuerySchema>;
type SitesQuery = z.output<typeof sitesQuerySchema>;

export function statusFilter(col: Parameters<typeof isNull>[0], status: RecordStatus): SQL | undefined {
  if (status === 'active') return isNull(col);
  if (status === 'archived') return isNotNull(col);
  return undefined;
}

// Customers

const siteCount =
  sql<number>`(select count(*) from ${sites} where ${sites.customerId} = ${customers.id} and ${sites.archivedAt} is null)`.mapWith(Number);

const customerColumns = {
  id: customers.id,
  branchId: customers.branchId,
  branchName: branches.name,
  name: customers.name,
  contactName: customers.contactName,
  contactEmail: customers.contactEmail,
  contactPhone: customers.contactPhone,
  billingAddress: customers.billingAddress,
  notes: customers.notes,
  siteCount,
  archivedAt: customers.archivedAt,
};

export type CustomerSelect = { [K in keyof typeof customerColumns]: unknown } & { archivedAt: Date | null };

/** A page of customers of the branch (undefined: every branch) and their total. */
export async function customerPage(db: Tx, branchId: string | undefined, q: CustomersQuery) {
  const where = and(
    branchId ? eq(customers.branchId, branchId) : undefined,
    statusFilter(customers.archivedAt, q.status),
    searchAny(q.q, [customers.name, customers.contactName, customers.contactEmail]),
  );
  const order = orderFor(
    q.sort,
    q.dir,
    { name: customers.name, contactName: customers.contactName, siteCount, branchName: branches.name },
    'name',
    customers.id,
  );
  const [rows, [total]] = await Promise.all([
    db
      .select(customerColumns)
      .from(customers)
      .innerJoin(branches, eq(branches.id, customers.branchId))
      .where(where)
      .orderBy(...order)
      .limit(pageWindow(q.page, q.pageSize).limit)
      .offset(pageWindow(q.page, q.pageSize).offset),
    db.select({ n: count() }).from(customers).where(where),
  ]);
  return { rows, total: total?.n ?? 0 };
}

export async function findCustomer(db: Tx, id: string) {
  const [row] = await db
    .select(customerColumns)
    .from(customers)
    .innerJoin(branches, eq(branches.id, customers.branchId))
    .where(eq(customers.id, id))
    .limit(1);
  return row;
}

export async function findBranch(db: Tx, id: string) {
  const [b] = await db.select({ id: branches.id, archivedAt: branches.archivedAt }).from(branches).where(eq(branches.id, id));
  return b;
}

export async function insertCustomer(db: Tx, values: typeof customers.$inferInsert): Promise<string> {
  const [c] = await db.insert(customers).values(values).returning({ id: customers.id });
  return c!.id;
}

export async function updateCustomer(db: Tx, id: string, set: Partial<typeof customers.$inferInsert>): Promise<void> {
  await db.update(customers).set(set).where(eq(customers.id, id));
}

/** How many sites (archived ones included) the customer has. */
export async function siteCountOf(db: Tx, customerId: string): Promise<number> {
  const [s] = await db.select({ n: count() }).from(sites).where(eq(sites.customerId, customerId));
  return s?.n ?? 0;
}

export async function deleteCustomer(db: Tx, id: string): Promise<void> {
  await db.delete(customers).where(eq(customers.id, id));
}

// Sites

const unitCount = sql<number>`(select count(*) from ${units} where ${units.siteId} = ${sites.id} and ${units.archivedAt} is null)`.mapWith(
  Number,
);

const siteColumns = {
  id: sites.id,
  branchId: sites.branchId,
  branchName: branches.name,
  customerId: sites.customerId,
  customerName: customers.name,
  name: sites.name,
  address: sites.address,
  city: sites.city,
  region: sites.region,
  postalCode: sites.postalCode,
  lat: sites.lat,
  lon: sites.lon,
  accessNotes: sites.accessNotes,
  contactName: sites.contactName,
  contactEmail: sites.contactEmail,
  contactPhone: sites.contactPhone,
  unitCount,
  archivedAt: sites.archivedAt,
};

export type SiteSelect = { [K in keyof typeof siteColumns]: unknown } & { archivedAt: Date | null };

/** A page of sites of the branch (undefined: every branch) and their total. */
export async function sitePage(db: Tx, branchId: string | undefined, q: SitesQuery) {
  const where = and(
    branchId ? eq(sites.branchId, branchId) : undefined,
    q.customerId ? eq(sites.customerId, q.customerId) : undefined,
    statusFilter(sites.archivedAt, q.status),
    searchAny(q.q, [sites.name, sites.address, sites.city, sites.postalCode, customers.name]),
  );
  const order = orderFor(
    q.sort,
    q.dir,
    { name: sites.name, customerName: customers.name, city: sites.city, unitCount, branchName: branches.name },
    'name',
    sites.id,
  );
  const { limit, offset } = pageWindow(q.page, q.pageSize);
  const [rows, [total]] = await Promise.all([
    db
      .select(siteColumns)
      .from(sites)
      .innerJoin(customers, eq(customers.id, sites.customerId))
      .innerJoin(branches, eq(branches.id, sites.branchId))
      .where(where)
      .orderBy(...order)
      .limit(limit)
      .offset(offset),
    db.select({ n: count() }).from(sites).innerJoin(customers, eq(customers.id, sites.customerId)).where(where),
  ]);
  return { rows, total: total?.n ?? 0 };
}

export async function findSite(db: Tx, id: string) {
  const [row] = await db
    .select(siteColumns)
    .from(sites)
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .innerJoin(branches, eq(branches.id, sites.branchId))
    .where(eq(sites.id, id))
    .limit(1);
  return row;
}

export async function insertSite(db: Tx, values: typeof sites.$inferInsert): Promise<string> {
  const [s] = await db.insert(sites).values(values).returning({ id: sites.id });
  return s!.id;
}

export async function updateSite(db: Tx, id: string, set: Partial<typeof sites.$inferInsert>): Promise<void> {
  await db.update(sites).set(set).where(eq(sites.id, id));
}

/** Archives the site and its active units with the same instant. */
export async function archiveSite(db: Tx, id: string, now: Date): Promise<void> {
  await db.update(sites).set({ archivedAt: now }).where(eq(sites.id, id));
  await db
    .update(units)
    .set({ archivedAt: now })
    .where(and(eq(units.siteId, id), isNull(units.archivedAt)));
}

/** Brings back the site and the units archived with it (at `at`). */
export async function unarchiveSite(db: Tx, id: string, at: Date): Promise<void> {
  await db
    .update(units)
    .set({ archivedAt: null })
    .where(and(eq(units.siteId, id), eq(units.archivedAt, at)));
  await db.update(sites).set({ archivedAt: null }).where(eq(sites.id, id));
}

export async function unitIdsOfSite(db: Tx, siteId: string): Promise<string[]> {
  return (await db.select({ id: units.id }).from(units).where(eq(units.siteId, siteId))).map((u) => u.id);
}

/** Deletes the site and the given units of it. */
export async function deleteSite(db: Tx, id: string, unitIds: string[]): Promise<void> {
  if (unitIds.length) await db.delete(units).where(inArray(units.id, unitIds));
  await db.delete(sites).where(eq(sites.id, id));
}

// History

const n = async (q: Promise<{ n: number }[]>) => Number((await q)[0]?.n ?? 0);

/** How much history hangs on some units (and, for a site, on the site itself). One query per table. */
export async function historyCounts(db: Tx, unitIds: string[], siteId?: string): Promise<HistoryCounts> {
  const anyUnit = unitIds.length > 0;
  const woWhere = siteId ? eq(workOrders.siteId, siteId) : anyUnit ? inArray(workOrders.unitId, unitIds) : undefined;
  const zero = Promise.resolve([{ n: 0 }]);
  const [
    workOrderCount,
    visitCount,
    readingCount,
    alarmCount,
    refrigerantCount,
    agreementCount,
    leakCount,
    findingCount,
    attachmentCount,
    sourceCount,
  ] = await Promise.all([
    woWhere ? n(db.select({ n: count() }).from(workOrders).where(woWhere)) : 0,
    woWhere ? n(db.select({ n: count() }).from(visits).innerJoin(workOrders, eq(visits.workOrderId, workOrders.id)).where(woWhere)) : 0,
    n(anyUnit ? db.select({ n: count() }).from(readings).where(inArray(readings.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(alarms).where(inArray(alarms.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(refrigerantEvents).where(inArray(refrigerantEvents.unitId, unitIds)) : zero),
    siteId
      ? n(db.select({ n: count() }).from(agreements).where(eq(agreements.siteId, siteId)))
      : n(anyUnit ? db.select({ n: count() }).from(agreementUnits).where(inArray(agreementUnits.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(leakCases).where(inArray(leakCases.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(findings).where(inArray(findings.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(attachments).where(inArray(attachments.unitId, unitIds)) : zero),
    siteId ? n(db.select({ n: count() }).from(alarmSources).where(eq(alarmSources.siteId, siteId))) : 0,
  ]);
  return {
    workOrders: workOrderCount,
    visits: visitCount,
    readings: readingCount,
    alarms: alarmCount,
    refrigerantEvents: refrigerantCount,
    agreements: agreementCount,
    leakCases: leakCount,
    findings: findingCount,
    attachments: attachmentCount,
    alarmSources: sourceCount,
  };
}
