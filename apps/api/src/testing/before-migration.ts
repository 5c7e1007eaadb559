/**
 * A test database as the previous release left it: every migration before the one whose tag ends with
 * `tagSuffix` (from a copy of the folder with a shortened journal), on PGlite or, with `DATABASE_URL`, on
 * PostgreSQL. `migrateRest()` then applies the rest, as an upgrade does.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { migrate as migratePglite } from 'drizzle-orm/pglite/migrator';
import { migrate as migratePg } from 'drizzle-orm/node-postgres/migrator';
import { migrationsFolder, type Database } from '../db/client';
import { openTestDatabase } from './harness';

export async function databaseBefore(
  tagSuffix: string,
): Promise<{ database: Database; migrateRest(): Promise<void>; close(): Promise<void> }> {
  const before = mkdtempSync(join(tmpdir(), `coilpath-before${tagSuffix}-`));
  cpSync(migrationsFolder, before, { recursive: true });
  const journalPath = join(before, 'meta', '_journal.json');
  const journal = JSON.parse(readFileSync(journalPath, 'utf8')) as { entries: { idx: number; tag: string }[] };
  const mine = journal.entries.find((e) => e.tag.endsWith(tagSuffix));
  if (!mine) throw new Error(`no ${tagSuffix} migration in the journal`);
  journal.entries = journal.entries.filter((e) => e.idx < mine.idx);
  writeFileSync(journalPath, JSON.stringify(journal));
  const database = await openTestDatabase({ migrate: false });
  const migrate = (folder: string) =>
    database.kind === 'pglite'
      ? migratePglite(database.db, { migrationsFolder: folder })
      : migratePg(database.db as never, { migrationsFolder: folder });
  await migrate(before);
  return {
    database,
    migrateRest: () => migrate(migrationsFolder),
    async close() {
      await database.close();
      rmSync(before, { recursive: true, force: true });
    },
  };
}
