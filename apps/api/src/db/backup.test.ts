import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { openDatabase } from './client';
import { BackupError, backupDatabase, hasPgTools, restoreDatabase } from './backup';
import { branches, customers } from './schema';
import { makeBranch } from '../testing/fixtures';
import { openTestDatabase } from '../testing/harness';

const tmp = mkdtempSync(join(tmpdir(), 'coilpath-backup-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

// The PostgreSQL pass of .ci/run tests the pg_dump path below; PGlite's is tested on the default pass.
describe.runIf(!process.env.DATABASE_URL)('PGlite data-directory backup', { timeout: 120_000 }, () => {
  it('round-trips: rows changed or deleted after the backup are back after a restore', async () => {
    const dataDir = join(tmp, 'pg');
    const file = join(tmp, 'out', 'coilpath.tar.gz');

    let database = await openDatabase({ dataDir });
    const branch = await makeBranch(database.db, { name: 'Before backup' });
    await database.db.insert(customers).values([
      { branchId: branch.id, name: 'Kept customer' },
      { branchId: branch.id, name: 'Deleted later' },
    ]);
    await database.close();

    const { bytes } = await backupDatabase({ kind: 'pglite', dataDir }, file);
    expect(bytes).toBeGreaterThan(1000);
    expect(existsSync(file)).toBe(true);

    database = await openDatabase({ dataDir });
    await database.db.update(branches).set({ name: 'Renamed after backup' }).where(eq(branches.id, branch.id));
    await database.db.delete(customers).where(eq(customers.name, 'Deleted later'));
    await database.db.insert(customers).values({ branchId: branch.id, name: 'Added after backup' });
    await database.close();

    // The directory holds a database: a restore without --force refuses and changes nothing.
    await expect(restoreDatabase({ kind: 'pglite', dataDir }, file)).rejects.toThrow(/--force/);

    const { movedAside } = await restoreDatabase({ kind: 'pglite', dataDir }, file, { force: true, now: new Date('2026-03-01T10:00:00Z') });
    expect(movedAside).toBe(`${dataDir}.before-restore-2026-03-01T10-00-00-000Z`);
    expect(existsSync(movedAside!)).toBe(true);

    database = await openDatabase({ dataDir });
    try {
      const [b] = await database.db.select().from(branches).where(eq(branches.id, branch.id));
      expect(b?.name).toBe('Before backup');
      const names = (await database.db.select({ name: customers.name }).from(customers)).map((c) => c.name).sort();
      expect(names).toEqual(['Deleted later', 'Kept customer']);
    } finally {
      await database.close();
    }

    // The moved-aside directory still holds the state from before the restore.
    const before = await openDatabase({ dataDir: movedAside! });
    try {
      const names = (await before.db.select({ name: customers.name }).from(customers)).map((c) => c.name).sort();
      expect(names).toEqual(['Added after backup', 'Kept customer']);
    } finally {
      await before.close();
    }
  });

  it('restores into an empty directory without --force, and refuses files that are not backups', async () => {
    // The backup of the first test: its directory held 'Before backup' and two customers.
    const file = join(tmp, 'out', 'coilpath.tar.gz');
    const target = join(tmp, 'target');
    expect(await restoreDatabase({ kind: 'pglite', dataDir: target }, file)).toEqual({});
    const restored = await openDatabase({ dataDir: target });
    try {
      const rows = await restored.db.select({ name: branches.name }).from(branches);
      expect(rows.map((r) => r.name)).toEqual(['Before backup']);
    } finally {
      await restored.close();
    }

    const junk = join(tmp, 'junk.tar.gz');
    writeFileSync(junk, 'not a backup');
    await expect(restoreDatabase({ kind: 'pglite', dataDir: join(tmp, 'other') }, junk)).rejects.toBeInstanceOf(BackupError);
    await expect(restoreDatabase({ kind: 'pglite', dataDir: join(tmp, 'other') }, join(tmp, 'missing.tar.gz'))).rejects.toThrow(/No backup file/);
    await expect(backupDatabase({ kind: 'pglite', dataDir: join(tmp, 'nothing-here') }, join(tmp, 'x.tar.gz'))).rejects.toThrow(/no database/);
  });
});

const pgTools = await hasPgTools();

describe.runIf(Boolean(process.env.DATABASE_URL) && pgTools)('PostgreSQL backup with pg_dump / pg_restore', () => {
  it('round-trips: rows changed or deleted after the backup are back after a restore', async () => {
    const database = await openTestDatabase();
    const url = (database.pool as unknown as { options: { connectionString: string } }).options.connectionString;
    const file = join(tmp, 'pg.dump');
    try {
      const branch = await makeBranch(database.db, { name: 'Before backup' });
      await database.db.insert(customers).values([
        { branchId: branch.id, name: 'Kept customer' },
        { branchId: branch.id, name: 'Deleted later' },
      ]);
      await backupDatabase({ kind: 'postgres', url }, file);

      await database.db.update(branches).set({ name: 'Renamed after backup' }).where(eq(branches.id, branch.id));
      await database.db.delete(customers).where(eq(customers.name, 'Deleted later'));

      await expect(restoreDatabase({ kind: 'postgres', url }, file)).rejects.toThrow(/--force/);
      await restoreDatabase({ kind: 'postgres', url }, file, { force: true });

      const [b] = await database.db.select().from(branches).where(eq(branches.id, branch.id));
      expect(b?.name).toBe('Before backup');
      const names = (await database.db.select({ name: customers.name }).from(customers)).map((c) => c.name).sort();
      expect(names).toEqual(['Deleted later', 'Kept customer']);
    } finally {
      await database.close();
    }
  });
});
