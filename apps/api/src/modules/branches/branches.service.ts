import type { z } from 'zod';
import type { BranchDetail, BranchValues, SessionUser, branchPatchSchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { assertBranch, branchScope } from '../../auth/policy';
import { conflict, notFound } from '../../lib/errors';
import { changeAs } from '../events/actor';
import { type BranchColumns, findBranch, findBranchByCode, insertBranch, listBranches, updateBranchRow } from './branches.repo';
import { presentBranchDetail, presentBranchListRow } from './branches.present';

function columns(v: Partial<BranchValues>): BranchColumns {
  const { labourRate, ...rest } = v;
  return { ...rest, ...(labourRate !== undefined ? { labourRateCents: Math.round(labourRate * 100) } : {}) };
}

async function refuseTakenCode(ctx: AppContext, code: string | undefined, exceptId?: string) {
  if (!code) return;
  const b = await findBranchByCode(ctx.db, code);
  if (b && b.id !== exceptId) throw conflict('code_taken', `The code ${code} is already used by ${b.name}. Choose another.`);
}

export async function getBranch(ctx: AppContext, user: SessionUser, id: string): Promise<BranchDetail> {
  const b = await findBranch(ctx.db, id);
  if (!b) throw notFound('branch');
  assertBranch(user, b.id, 'branch');
  return presentBranchDetail(b);
}

export async function createBranch(ctx: AppContext, user: SessionUser, v: BranchValues): Promise<BranchDetail> {
  await refuseTakenCode(ctx, v.code);
  const b = await changeAs(ctx.db, user.id, (tx) => insertBranch(tx, columns(v)));
  return getBranch(ctx, user, b.id);
}

export async function updateBranch(
  ctx: AppContext,
  user: SessionUser,
  id: string,
  v: z.output<typeof branchPatchSchema>,
): Promise<BranchDetail> {
  await getBranch(ctx, user, id);
  await refuseTakenCode(ctx, v.code, id);
  const set = columns(v);
  if (Object.keys(set).length) await changeAs(ctx.db, user.id, (tx) => updateBranchRow(tx, id, set));
  return getBranch(ctx, user, id);
}

/** The branches a person may see (the owner's branch switcher), by name. */
export async function branchList(ctx: AppContext, user: SessionUser) {
  const rows = await listBranches(ctx.db, branchScope(user));
  return { branches: rows.map(presentBranchListRow) };
}
