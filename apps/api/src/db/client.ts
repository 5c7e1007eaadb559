import { fileURLToPath } from 'node:url';
import { mkdirSync } from 'node:fs';
import { PGlite } from '@electric-sql/pglite';
import { drizzle as drizzlePglite, type PgliteDatabase } from 'drizzle-orm/pglite';
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator';
import { drizzle as drizzlePg } from 'drizzle-orm/node-postgres';
import { migrate as migratePg } from 'drizzle-orm/node-postgres/migrator';
import pg from 'pg';
import * as schema from './schema';

export type Schema = typeof schema;
/** The one database type services use; the node-postgres database has the same query API. */
export type Db = PgliteDatabase<Schema>;
/** A database or a transaction on it. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0] | Db;

/**
 * What the embedded database tells its one process at every commit (migration 0006 notifications): with
 * PGlite no other process can write, so these stand in for asking the database on every request.
 */
export interface LocalChanges {
  /** Rises for a branch at each commit that changes what its Roster shows. */
  rosterRevision(branchId: string): number;
  /** Rises for a site at each commit that changes what a unit briefing there shows (migration 0021). */
  briefingRevision(siteId: string): number;
  /** Calls `listener` with a user's id when their row changes or goes. */
  onUserChange(listener: (userId: string) => void): () => void;
}

async function listenForChanges(client: PGlite): Promise<LocalChanges> {
  const revisions = new Map<string, number>();
  const briefings = new Map<string, number>();
  const userListeners = new Set<(userId: string) => void>();
  // PGlite hands notifications over before the committing query's promise settles, so whoever committed
  // (and everyone after) already sees the new revision.
  await client.listen('coilpath_roster', (branchId) => revisions.set(branchId, (revisions.get(branchId) ?? 0) + 1));
  await client.listen('coilpath_site', (siteId) => briefings.set(siteId, (briefings.get(siteId) ?? 0) + 1));
  await client.listen('coilpath_user', (userId) => userListeners.forEach((l) => l(userId)));
  return {
    rosterRevision: (branchId) => revisions.get(branchId) ?? 0,
    briefingRevision: (siteId) => briefings.get(siteId) ?? 0,
    onUserChange(listener) {
      userListeners.add(listener);
      return () => userListeners.delete(listener);
    },
  };
}

export interface Database {
  db: Db;
  kind: 'pglite' | 'postgres';
  /** PGlite only: changes heard from the database (see `LocalChanges`). */
  local?: LocalChanges;
  /** Raw SQL for maintenance (backups, advisory locks). */
  exec(sql: string): Promise<void>;
  /**
   * Hears `pg_notify(channel, payload)` of every commit (this process's and, on PostgreSQL, every other's):
   * PGlite's own notifications, or one dedicated connection per database on PostgreSQL that LISTENs for all
   * channels asked for (opened at the first call, reconnected when lost, closed with the database).
   * Answers a function that stops listening.
   */
  listen(channel: string, listener: (payload: string) => void): Promise<() => Promise<void>>;
  close(): Promise<void>;
  pglite?: PGlite;
  pool?: pg.Pool;
}

export const migrationsFolder = fileURLToPath(new URL('./migrations', import.meta.url));

export interface OpenOptions {
  /** `postgres://…` runs on a real PostgreSQL server. */
  databaseUrl?: string | undefined;
  /** PGlite data directory; omitted = in memory. */
  dataDir?: string | undefined;
  /** PGlite: start from this image of a data directory (`dumpDataDir()`), e.g. the tests' migrated template. */
  loadDataDir?: Blob | undefined;
  migrate?: boolean;
}

export async function openDatabase(opts: OpenOptions = {}): Promise<Database> {
  let database: Database;
  if (opts.databaseUrl) {
    // Short API queries: JIT costs more than it saves (measured with the bench: a planning-time cost on every short query). Set as a startup option of
    // every connection, so no query can race ahead of it.
    const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 10, options: '-c jit=off' });
    // An idle connection the server ends (restart, admin shutdown) emits 'error' on the pool; without a
    // listener that would crash the process. The pool replaces the connection on the next query.
    pool.on('error', (err) => console.error(`[coilpath] idle database connection lost: ${err.message}`));
    const db = drizzlePg(pool, { schema, casing: 'snake_case' }) as unknown as Db;
    const listening = pgListener(opts.databaseUrl);
    database = {
      db,
      kind: 'postgres',
      pool,
      exec: async (s) => {
        await pool.query(s);
      },
      listen: listening.listen,
      close: async () => {
        await listening.close();
        await pool.end();
      },
    };
    if (opts.migrate !== false) {
      // Several API processes may start together: one migrates while the others wait, then find nothing to do.
      const lock = await pool.connect();
      try {
        await lock.query("SELECT pg_advisory_lock(hashtext('coilpath-migrate'))");
        await migratePg(db as never, { migrationsFolder });
      } finally {
        await lock.query("SELECT pg_advisory_unlock(hashtext('coilpath-migrate'))").catch(() => undefined);
        lock.release();
      }
    }
  } else {
    if (opts.dataDir) mkdirSync(opts.dataDir, { recursive: true });
    const client = new PGlite({ dataDir: opts.dataDir, loadDataDir: opts.loadDataDir });
    await client.waitReady;
    const db = drizzlePglite(client, { schema, casing: 'snake_case' });
    database = {
      db,
      kind: 'pglite',
      pglite: client,
      exec: async (s) => {
        await client.exec(s);
      },
      listen: (channel, listener) => client.listen(channel, listener),
      close: () => client.close(),
    };
    if (opts.migrate !== false) {
      await migratePglite(db, { migrationsFolder });
      database.local = await listenForChanges(client);
    }
  }
  return database;
}

/**
 * PostgreSQL: one connection kept aside for LISTEN (a pooled connection cannot hold it). Opened at the first
 * `listen`; when the server drops it, it is opened again after a second and LISTENs again for every channel
 * (notifications sent in between are not heard: whoever needs them reads them back from their table).
 */
function pgListener(connectionString: string) {
  const listeners = new Map<string, Set<(payload: string) => void>>();
  let client: Promise<pg.Client> | null = null;
  let closed = false;
  let retry: NodeJS.Timeout | undefined;
  const quote = (channel: string) => `"${channel.replace(/"/g, '""')}"`;
  const connect = (): Promise<pg.Client> => {
    const c = new pg.Client({ connectionString });
    const lost = (err?: Error) => {
      if (client === null || closed) return;
      if (err) console.error(`[coilpath] notification connection lost: ${err.message}`);
      client = null;
      c.removeAllListeners();
      c.on('error', () => undefined);
      void c.end().catch(() => undefined);
      retry = setTimeout(() => {
        if (!closed && listeners.size > 0 && client === null) client = connect();
      }, 1000);
      retry.unref();
    };
    c.on('notification', (m) => listeners.get(m.channel)?.forEach((l) => l(m.payload ?? '')));
    c.on('error', lost);
    c.on('end', () => lost());
    const ready = (async () => {
      await c.connect();
      for (const channel of listeners.keys()) await c.query(`LISTEN ${quote(channel)}`);
      return c;
    })();
    ready.catch((err: Error) => lost(err));
    return ready;
  };
  return {
    async listen(channel: string, listener: (payload: string) => void) {
      let set = listeners.get(channel);
      const fresh = !set;
      if (!set) listeners.set(channel, (set = new Set()));
      set.add(listener);
      if (!client) client = connect();
      else if (fresh) await (await client).query(`LISTEN ${quote(channel)}`);
      await client;
      return async () => {
        set.delete(listener);
        if (set.size === 0 && listeners.get(channel) === set) {
          listeners.delete(channel);
          const c = await client?.catch(() => null);
          await c?.query(`UNLISTEN ${quote(channel)}`).catch(() => undefined);
        }
      };
    },
    async close() {
      closed = true;
      clearTimeout(retry);
      const c = await client?.catch(() => null);
      client = null;
      await c?.end().catch(() => undefined);
    },
  };
}
