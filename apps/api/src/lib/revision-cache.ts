/**
 * Reads reused while a branch's roster revision stands.
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
import { rosterRevisions } from '../db/schema';
import { prepareJson, type PreparedJson } from './prepared-json';

export interface RevisionCache {
  /** The cached value for (branch, key) at the branch's current revision, or `compute()`'s result, kept. */
  read<T>(database: Database, branchId: string, key: string, compute: () => Promise<T>): Promise<T>;
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

/**
 * The revision a cached read is checked against: on PGlite the one kept in memory from the database's
 * notifications (no query), on PostgreSQL the stored one (other processes write too).
 */
const currentRevision = (database: Database, branchId: string) =>
  database.local ? database.local.rosterRevision(branchId) : rosterRevision(database.db, branchId);

/** A least-recently-used cache of at most `capacity` results. Results must not be mutated by callers. */
export function createRevisionCache(capacity = 64): RevisionCache {
  const entries = new Map<string, { revision: number; value: unknown }>();
  /** Computations under way, so that clients asking at once for the same thing share one. */
  const pending = new Map<string, Promise<unknown>>();
  const cache: RevisionCache = {
    async json(database, branchId, key, compute) {
      if (!branchId) return prepareJson(await compute());
      return cache.read(database, branchId, key, async () => prepareJson(await compute()));
    },
    async read<T>(database: Database, branchId: string, key: string, compute: () => Promise<T>): Promise<T> {
      const revision = await currentRevision(database, branchId);
      const k = `${branchId} ${key}`;
      const hit = entries.get(k);
      if (hit && hit.revision === revision) {
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
