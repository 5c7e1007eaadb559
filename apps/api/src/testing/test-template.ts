import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pg from 'pg';
import { openDatabase } from '../db/client';

/**
 * The migrated database every test file starts from, made once per test run by `global-setup.ts`:
 * on PGlite a `dumpDataDir()` image of a freshly migrated database (a tarball in a temporary directory),
 * loaded by each file; on PostgreSQL a migrated database the files clone with `CREATE DATABASE … TEMPLATE`.
 */
export type TestTemplate = { kind: 'pglite'; file: string } | { kind: 'postgres'; database: string };

declare module 'vitest' {
  export interface ProvidedContext {
    coilpathTestTemplate: TestTemplate;
  }
}

/** The URL of database `name` on the server of `url`. */
export function databaseUrlFor(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = `/${name}`;
  return u.toString();
}

/** Runs `sql` on the server's maintenance connection (the database of `url`). */
export async function onServer(url: string, sql: string): Promise<void> {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    await c.query(sql);
  } finally {
    await c.end();
  }
}

/**
 * Drops a database. `WITH (FORCE)` ends other sessions in it — usually an autovacuum worker, which only
 * a superuser or a member of `pg_signal_backend` may end. Without that right the plain drop is tried; if
 * the database is still busy it is left behind with a warning rather than failing a run whose assertions
 * all passed (test databases start with `coilpath_t_`, templates with `coilpath_template_`).
 */
export async function dropDatabase(url: string, name: string): Promise<void> {
  try {
    await onServer(url, `DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
  } catch {
    try {
      await onServer(url, `DROP DATABASE IF EXISTS ${name}`);
    } catch (err) {
      console.warn(`test database ${name} left behind: ${(err as Error).message}`);
    }
  }
}

/** Migrates a new template with the app's own `openDatabase` and returns it with the way to remove it. */
export async function createTestTemplate(databaseUrl: string | undefined): Promise<{ template: TestTemplate; remove(): Promise<void> }> {
  if (databaseUrl) {
    const name = `coilpath_template_${process.pid}_${randomBytes(4).toString('hex')}`;
    await onServer(databaseUrl, `CREATE DATABASE ${name}`);
    try {
      const database = await openDatabase({ databaseUrl: databaseUrlFor(databaseUrl, name) });
      await database.close();
      // A clone needs a template nobody is connected to: no one (autovacuum aside, which CREATE DATABASE
      // ends by itself) may connect to it from now on.
      await onServer(databaseUrl, `ALTER DATABASE ${name} WITH ALLOW_CONNECTIONS false`);
    } catch (err) {
      await dropDatabase(databaseUrl, name);
      throw err;
    }
    return { template: { kind: 'postgres', database: name }, remove: () => dropDatabase(databaseUrl, name) };
  }
  const dir = mkdtempSync(join(tmpdir(), 'coilpath-test-template-'));
  try {
    const database = await openDatabase();
    try {
      await database.exec('CHECKPOINT');
      const image = await database.pglite!.dumpDataDir('none');
      const file = join(dir, 'migrated.tar');
      writeFileSync(file, Buffer.from(await image.arrayBuffer()));
      return {
        template: { kind: 'pglite', file },
        remove: async () => rmSync(dir, { recursive: true, force: true }),
      };
    } finally {
      await database.close();
    }
  } catch (err) {
    rmSync(dir, { recursive: true, force: true });
    throw err;
  }
}
