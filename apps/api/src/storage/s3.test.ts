/**
 * The S3 backend against a local S3 fake (`s3rver`, started here on a free port with a temporary directory):
 * the same interface as the disk — generated keys, the same bytes back, a missing object is
 * `StoredFileMissing` and so 410 `file_missing` through the routes.
 */
import { createJobQueue } from '../jobs/queue';
import { spawnSync } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import S3rver from 's3rver';
import { DeleteObjectCommand, GetObjectCommand } from '@aws-sdk/client-s3';
import { createApp } from '../app';
import type { AppContext } from '../context';
import type { BackupManifest } from '../db/backup';
import { openDatabase, type Database } from '../db/client';
import { attachments, mailOutbox, visits } from '../db/schema';
import { systemClock } from '../lib/clock';
import { readEnv } from '../lib/config';
import { loadSecret } from '../secret';
import { createTestApp, memoryMailer, signedInAgent, type TestApp } from '../testing/harness';
import { makeBranch, makeSiteWithUnit, makeTwoBranches, makeUser, makeWorkOrder, TEST_PASSWORD } from '../testing/fixtures';
import { createS3Storage, s3SettingsFromEnv, type S3Settings } from './s3';
import { StoredFileMissing } from './storage';

// The SDK warns once per process that its releases after January 2027 need Node 22 (the version is pinned).
process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED = 'true';

const BUCKET = 'coilpath-files';
const sha256 = (b: Buffer | Uint8Array) => createHash('sha256').update(b).digest('hex');

let dir: string;
let fake: S3rver;
let settings: S3Settings;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'coilpath-s3rver-'));
  fake = new S3rver({ address: '127.0.0.1', port: 0, silent: true, directory: dir, configureBuckets: [{ name: BUCKET, configs: [] }] });
  const { port } = await fake.run();
  // s3rver accepts the credentials S3RVER/S3RVER (its README).
  settings = {
    endpoint: `http://127.0.0.1:${port}`,
    bucket: BUCKET,
    region: 'us-east-1',
    pathStyle: true,
    credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' },
  };
});
afterAll(async () => {
  await fake?.close();
  rmSync(dir, { recursive: true, force: true });
});

describe('S3 storage', () => {
  it('stores under generated names and reads back the same bytes, as an object of that name in the bucket', async () => {
    const s = createS3Storage(settings);
    await s.check();
    const content = Buffer.from(Array.from({ length: 70_000 }, (_, i) => (i * 31 + 7) % 256));
    const key = await s.put(content, { contentType: 'image/jpeg' });
    expect(key).toMatch(/^[0-9a-f]{2}\/[0-9a-f-]{36}$/);
    expect(sha256(await s.get(key))).toBe(sha256(content));

    const object = await s.client.send(new GetObjectCommand({ Bucket: BUCKET, Key: key }));
    expect(object.ContentType).toBe('image/jpeg');
    expect(sha256(await object.Body!.transformToByteArray())).toBe(sha256(content));

    const other = await s.put(Buffer.from('second'), { contentType: 'text/plain' });
    expect(other).not.toBe(key);

    await s.remove(key);
    const err = await s.get(key).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StoredFileMissing);
    expect((err as StoredFileMissing).key).toBe(key);
    expect((await s.get(other)).toString()).toBe('second');
  });

  it('refuses keys that are not its own', async () => {
    const s = createS3Storage(settings);
    for (const bad of ['../x', 'ab/not-a-uuid', 'ab/../../etc/passwd']) {
      await expect(s.get(bad)).rejects.toThrow('Bad storage key');
      await expect(s.remove(bad)).rejects.toThrow('Bad storage key');
    }
  });

  it('says plainly when the bucket cannot be used', async () => {
    await expect(createS3Storage({ ...settings, bucket: 'no-such-bucket' }).check()).rejects.toThrow(
      /The S3 bucket no-such-bucket at http:\/\/127\.0\.0\.1:\d+ cannot be used: it does not exist/,
    );
  });
});

describe('the API on S3 storage', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp();
  });
  afterAll(() => t?.close());

  it('serves a stored photo, and answers 410 file_missing once its object is gone', async () => {
    const s3 = createS3Storage(settings);
    const app = createApp({ ...t.ctx, storage: s3 });
    const f = await makeTwoBranches(t.ctx.db);
    const { site, unit } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const wo = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: site.id, unitId: unit.id });
    const [v] = await t.ctx.db.insert(visits).values({ branchId: f.a.id, workOrderId: wo.id, techId: f.inA.technician.id }).returning();
    // A PNG signature and header (ISO/IEC 15948 §5.2, §11.2.2): enough for the file-type check.
    const png = Buffer.from('89504e470d0a1a0a0000000d4948445200000001000000010806000000', 'hex');
    const tech = await signedInAgent(app, f.inA.technician.email, TEST_PASSWORD);
    const up = await tech.post(`/api/visits/${v!.id}/attachments`).attach('file', png, { filename: 'coil.png', contentType: 'image/png' });
    expect(up.status).toBe(201);
    const [row] = await t.ctx.db.select().from(attachments);
    expect(row).toBeDefined();
    // The bytes are in the bucket, not in the test's memory storage.
    await expect(t.storage.get(row!.storageKey)).rejects.toBeInstanceOf(StoredFileMissing);
    const there = await tech.get(`/api/attachments/${row!.id}`);
    expect(there.status).toBe(200);
    expect(Buffer.compare(there.body as Buffer, png)).toBe(0);

    await s3.client.send(new DeleteObjectCommand({ Bucket: BUCKET, Key: row!.storageKey }));
    const gone = await tech.get(`/api/attachments/${row!.id}`);
    expect(gone.status).toBe(410);
    expect(gone.body.error.code).toBe('file_missing');
  });
});

describe('S3 settings from the environment', () => {
  const env = (vars: Record<string, string>) => readEnv({ ...vars });

  it('uses the disk without S3_BUCKET, and the bucket with it (path-style by default behind S3_URL)', () => {
    expect(s3SettingsFromEnv(env({}))).toBeNull();
    expect(
      s3SettingsFromEnv(
        env({ S3_BUCKET: 'coilpath-files', S3_URL: 'http://127.0.0.1:4568', S3_ACCESS_KEY_ID: 'k', S3_SECRET_ACCESS_KEY: 's' }),
      ),
    ).toEqual({
      endpoint: 'http://127.0.0.1:4568',
      bucket: 'coilpath-files',
      region: 'us-east-1',
      pathStyle: true,
      credentials: { accessKeyId: 'k', secretAccessKey: 's' },
    });
    const aws = s3SettingsFromEnv(env({ S3_BUCKET: 'coilpath-files', S3_REGION: 'eu-central-1' }));
    expect(aws).toMatchObject({ endpoint: null, region: 'eu-central-1', pathStyle: false, credentials: undefined });
    expect(s3SettingsFromEnv(env({ S3_BUCKET: 'coilpath-files', S3_URL: 'https://s3.example', S3_PATH_STYLE: 'false' }))?.pathStyle).toBe(
      false,
    );
  });

  it('refuses half a configuration and a bad bucket name or address', () => {
    expect(() => s3SettingsFromEnv(env({ S3_URL: 'http://127.0.0.1:4568' }))).toThrow(/S3_BUCKET/);
    expect(() => s3SettingsFromEnv(env({ S3_BUCKET: 'coilpath-files', S3_ACCESS_KEY_ID: 'k' }))).toThrow(/set both, or neither/);
    expect(() => env({ S3_BUCKET: 'No_Such' })).toThrow(/S3_BUCKET must be a bucket name/);
    expect(() => env({ S3_BUCKET: 'ab' })).toThrow(/S3_BUCKET must be a bucket name/);
    expect(() => env({ S3_BUCKET: 'coilpath-files', S3_URL: 'ftp://x' })).toThrow(/S3_URL must be an http/);
  });
});

// The PostgreSQL pass of .ci/run backs up with pg_dump (backup.test.ts); the S3 part is the same on both.
describe.runIf(!process.env.DATABASE_URL)('backups of an S3 deployment', { timeout: 240_000 }, () => {
  const repoRoot = fileURLToPath(new URL('../../../..', import.meta.url));

  const appOn = (database: Database, dataDir: string) => {
    const ctx: AppContext = {
      database,
      db: database.db,
      mailer: memoryMailer(),
      storage: createS3Storage(settings),
      clock: systemClock,
      jobs: createJobQueue(),
      secret: loadSecret(undefined, dataDir),
      config: { sessionHours: 12, secureCookies: false, publicUrl: 'http://coilpath.test', signInLimit: 1000 },
    };
    return createApp(ctx);
  };

  const cli = (args: string[], dataDir: string) => {
    const env: NodeJS.ProcessEnv = {
      ...process.env,
      COILPATH_DATA_DIR: dataDir,
      S3_URL: settings.endpoint!,
      S3_BUCKET: BUCKET,
      S3_ACCESS_KEY_ID: 'S3RVER',
      S3_SECRET_ACCESS_KEY: 'S3RVER',
    };
    delete env.DATABASE_URL;
    delete env.COILPATH_SECRET;
    delete env.NODE_OPTIONS;
    const r = spawnSync(process.execPath, ['--import', 'tsx', 'apps/api/src/db/backup-cli.ts', ...args], {
      cwd: repoRoot,
      env,
      encoding: 'utf8',
    });
    return { code: r.status, out: `${r.stdout}${r.stderr}` };
  };

  it('records where the files are and copies no object; the restore says so, and the restored installation serves every file from the bucket', async () => {
    const root = mkdtempSync(join(tmpdir(), 'coilpath-s3-backup-'));
    const dataDir = join(root, 'data');
    const file = join(root, 'backup.tar.gz');
    try {
      let database = await openDatabase({ dataDir: join(dataDir, 'pg') });
      const s3 = createS3Storage(settings);
      const db = database.db;
      const branch = await makeBranch(db);
      const owner = await makeUser(db, 'owner', null);
      const tech = await makeUser(db, 'technician', branch.id);
      const { site, unit } = await makeSiteWithUnit(db, branch.id);
      const wo = await makeWorkOrder(db, { branchId: branch.id, siteId: site.id, unitId: unit.id });
      const [visit] = await db.insert(visits).values({ branchId: branch.id, workOrderId: wo.id, techId: tech.id }).returning();
      const photo = randomBytes(30_000);
      const photoKey = await s3.put(photo, { contentType: 'image/jpeg' });
      const [a] = await db
        .insert(attachments)
        .values({
          visitId: visit!.id,
          unitId: unit.id,
          kind: 'photo',
          storageKey: photoKey,
          displayName: 'coil.jpg',
          contentType: 'image/jpeg',
          sizeBytes: photo.length,
        })
        .returning();
      const pdf = Buffer.concat([Buffer.from('%PDF-1.4\n'), randomBytes(9_000)]);
      const pdfKey = await s3.put(pdf, { contentType: 'application/pdf' });
      const [m] = await db
        .insert(mailOutbox)
        .values({
          from: 'a@test.example',
          to: 'b@test.example',
          subject: 'Service summary',
          attachments: [{ filename: 'summary.pdf', contentType: 'application/pdf', size: pdf.length, storageKey: pdfKey }],
        })
        .returning();
      const served = [
        { path: `/api/attachments/${a!.id}`, bytes: photo },
        { path: `/api/outbox/${m!.id}/attachments/0`, bytes: pdf },
      ];
      const signIn = await request(appOn(database, dataDir))
        .post('/api/auth/sign-in')
        .send({ email: owner.email, password: TEST_PASSWORD });
      expect(signIn.status).toBe(200);
      const cookie = String(signIn.headers['set-cookie']).split(';')[0]!;
      await database.close();

      const backup = cli(['backup', file], dataDir);
      expect(backup.code, backup.out).toBe(0);
      expect(backup.out).toContain(
        `files: not copied — they stay in the S3 bucket ${BUCKET} at ${settings.endpoint} (2 objects the database refers to)`,
      );
      expect(backup.out).not.toContain('and every stored file');

      const listed = spawnSync('tar', ['-tzf', file], { encoding: 'utf8' }).stdout.trim().split('\n');
      expect(listed).toEqual(['database/pglite.tar.gz', 'session-secret', 'manifest.json']);
      const manifest = JSON.parse(spawnSync('tar', ['-xzOf', file, 'manifest.json'], { encoding: 'utf8' }).stdout) as BackupManifest;
      expect(manifest.storage).toEqual({
        kind: 's3',
        endpoint: settings.endpoint,
        bucket: BUCKET,
        region: 'us-east-1',
        referencedObjects: 2,
      });
      expect(manifest.files).toMatchObject({ count: 0, totalBytes: 0, entries: [], missing: [] });
      expect(JSON.stringify(manifest)).not.toContain('S3RVER');

      rmSync(dataDir, { recursive: true, force: true });
      const restore = cli(['restore', file], dataDir);
      expect(restore.code, restore.out).toBe(0);
      expect(restore.out).toContain(
        `files: not in this backup — the database refers to 2 objects in the S3 bucket ${BUCKET} at ${settings.endpoint}; they were not touched.`,
      );
      // The same bucket is configured: nothing to point elsewhere.
      expect(restore.out).not.toContain('Point S3_URL');
      expect(existsSync(join(dataDir, 'files'))).toBe(false);

      database = await openDatabase({ dataDir: join(dataDir, 'pg') });
      try {
        const app = appOn(database, dataDir);
        for (const f of served) {
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
      } finally {
        await database.close();
      }
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  });
});
