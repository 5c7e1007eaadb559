import { asc, desc, ilike, or, type SQL } from 'drizzle-orm';
import type { PgColumn } from 'drizzle-orm/pg-core';
import type { SessionUser } from '@coilpath/contract';
import { resolveBranch } from '../../auth/policy';
import { notFound } from '../../lib/errors';

/** `%`, `_` and `\` typed by a person are literal characters, not patterns. */
export function likePattern(q: string): string {
  return `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** A case-insensitive "contains" over several columns, or nothing for an empty search. */
export function searchAny(q: string | undefined, columns: (PgColumn | SQL)[]): SQL | undefined {
  const t = q?.trim();
  if (!t) return undefined;
  const p = likePattern(t);
  return or(...columns.map((c) => ilike(c as PgColumn, p)));
}

/** ORDER BY for a whitelisted sort key (unknown keys fall back to the default), with a stable tiebreak. */
export function orderFor<C extends Record<string, PgColumn | SQL>>(
  sort: string | undefined,
  dir: 'asc' | 'desc',
  columns: C,
  fallback: keyof C & string,
  tiebreak: PgColumn,
): SQL[] {
  const key = (sort && Object.hasOwn(columns, sort) ? sort : fallback) as keyof C;
  const by = dir === 'desc' ? desc : asc;
  return [by(columns[key]!), asc(tiebreak)];
}

/**
 * The branch a list is about: the owner's choice (undefined = every branch) or the person's own
 * branch. A branch person without a branch sees nothing rather than everything.
 */
export function listBranch(user: SessionUser, requested: string | undefined): string | undefined {
  const b = resolveBranch(user, requested);
  if (user.role !== 'owner' && !b) throw notFound('branch');
  return b;
}

export const pageWindow = (page: number, pageSize: number) => ({ limit: pageSize, offset: (page - 1) * pageSize });

/**
 * A PATCH changes only the fields the client sent: zod fills defaults even in `.partial()`
 * schemas, so keep just the keys present in the raw body.
 */
export function onlySent<T extends object>(parsed: T, raw: unknown): Partial<T> {
  const sent = new Set(Object.keys(raw && typeof raw === 'object' ? raw : {}));
  return Object.fromEntries(Object.entries(parsed).filter(([k]) => sent.has(k))) as Partial<T>;
}
