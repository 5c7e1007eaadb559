import type { z } from 'zod';
import type {
  CustomerRow,
  CustomerValues,
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
import { assertBranch, enforce, ownBranchForNew } from '../../auth/policy';
import { badRequest, conflict, notFound } from '../../lib/errors';
import { historyCounts, refuseIfHistory } from './history';
import { listBranch } from './list-query';
import * as repo from './sites.repo';
import { toCustomerRow, toSiteRow } from './sites.present';
import { actAs, changeAs } from '../events/actor';

type CustomersQuery = z.output<typeof customersQuerySchema>;
type SitesQuery = z.output<typeof sitesQuerySchema>;

export { statusFilter } from './sites.repo';

// ---------------------------------------------------------------------------------------------
// Customers
// ---------------------------------------------------------------------------------------------

export async function listCustomers(ctx: AppContext, user: SessionUser, q: CustomersQuery): Promise<Page<CustomerRow>> {
  const branchId = listBranch(user, q.branchId);
  const { rows, total } = await repo.customerPage(ctx.db, branchId, q);
  return { rows: rows.map(toCustomerRow), total, page: q.page, pageSize: q.pageSize };
}

export async function getCustomer(db: Tx, user: SessionUser, id: string): Promise<CustomerRow> {
  const row = await repo.findCustomer(db, id);
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
  const b = await repo.findBranch(db, requested);
  if (!b) throw notFound('branch');
  if (b.archivedAt) throw conflict('branch_archived', 'That branch is archived; choose an active branch.');
  return b.id;
}

export async function createCustomer(ctx: AppContext, user: SessionUser, input: CustomerValues): Promise<CustomerRow> {
  const branchId = await targetBranch(ctx.db, user, input.branchId);
  const { branchId: _ignored, ...rest } = input;
  const id = await repo.insertCustomer(ctx.db, { ...rest, branchId });
  return getCustomer(ctx.db, user, id);
}

export async function updateCustomer(ctx: AppContext, user: SessionUser, id: string, patch: z.output<typeof customerPatchSchema>) {
  await getCustomer(ctx.db, user, id);
  if (Object.keys(patch).length) await repo.updateCustomer(ctx.db, id, patch);
  return getCustomer(ctx.db, user, id);
}

export async function setCustomerArchived(ctx: AppContext, user: SessionUser, id: string, archived: boolean) {
  await getCustomer(ctx.db, user, id);
  await repo.updateCustomer(ctx.db, id, { archivedAt: archived ? ctx.clock.now() : null });
  return getCustomer(ctx.db, user, id);
}

export async function deleteCustomer(ctx: AppContext, user: SessionUser, id: string): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const c = await getCustomer(tx, user, id);
    const n = await repo.siteCountOf(tx, id);
    if (n > 0) {
      throw conflict(
        'has_sites',
        `${c.name} still has ${n} site${n === 1 ? '' : 's'} (archived ones included) and cannot be deleted. Delete the sites first, or archive the customer to keep its history.`,
      );
    }
    await repo.deleteCustomer(tx, id);
  });
}

// ---------------------------------------------------------------------------------------------
// Sites
// ---------------------------------------------------------------------------------------------

export async function listSites(ctx: AppContext, user: SessionUser, q: SitesQuery): Promise<Page<SiteRow>> {
  const branchId = listBranch(user, q.branchId);
  const { rows, total } = await repo.sitePage(ctx.db, branchId, q);
  return { rows: rows.map(toSiteRow), total, page: q.page, pageSize: q.pageSize };
}

export async function getSite(db: Tx, user: SessionUser, id: string): Promise<SiteRow> {
  const row = await repo.findSite(db, id);
  if (!row) throw notFound('site');
  assertBranch(user, row.branchId, 'site');
  return toSiteRow(row);
}

export async function createSite(ctx: AppContext, user: SessionUser, input: SiteValues): Promise<SiteRow> {
  const customer = await getCustomer(ctx.db, user, input.customerId);
  if (customer.archivedAt) throw conflict('customer_archived', `${customer.name} is archived. Unarchive the customer before adding sites.`);
  const id = await changeAs(ctx.db, user.id, (tx) => repo.insertSite(tx, { ...input, branchId: customer.branchId }));
  return getSite(ctx.db, user, id);
}

export async function updateSite(ctx: AppContext, user: SessionUser, id: string, patch: z.output<typeof sitePatchSchema>) {
  const site = await getSite(ctx.db, user, id);
  if (patch.customerId && patch.customerId !== site.customerId) {
    const c = await getCustomer(ctx.db, user, patch.customerId);
    if (c.branchId !== site.branchId) throw conflict('other_branch', 'A site can only move to a customer of its own branch.');
  }
  if (Object.keys(patch).length) await changeAs(ctx.db, user.id, (tx) => repo.updateSite(tx, id, patch));
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
      await repo.archiveSite(tx, id, ctx.clock.now());
    } else if (!archived && site.archivedAt) {
      await repo.unarchiveSite(tx, id, new Date(site.archivedAt));
    }
    return getSite(tx, user, id);
  });
}

export async function deleteSite(ctx: AppContext, user: SessionUser, id: string): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const site = await getSite(tx, user, id);
    const unitIds = await repo.unitIdsOfSite(tx, id);
    refuseIfHistory(site.name, await historyCounts(tx, unitIds, id));
    await repo.deleteSite(tx, id, unitIds);
  });
}
