import { and, count, eq, inArray, isNotNull, isNull, sql, type SQL } from 'drizzle-orm';
import type { z } from 'zod';
import type {
  CustomerRow,
  CustomerValues,
  RecordStatus,
  SessionUser,
  SiteRow,
  SiteValues,
  customerPatchSchema,
  customersQuerySchema,
  sitePatchSchema,
  sitesQuerySchema,
  Page,
} from '@coilpath/contract';
import type { AppContext } from '../../context';
import type { Tx } from '../../db/client';
import { branches, customers, sites, units } from '../../db/schema';
import { assertBranch, enforce, ownBranchForNew } from '../../auth/policy';
import { badRequest, conflict, notFound } from '../../lib/errors';
import { historyCounts, refuseIfHistory } from './history';
import { listBranch, orderFor, pageWindow, searchAny } from './list-query';
import { actAs, changeAs } from '../events/actor';

type CustomersQuery = z.output<typeof customersQuerySchema>;
type SitesQuery = z.output<typeof sitesQuerySchema>;

export function statusFilter(col: Parameters<typeof isNull>[0], status: RecordStatus): SQL | undefined {
  if (status === 'active') return isNull(col);
  if (status === 'archived') return isNotNull(col);
  return undefined;
}

const iso = (d: Date | null) => (d ? d.toISOString() : null);

// ---------------------------------------------------------------------------------------------
// Customers
// ---------------------------------------------------------------------------------------------

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

type CustomerSelect = { [K in keyof typeof customerColumns]: unknown } & { archivedAt: Date | null };
const toCustomerRow = (r: CustomerSelect): CustomerRow => ({ ...(r as unknown as CustomerRow), archivedAt: iso(r.archivedAt) });

export async function listCustomers(ctx: AppContext, user: SessionUser, q: CustomersQuery): Promise<Page<CustomerRow>> {
  const branchId = listBranch(user, q.branchId);
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
    ctx.db
      .select(customerColumns)
      .from(customers)
      .innerJoin(branches, eq(branches.id, customers.branchId))
      .where(where)
      .orderBy(...order)
      .limit(pageWindow(q.page, q.pageSize).limit)
      .offset(pageWindow(q.page, q.pageSize).offset),
    ctx.db.select({ n: count() }).from(customers).where(where),
  ]);
  return { rows: rows.map(toCustomerRow), total: total?.n ?? 0, page: q.page, pageSize: q.pageSize };
}

export async function getCustomer(db: Tx, user: SessionUser, id: string): Promise<CustomerRow> {
  const [row] = await db
    .select(customerColumns)
    .from(customers)
    .innerJoin(branches, eq(branches.id, customers.branchId))
    .where(eq(customers.id, id))
    .limit(1);
  if (!row) throw notFound('customer');
  assertBranch(user, row.branchId, 'customer');
  return toCustomerRow(row);
}

/** The branch a new record goes to: the owner names it; everyone else creates in their own. */
async function targetBranch(db: Tx, user: SessionUser, requested: string | null | undefined): Promise<string> {
  const own = ownBranchForNew(user, requested);
  enforce(own);
  if (own.ok && own.branchId) return own.branchId;
  if (!requested)
    throw badRequest('Choose the branch this customer belongs to.', { fields: [{ path: 'branchId', message: 'Choose the branch' }] });
  const [b] = await db.select({ id: branches.id, archivedAt: branches.archivedAt }).from(branches).where(eq(branches.id, requested));
  if (!b) throw notFound('branch');
  if (b.archivedAt) throw conflict('branch_archived', 'That branch is archived; choose an active branch.');
  return b.id;
}

export async function createCustomer(ctx: AppContext, user: SessionUser, input: CustomerValues): Promise<CustomerRow> {
  const branchId = await targetBranch(ctx.db, user, input.branchId);
  const { branchId: _ignored, ...rest } = input;
  const [c] = await ctx.db
    .insert(customers)
    .values({ ...rest, branchId })
    .returning({ id: customers.id });
  return getCustomer(ctx.db, user, c!.id);
}

export async function updateCustomer(ctx: AppContext, user: SessionUser, id: string, patch: z.output<typeof customerPatchSchema>) {
  await getCustomer(ctx.db, user, id);
  if (Object.keys(patch).length) await ctx.db.update(customers).set(patch).where(eq(customers.id, id));
  return getCustomer(ctx.db, user, id);
}

export async function setCustomerArchived(ctx: AppContext, user: SessionUser, id: string, archived: boolean) {
  await getCustomer(ctx.db, user, id);
  await ctx.db
    .update(customers)
    .set({ archivedAt: archived ? ctx.clock.now() : null })
    .where(eq(customers.id, id));
  return getCustomer(ctx.db, user, id);
}

export async function deleteCustomer(ctx: AppContext, user: SessionUser, id: string): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const c = await getCustomer(tx, user, id);
    const [s] = await tx.select({ n: count() }).from(sites).where(eq(sites.customerId, id));
    if ((s?.n ?? 0) > 0) {
      throw conflict(
        'has_sites',
        `${c.name} still has ${s!.n} site${s!.n === 1 ? '' : 's'} (archived ones included) and cannot be deleted. Delete the sites first, or archive the customer to keep its history.`,
      );
    }
    await tx.delete(customers).where(eq(customers.id, id));
  });
}

// ---------------------------------------------------------------------------------------------
// Sites
// ---------------------------------------------------------------------------------------------

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

type SiteSelect = { [K in keyof typeof siteColumns]: unknown } & { archivedAt: Date | null };
const toSiteRow = (r: SiteSelect): SiteRow => ({ ...(r as unknown as SiteRow), archivedAt: iso(r.archivedAt) });

export async function listSites(ctx: AppContext, user: SessionUser, q: SitesQuery): Promise<Page<SiteRow>> {
  const branchId = listBranch(user, q.branchId);
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
    ctx.db
      .select(siteColumns)
      .from(sites)
      .innerJoin(customers, eq(customers.id, sites.customerId))
      .innerJoin(branches, eq(branches.id, sites.branchId))
      .where(where)
      .orderBy(...order)
      .limit(limit)
      .offset(offset),
    ctx.db.select({ n: count() }).from(sites).innerJoin(customers, eq(customers.id, sites.customerId)).where(where),
  ]);
  return { rows: rows.map(toSiteRow), total: total?.n ?? 0, page: q.page, pageSize: q.pageSize };
}

export async function getSite(db: Tx, user: SessionUser, id: string): Promise<SiteRow> {
  const [row] = await db
    .select(siteColumns)
    .from(sites)
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .innerJoin(branches, eq(branches.id, sites.branchId))
    .where(eq(sites.id, id))
    .limit(1);
  if (!row) throw notFound('site');
  assertBranch(user, row.branchId, 'site');
  return toSiteRow(row);
}

export async function createSite(ctx: AppContext, user: SessionUser, input: SiteValues): Promise<SiteRow> {
  const customer = await getCustomer(ctx.db, user, input.customerId);
  if (customer.archivedAt) throw conflict('customer_archived', `${customer.name} is archived. Unarchive the customer before adding sites.`);
  const [s] = await changeAs(ctx.db, user.id, (tx) =>
    tx
      .insert(sites)
      .values({ ...input, branchId: customer.branchId })
      .returning({ id: sites.id }),
  );
  return getSite(ctx.db, user, s!.id);
}

export async function updateSite(ctx: AppContext, user: SessionUser, id: string, patch: z.output<typeof sitePatchSchema>) {
  const site = await getSite(ctx.db, user, id);
  if (patch.customerId && patch.customerId !== site.customerId) {
    const c = await getCustomer(ctx.db, user, patch.customerId);
    if (c.branchId !== site.branchId) throw conflict('other_branch', 'A site can only move to a customer of its own branch.');
  }
  if (Object.keys(patch).length) await changeAs(ctx.db, user.id, (tx) => tx.update(sites).set(patch).where(eq(sites.id, id)));
  return getSite(ctx.db, user, id);
}

/**
 * Archiving a site archives its active units with the same instant (they leave booking too);
 * unarchiving brings back exactly those units, not ones archived on their own before.
 */
export async function setSiteArchived(ctx: AppContext, user: SessionUser, id: string, archived: boolean) {
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const site = await getSite(tx, user, id);
    if (archived && !site.archivedAt) {
      const now = ctx.clock.now();
      await tx.update(sites).set({ archivedAt: now }).where(eq(sites.id, id));
      await tx
        .update(units)
        .set({ archivedAt: now })
        .where(and(eq(units.siteId, id), isNull(units.archivedAt)));
    } else if (!archived && site.archivedAt) {
      const at = new Date(site.archivedAt);
      await tx
        .update(units)
        .set({ archivedAt: null })
        .where(and(eq(units.siteId, id), eq(units.archivedAt, at)));
      await tx.update(sites).set({ archivedAt: null }).where(eq(sites.id, id));
    }
    return getSite(tx, user, id);
  });
}

export async function deleteSite(ctx: AppContext, user: SessionUser, id: string): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const site = await getSite(tx, user, id);
    const unitIds = (await tx.select({ id: units.id }).from(units).where(eq(units.siteId, id))).map((u) => u.id);
    refuseIfHistory(site.name, await historyCounts(tx, unitIds, id));
    if (unitIds.length) await tx.delete(units).where(inArray(units.id, unitIds));
    await tx.delete(sites).where(eq(sites.id, id));
  });
}
