/**
 * Reads reused while a revision stands: by default a branch's roster revision; the unit briefing uses its
 * site's briefing revision (`briefingRevisionOf`, migration 0021), raised the same way.
 *
 * Database triggers raise `roster_revisions.revision` for a branch at the commit of every transaction that
 * changes something the Roster shows (migration 0004). A read first asks for the branch's revision (one
 * primary-key lookup; on PGlite the count of the commit notifications heard, migration 0006) and reuses
 * what it computed before at that same revision; otherwise it computes and keeps the result. Because the revision is read *before* the data, a result is never kept under a revision
 * newer than what it saw, and every process on the same database sees every other's changes: the cache is
 * per process but never stale.
 */
import { eq, sql } from 'drizzle-orm';
import type { Database, Db } from '../db/client';
import { briefingRevisions, rosterRevisions } from '../db/schema';
import { prepareJson, type PreparedJson } from './prepared-json';

export interface RevisionCache {
  /**
   * The cached value for (scope, key) at the scope's current revision (the branch's, or what the cache was
   * made with), or `compute()`'s result, kept. A kept value for which `fresh` answers false (a value that
   * time, not a change, makes stale) is computed again.
   */
  read<T>(database: Database, branchId: string, key: string, compute: () => Promise<T>, fresh?: (value: T) => boolean): Promise<T>;
  /**
   * A JSON answer through the cache, serialized once per revision. Without a branch (an owner's
   * all-branches read) it is computed every time.
   */
  json(database: Database, branchId: string | undefined, key: string, compute: () => Promise<unknown>): Promise<PreparedJson>;
  /** Entries held now (for tests and diagnostics). */
  readonly size: number;
}

/** The revision lookup, built once per database (it runs before every cached read). */
const revisionQueries = new WeakMap<Db, ReturnType<typeof revisionQuery>>();
const revisionQuery = (db: Db) =>
  db
    .select({ revision: rosterRevisions.revision })
    .from(rosterRevisions)
    .where(eq(rosterRevisions.branchId, sql.placeholder('branchId')))
    .limit(1)
    .prepare('coilpath_roster_revision');

/** The branch's revision as stored in roster_revisions. */
export async function rosterRevision(db: Db, branchId: string): Promise<number> {
  let query = revisionQueries.get(db);
  if (!query) revisionQueries.set(db, (query = revisionQuery(db)));
  const [row] = await query.execute({ branchId });
  return row?.revision ?? 0;
}

/** Where a cache reads the revision of the scope (a branch, a site) its entries are kept under. */
export type RevisionOf = (database: Database, scopeId: string) => number | Promise<number>;

/**
 * The revision a cached read is checked against: on PGlite the one kept in memory from the database's
 * notifications (no query), on PostgreSQL the stored one (other processes write too).
 */
export const rosterRevisionOf: RevisionOf = (database, branchId) =>
  database.local ? database.local.rosterRevision(branchId) : rosterRevision(database.db, branchId);

const briefingQueries = new WeakMap<Db, ReturnType<typeof briefingQuery>>();
const briefingQuery = (db: Db) =>
  db
    .select({ revision: briefingRevisions.revision })
    .from(briefingRevisions)
    .where(eq(briefingRevisions.siteId, sql.placeholder('siteId')))
    .limit(1)
    .prepare('coilpath_briefing_revision');

/** A site's briefing revision as stored in briefing_revisions (migration 0021). */
export async function briefingRevision(db: Db, siteId: string): Promise<number> {
  let query = briefingQueries.get(db);
  if (!query) briefingQueries.set(db, (query = briefingQuery(db)));
  const [row] = await query.execute({ siteId });
  return row?.revision ?? 0;
}

/** A site's briefing revision: from the notifications on PGlite, from the table on PostgreSQL. */
export const briefingRevisionOf: RevisionOf = (database, siteId) =>
  database.local ? database.local.briefingRevision(siteId) : briefingRevision(database.db, siteId);

/**
 * A least-recently-used cache of at most `capacity` results, kept under the revision `revisionOf` reads
 * (a branch's roster revision unless told). Results must not be mutated by callers.
 */
export function createRevisionCache(capacity = 64, revisionOf: RevisionOf = rosterRevisionOf): RevisionCache {
  const entries = new Map<string, { revision: number; value: unknown }>();
  /** Computations under way, so that clients asking at once for the same thing share one. */
  const pending = new Map<string, Promise<unknown>>();
  const cache: RevisionCache = {
    async json(database, branchId, key, compute) {
      if (!branchId) return prepareJson(await compute());
      return cache.read(database, branchId, key, async () => prepareJson(await compute()));
    },
    async read<T>(database: Database, branchId: string, key: string, compute: () => Promise<T>, fresh?: (value: T) => boolean): Promise<T> {
      const revision = await revisionOf(database, branchId);
      const k = `${branchId} ${key}`;
      const hit = entries.get(k);
      if (hit && hit.revision === revision && (!fresh || fresh(hit.value as T))) {
        entries.delete(k);
        entries.set(k, hit);
        return hit.value as T;
      }
      const pk = `${k} @${revision}`;
      const running = pending.get(pk);
      if (running) return running as Promise<T>;
      const computing = compute().then((value) => {
        const current = entries.get(k);
        if (!current || current.revision <= revision) {
          entries.delete(k);
          entries.set(k, { revision, value });
          while (entries.size > capacity) entries.delete(entries.keys().next().value!);
        }
        return value;
      });
      pending.set(pk, computing);
      try {
        return await computing;
      } finally {
        pending.delete(pk);
      }
    },
    get size() {
      return entries.size;
    },
  };
  return cache;
}
