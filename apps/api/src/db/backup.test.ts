import { spawnSync } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { createReadStream, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, unlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createGunzip, gzipSync } from 'node:zlib';
import { eq } from 'drizzle-orm';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createJobQueue } from '../jobs/queue';
import { createApp } from '../app';
import type { AppContext } from '../context';
import { DataDirLocked, LOCK_FILE } from '../data-dir-lock';
import { systemClock } from '../lib/clock';
import { loadSecret } from '../secret';
import { createDiskStorage } from '../storage/storage';
import { makeBranch, makeSiteWithUnit, makeUser, makeWorkOrder, TEST_PASSWORD } from '../testing/fixtures';
import { memoryMailer, openTestDatabase } from '../testing/harness';
import { BackupError, createBackup, hasPgTools, restoreBackup, type BackupManifest, type BackupTarget } from './backup';
import { openDatabase, type Database } from './client';
import { attachments, branches, mailOutbox, visits } from './schema';
import { readTar, tarEnd, tarHeader, tarPadding } from './tar';

const tmp = mkdtempSync(join(tmpdir(), 'coilpath-backup-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));
const repoRoot = fileURLToPath(new URL('../../../..', import.meta.url));
const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

/** The API on a data directory the way server.ts builds it: disk storage under files/, the secret from the directory. */
function appOn(database: Database, dataDir: string) {
  const ctx: AppContext = {
    database,
    db: database.db,
    mailer: memoryMailer(),
    storage: createDiskStorage(join(dataDir, 'files')),
    clock: systemClock,
    jobs: createJobQueue(),
    secret: loadSecret(undefined, dataDir),
    config: { sessionHours: 12, secureCookies: false, publicUrl: 'http://coilpath.test', signInLimit: 1000 },
  };
  return { app: createApp(ctx), ctx };
}

interface Scenario {
  branchId: string;
  ownerEmail: string;
  /** Stored files and where the API serves each: two photos and an e-mailed PDF in the outbox. */
  files: { path: string; bytes: Buffer; key: string }[];
}

/** A branch, an owner, a visit with two photos, and an outbox message carrying a PDF — stored on disk. */
async function populate(database: Database, dataDir: string): Promise<Scenario> {
  const { ctx } = appOn(database, dataDir);
  const db = database.db;
  const branch = await makeBranch(db, { name: 'Before backup' });
  const owner = await makeUser(db, 'owner', null);
  const tech = await makeUser(db, 'technician', branch.id);
  const { site, unit } = await makeSiteWithUnit(db, branch.id);
  const wo = await makeWorkOrder(db, { branchId: branch.id, siteId: site.id, unitId: unit.id });
  const [visit] = await db.insert(visits).values({ branchId: branch.id, workOrderId: wo.id, techId: tech.id }).returning();
  const files: Scenario['files'] = [];
  for (const name of ['condenser.jpg', 'nameplate.jpg']) {
    const bytes = randomBytes(40_000 + files.length * 1000);
    const key = await ctx.storage.put(bytes, { contentType: 'image/jpeg' });
    const [a] = await db
      .insert(attachments)
      .values({
        visitId: visit!.id,
        unitId: unit.id,
        kind: 'photo',
        storageKey: key,
        displayName: name,
        contentType: 'image/jpeg',
        sizeBytes: bytes.length,
      })
      .returning();
    files.push({ path: `/api/attachments/${a!.id}`, bytes, key });
  }
  const pdf = Buffer.concat([Buffer.from('%PDF-1.4\n'), randomBytes(12_000)]);
  const pdfKey = await ctx.storage.put(pdf, { contentType: 'application/pdf' });
  const [m] = await db
    .insert(mailOutbox)
    .values({
      from: 'a@test.example',
      to: 'b@test.example',
      subject: 'Service summary',
      attachments: [{ filename: 'summary.pdf', contentType: 'application/pdf', size: pdf.length, storageKey: pdfKey }],
    })
    .returning();
  files.push({ path: `/api/outbox/${m!.id}/attachments/0`, bytes: pdf, key: pdfKey });
  return { branchId: branch.id, ownerEmail: owner.email, files };
}

async function signIn(database: Database, dataDir: string, email: string): Promise<string> {
  const res = await request(appOn(database, dataDir).app).post('/api/auth/sign-in').send({ email, password: TEST_PASSWORD });
  expect(res.status).toBe(200);
  return String(res.headers['set-cookie']).split(';')[0]!;
}

/** Every stored file answers through the API with the very bytes stored (SHA-256), and the cookie is accepted. */
async function expectServed(database: Database, dataDir: string, s: Scenario, cookie: string) {
  const { app } = appOn(database, dataDir);
  const me = await request(app).get('/api/auth/me').set('Cookie', cookie);
  expect(me.status, 'the session cookie from before the backup').toBe(200);
  for (const f of s.files) {
    const res = await request(app)
      .get(f.path)
      .set('Cookie', cookie)
      .buffer(true)
      .parse((r, cb) => {
        const parts: Buffer[] = [];
        r.on('data', (c: Buffer) => parts.push(c));
        r.on('end', () => cb(null, Buffer.concat(parts)));
      });
    expect(res.status, f.path).toBe(200);
    expect(sha256(res.body as Buffer), f.path).toBe(sha256(f.bytes));
  }
}

async function branchName(database: Database, id: string) {
  const [b] = await database.db.select({ name: branches.name }).from(branches).where(eq(branches.id, id));
  return b?.name;
}

/** Reads a backup's entries, lets `change` alter or drop them, and writes a well-formed archive again. */
async function rewrite(file: string, out: string, change: (name: string, data: Buffer) => Buffer | null) {
  const entries: { name: string; data: Buffer }[] = [];
  await readTar(createReadStream(file).pipe(createGunzip()), async ({ name, content }) => {
    const parts: Buffer[] = [];
    for await (const c of content) parts.push(c);
    entries.push({ name, data: Buffer.concat(parts) });
  });
  const chunks: Buffer[] = [];
  for (const e of entries) {
    const data = change(e.name, e.data);
    if (data) chunks.push(tarHeader(e.name, data.length, new Date(0)), data, tarPadding(data.length));
  }
  chunks.push(tarEnd());
  writeFileSync(out, gzipSync(Buffer.concat(chunks)));
  return entries.map((e) => e.name);
}

function cli(args: string[], dataDir: string) {
  const env: NodeJS.ProcessEnv = { ...process.env, COILPATH_DATA_DIR: dataDir };
  delete env.DATABASE_URL;
  delete env.COILPATH_SECRET;
  delete env.NODE_OPTIONS;
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'apps/api/src/db/backup-cli.ts', ...args], {
    cwd: repoRoot,
    env,
    encoding: 'utf8',
  });
  return { code: r.status, out: `${r.stdout}${r.stderr}` };
}

/** The data directory's state, to show a refused restore replaced nothing. */
function listing(dataDir: string): string[] {
  const walk = (d: string, rel = ''): string[] =>
    readdirSync(d, { withFileTypes: true }).flatMap((e) =>
      e.isDirectory() && (rel + e.name === 'pg' || rel === '') ? walk(join(d, e.name), `${rel}${e.name}/`) : [`${rel}${e.name}`],
    );
  return walk(dataDir)
    .filter((p) => !p.startsWith('pg/'))
    .sort();
}

// The PostgreSQL pass of .ci/run tests the pg_dump path below; PGlite's is tested on the default pass.
describe.runIf(!process.env.DATABASE_URL)('backups of the embedded database, files and secret', { timeout: 240_000 }, () => {
  const dataDir = join(tmp, 'data');
  const file = join(tmp, 'out', 'coilpath-backup.tar.gz');
  const target: BackupTarget = { kind: 'pglite', dataDir };
  let s: Scenario;
  let cookie: string;

  it('round-trips through the commands: photos and outbox PDFs byte for byte, and a session from before still works', async () => {
    let database = await openDatabase({ dataDir: join(dataDir, 'pg') });
    s = await populate(database, dataDir);
    cookie = await signIn(database, dataDir, s.ownerEmail);
    await expectServed(database, dataDir, s, cookie);
    await database.close();

    const backup = cli(['backup', file], dataDir);
    expect(backup.code, backup.out).toBe(0);
    expect(backup.out).toContain('files: 3 files');
    expect(backup.out).toContain('session secret: included');
    expect(existsSync(join(dataDir, LOCK_FILE)), 'the backup released the data directory').toBe(false);

    // A standard tar lists it: the database, the secret, every file, and the manifest last.
    const listed = spawnSync('tar', ['-tzf', file], { encoding: 'utf8' }).stdout.trim().split('\n');
    expect(listed).toEqual(['database/pglite.tar.gz', 'session-secret', ...s.files.map((f) => `files/${f.key}`).sort(), 'manifest.json']);
    const manifest = JSON.parse(spawnSync('tar', ['-xzOf', file, 'manifest.json'], { encoding: 'utf8' }).stdout) as BackupManifest;
    expect(manifest.schemaVersion).toMatch(/^\d{4}_/);
    expect(manifest.tables.attachments).toBe(2);
    expect(manifest.tables.mail_outbox).toBe(1);
    expect(manifest.tables.users).toBe(2);
    expect(manifest.files.count).toBe(3);
    expect(manifest.files.totalBytes).toBe(s.files.reduce((n, f) => n + f.bytes.length, 0));
    expect(Object.fromEntries(manifest.files.entries.map((e) => [e.key, e.sha256]))).toEqual(
      Object.fromEntries(s.files.map((f) => [f.key, sha256(f.bytes)])),
    );
    expect(manifest.files.missing).toEqual([]);
    expect(manifest.secret).toMatchObject({ included: true, sha256: sha256(readFileSync(join(dataDir, 'session-secret'))) });

    // The machine is lost: the whole data directory is gone. The restore needs no --force into nothing.
    rmSync(dataDir, { recursive: true, force: true });
    const restore = cli(['restore', file], dataDir);
    expect(restore.code, restore.out).toBe(0);
    expect(restore.out).toContain('every entry matches its SHA-256 in the manifest');
    expect(restore.out).toMatch(/the counts match the manifest:\n[\s\S]*?attachments 2,/);
    expect(restore.out).toContain('files: 3 files');
    expect(restore.out).toContain('session secret: restored');

    database = await openDatabase({ dataDir: join(dataDir, 'pg') });
    try {
      expect(await branchName(database, s.branchId)).toBe('Before backup');
      await expectServed(database, dataDir, s, cookie);
    } finally {
      await database.close();
    }
  });

  it('with --force, replaces changed data and keeps it aside; without, refuses', async () => {
    let database = await openDatabase({ dataDir: join(dataDir, 'pg') });
    await database.db.update(branches).set({ name: 'Renamed after backup' }).where(eq(branches.id, s.branchId));
    await database.close();
    unlinkSync(join(dataDir, 'files', s.files[0]!.key)); // a photo's bytes lost
    writeFileSync(join(dataDir, 'session-secret'), 'a-different-secret-a-different-secret-0123');

    await expect(restoreBackup(target, file)).rejects.toThrow(/--force/);
    const r = await restoreBackup(target, file, { force: true, now: new Date('2026-03-01T10:00:00Z') });
    expect(r.movedAside).toBe(join(dataDir, 'before-restore-2026-03-01T10-00-00-000Z'));
    expect(readdirSync(r.movedAside!).sort()).toEqual(['files', 'pg', 'session-secret']);
    expect(readFileSync(join(r.movedAside!, 'session-secret'), 'utf8')).toContain('a-different-secret');
    expect(r.tables.attachments).toBe(2);
    expect(r.files).toEqual({ count: 3, totalBytes: s.files.reduce((n, f) => n + f.bytes.length, 0) });

    database = await openDatabase({ dataDir: join(dataDir, 'pg') });
    try {
      expect(await branchName(database, s.branchId)).toBe('Before backup');
      await expectServed(database, dataDir, s, cookie);
    } finally {
      await database.close();
    }
    // The moved-aside database still holds the state from before the restore.
    const before = await openDatabase({ dataDir: join(r.movedAside!, 'pg') });
    try {
      expect(await branchName(before, s.branchId)).toBe('Renamed after backup');
    } finally {
      await before.close();
    }
    rmSync(r.movedAside!, { recursive: true, force: true });
  });

  it('refuses a tampered, recounted or truncated backup before replacing anything', async () => {
    let database = await openDatabase({ dataDir: join(dataDir, 'pg') });
    await database.db.update(branches).set({ name: 'Current' }).where(eq(branches.id, s.branchId));
    await database.close();
    const state = listing(dataDir);

    // One byte of a photo changed inside the archive.
    const tampered = join(tmp, 'tampered.tar.gz');
    await rewrite(file, tampered, (name, data) => {
      if (name !== `files/${s.files[1]!.key}`) return data;
      const d = Buffer.from(data);
      d[1000] = d[1000]! ^ 0xff;
      return d;
    });
    await expect(restoreBackup(target, tampered, { force: true })).rejects.toThrow(
      new RegExp(`does not match its manifest: files/${s.files[1]!.key} does not match its SHA-256.*Nothing was restored`),
    );

    // A photo left out of the archive.
    const short = join(tmp, 'short.tar.gz');
    await rewrite(file, short, (name, data) => (name === `files/${s.files[0]!.key}` ? null : data));
    await expect(restoreBackup(target, short, { force: true })).rejects.toThrow(`files/${s.files[0]!.key} is missing`);

    // The manifest rewritten to count a row the database does not hold (its entries' hashes still right).
    const recounted = join(tmp, 'recounted.tar.gz');
    await rewrite(file, recounted, (name, data) => {
      if (name !== 'manifest.json') return data;
      const m = JSON.parse(data.toString()) as BackupManifest;
      m.tables.users = (m.tables.users ?? 0) + 1;
      return Buffer.from(JSON.stringify(m));
    });
    await expect(restoreBackup(target, recounted, { force: true })).rejects.toThrow(
      /does not hold the rows its manifest counts \(users: 2 rows, the manifest says 3\)/,
    );

    // Cut off half-way.
    const truncated = join(tmp, 'truncated.tar.gz');
    const whole = readFileSync(file);
    writeFileSync(truncated, whole.subarray(0, Math.floor(whole.length / 2)));
    await expect(restoreBackup(target, truncated, { force: true })).rejects.toThrow(/damaged|truncated/);

    // Not a backup at all, and no file.
    const junk = join(tmp, 'junk.tar.gz');
    writeFileSync(junk, 'not a backup');
    await expect(restoreBackup(target, junk, { force: true })).rejects.toBeInstanceOf(BackupError);
    await expect(restoreBackup(target, join(tmp, 'missing.tar.gz'))).rejects.toThrow(/No backup file/);

    // Nothing was replaced, moved aside or left behind, and the database is the current one.
    expect(listing(dataDir)).toEqual(state);
    database = await openDatabase({ dataDir: join(dataDir, 'pg') });
    try {
      expect(await branchName(database, s.branchId)).toBe('Current');
    } finally {
      await database.close();
    }
  });

  it('refuses to back up or restore while another process holds the data directory, naming it', async () => {
    writeFileSync(
      join(dataDir, LOCK_FILE),
      JSON.stringify({
        pid: process.ppid,
        host: (await import('node:os')).hostname(),
        purpose: 'server',
        startedAt: '2026-03-01T10:00:00.000Z',
        token: 'live',
      }),
    );
    try {
      const err = await createBackup(target, join(tmp, 'while-running.tar.gz')).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(DataDirLocked);
      expect((err as Error).message).toContain(`pid ${process.ppid}, server`);
      await expect(restoreBackup(target, file, { force: true })).rejects.toThrow(`pid ${process.ppid}`);
      expect(existsSync(join(tmp, 'while-running.tar.gz'))).toBe(false);
    } finally {
      unlinkSync(join(dataDir, LOCK_FILE));
    }
    await expect(createBackup({ kind: 'pglite', dataDir: join(tmp, 'nothing-here') }, join(tmp, 'x.tar.gz'))).rejects.toThrow(
      /no database/,
    );
  });

  it('restores a database-only backup from before manifests, saying so and leaving files alone', async () => {
    // What `db:backup` wrote before: the embedded data directory alone, as PGlite dumps it.
    const legacy = join(tmp, 'legacy.tar.gz');
    const source = await openDatabase({ dataDir: join(tmp, 'legacy-source') });
    try {
      await makeBranch(source.db, { name: 'Legacy' });
      writeFileSync(legacy, Buffer.from(await (await source.pglite!.dumpDataDir('gzip')).arrayBuffer()));
    } finally {
      await source.close();
    }
    const into = join(tmp, 'legacy-target');
    const r = await restoreBackup({ kind: 'pglite', dataDir: into }, legacy);
    expect(r.manifest).toBeNull();
    expect(r.tables.branches).toBe(1);
    expect(r.secretRestored).toBe(false);
    expect(readdirSync(into).sort()).toEqual(['pg']);
  });
});

const pgTools = await hasPgTools();

describe.runIf(Boolean(process.env.DATABASE_URL) && pgTools)(
  'PostgreSQL backups with pg_dump, files and secret',
  { timeout: 240_000 },
  () => {
    it('round-trips, and a recounted backup rolls back leaving the database as it was', async () => {
      const database = await openTestDatabase();
      const url = (database.pool as unknown as { options: { connectionString: string } }).options.connectionString;
      const dataDir = join(tmp, 'pg-data');
      const file = join(tmp, 'pg-backup.tar.gz');
      const target: BackupTarget = { kind: 'postgres', url, dataDir };
      try {
        const s = await populate(database, dataDir);
        const cookie = await signIn(database, dataDir, s.ownerEmail);
        const { manifest } = await createBackup(target, file);
        expect(manifest.database.kind).toBe('postgres');
        expect(manifest.tables.attachments).toBe(2);
        expect(manifest.files.count).toBe(3);

        await database.db.update(branches).set({ name: 'Renamed after backup' }).where(eq(branches.id, s.branchId));
        await database.db.delete(mailOutbox);
        unlinkSync(join(dataDir, 'files', s.files[2]!.key));
        unlinkSync(join(dataDir, 'session-secret'));

        await expect(restoreBackup(target, file)).rejects.toThrow(/--force/);
        const r = await restoreBackup(target, file, { force: true });
        expect(r.tables).toEqual(manifest.tables);
        expect(await branchName(database, s.branchId)).toBe('Before backup');
        await expectServed(database, dataDir, s, cookie);

        await database.db.update(branches).set({ name: 'Current' }).where(eq(branches.id, s.branchId));
        const recounted = join(tmp, 'pg-recounted.tar.gz');
        await rewrite(file, recounted, (name, data) => {
          if (name !== 'manifest.json') return data;
          const m = JSON.parse(data.toString()) as BackupManifest;
          m.tables.branches = (m.tables.branches ?? 0) + 1;
          return Buffer.from(JSON.stringify(m));
        });
        await expect(restoreBackup(target, recounted, { force: true })).rejects.toThrow(
          /coilpath restore: table branches holds 1 rows, the manifest says 2/,
        );
        expect(await branchName(database, s.branchId), 'the failed restore was rolled back').toBe('Current');

        // What `db:backup` wrote before on PostgreSQL: a bare pg_dump file. It restores, database only.
        const legacy = join(tmp, 'pg-legacy.dump');
        expect(spawnSync('pg_dump', ['--format=custom', `--file=${legacy}`, `--dbname=${url}`]).status).toBe(0);
        await database.db.update(branches).set({ name: 'After the old dump' }).where(eq(branches.id, s.branchId));
        const old = await restoreBackup(target, legacy, { force: true });
        expect(old.manifest).toBeNull();
        expect(old.tables.branches).toBe(1);
        expect(await branchName(database, s.branchId)).toBe('Current');
      } finally {
        await database.close();
      }
    });
  },
);
