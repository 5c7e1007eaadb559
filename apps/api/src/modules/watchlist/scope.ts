import { and, asc, eq, inArray, isNull, sql, type SQL } from 'drizzle-orm';
import type { AnyPgColumn } from 'drizzle-orm/pg-core';
import type { SessionUser } from '@coilpath/contract';
import { zonedDate } from '@coilpath/calc';
import type { Db, Tx } from '../../db/client';
import { branches } from '../../db/schema';
import { resolveBranch } from '../../auth/policy';
import { badRequest, notFound } from '../../lib/errors';

/** Matches no row: a branch user without a branch sees nothing. */
const NONE = '00000000-0000-0000-0000-000000000000';

/**
 * The branch filter of a list request: the owner sees every branch (or the one asked for); anyone
 * else only their own, and asking for another answers 404 (resolveBranch).
 */
export function branchFilter(user: SessionUser, requested: string | undefined, column: AnyPgColumn): SQL | undefined {
  const id = resolveBranch(user, requested);
  if (user.role === 'owner') return id ? eq(column, id) : undefined;
  return eq(column, id ?? NONE);
}

export type BranchInfo = typeof branches.$inferSelect;

/** The branches a list request covers, with their settings (time zone, repeat-alarm rule, holidays). */
export async function branchesInScope(db: Tx, user: SessionUser, requested: string | undefined): Promise<BranchInfo[]> {
  return db
    .select()
    .from(branches)
    .where(and(isNull(branches.archivedAt), branchFilter(user, requested, branches.id)))
    .orderBy(asc(branches.name));
}

/** One branch a write is about: the owner must name it; others get their own. */
export async function oneBranch(db: Tx, user: SessionUser, requested: string | undefined): Promise<BranchInfo> {
  const id = resolveBranch(user, requested);
  if (!id) throw badRequest('Choose a branch first (the branch switcher at the top).');
  const [b] = await db.select().from(branches).where(eq(branches.id, id)).limit(1);
  if (!b) throw notFound('branch');
  return b;
}

export async function branchesById(db: Db | Tx, ids: string[]): Promise<Map<string, BranchInfo>> {
  if (ids.length === 0) return new Map();
  const rows = await db
    .select()
    .from(branches)
    .where(inArray(branches.id, [...new Set(ids)]));
  return new Map(rows.map((b) => [b.id, b]));
}

/** Today's date in a branch's time zone. */
export const todayIn = (timeZone: string, now: Date) => zonedDate(now, timeZone);

export { sql };
