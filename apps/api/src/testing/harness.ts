import { randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import request from 'supertest';
import type { Express } from 'express';
import { inject } from 'vitest';
import { createApp } from '../app';
import type { AppContext } from '../context';
import { openDatabase, type Database } from '../db/client';
import { fixedClock, type Clock } from '../lib/clock';
import { createJobQueue } from '../jobs/queue';
import type { Mailer, MailMessage } from '../mail/mailer';
import { createMemoryStorage, type Storage } from '../storage/storage';
import type { Logger } from '../lib/logger';
import { databaseUrlFor, dropDatabase, onServer, type TestTemplate } from './test-template';

/** The template of this run (`global-setup.ts`), or undefined outside the `api` and `tests` projects. */
function testTemplate(): TestTemplate | undefined {
  try {
    return inject('coilpathTestTemplate');
  } catch {
    return undefined;
  }
}

let templateImage: Blob | undefined;

/**
 * A fresh, migrated database for one test file: in-memory PGlite, or — when `DATABASE_URL` is set
 * (the PostgreSQL pass of `.ci/run`) — a new database on that server, dropped on close. Both start as a
 * copy of the run's template (`global-setup.ts`): PGlite loads the migrated image, PostgreSQL clones the
 * template database. `openDatabase` then runs as for any database (migrations — nothing left to apply —
 * and, on PGlite, the change listeners). Without a template (outside the projects that set it up) the
 * database is migrated from scratch.
 * `migrate: false` leaves it empty, without the template (a test of the migrations themselves).
 */
export async function openTestDatabase(opts: { migrate?: boolean } = {}): Promise<Database> {
  const url = process.env.DATABASE_URL;
  // A test of the migrations themselves starts from an empty database: no template.
  const template = opts.migrate === false ? undefined : testTemplate();
  if (!url) {
    if (template?.kind !== 'pglite') return openDatabase(opts);
    templateImage ??= new Blob([readFileSync(template.file)]);
    return openDatabase({ loadDataDir: templateImage });
  }
  const name = `coilpath_t_${randomBytes(6).toString('hex')}`;
  await onServer(url, template?.kind === 'postgres' ? `CREATE DATABASE ${name} TEMPLATE ${template.database}` : `CREATE DATABASE ${name}`);
  const database = await openDatabase({ databaseUrl: databaseUrlFor(url, name), ...opts }).catch(async (err: unknown) => {
    await dropDatabase(url, name);
    throw err;
  });
  const close = database.close;
  database.close = async () => {
    await close();
    await dropDatabase(url, name);
  };
  return database;
}

/** A mailer that keeps messages in memory (the sink itself is tested in mail/). */
export function memoryMailer(): Mailer & { sent: MailMessage[] } {
  const sent: MailMessage[] = [];
  return {
    sent,
    async send(m) {
      sent.push(m);
      return { messageId: `<${sent.length}@coilpath.test>` };
    },
  };
}

export interface TestApp {
  app: Express;
  ctx: AppContext;
  database: Database;
  mailer: Mailer & { sent: MailMessage[] };
  storage: Storage;
  close(): Promise<void>;
}

/**
 * "Now" of a test app that names neither `clock` nor `now`: a fixed instant (a Wednesday afternoon in
 * Chicago), so no test depends on the day or hour it runs at.
 */
export const DEFAULT_TEST_NOW = '2026-06-03T18:00:00Z';

export async function createTestApp(
  opts: {
    clock?: Clock;
    now?: string;
    mailer?: Mailer;
    signInLimit?: number;
    signInLimits?: AppContext['config']['signInLimits'];
    /** Where to log (none: silent). */ logger?: Logger;
  } = {},
): Promise<TestApp> {
  const database = await openTestDatabase();
  const mailer = memoryMailer();
  const storage = createMemoryStorage();
  const ctx: AppContext = {
    database,
    db: database.db,
    mailer: opts.mailer ?? mailer,
    storage,
    clock: opts.clock ?? fixedClock(opts.now ?? DEFAULT_TEST_NOW),
    jobs: createJobQueue(),
    secret: new TextEncoder().encode('coilpath-test-secret-coilpath-test-secret'),
    ...(opts.logger ? { logger: opts.logger } : {}),
    config: {
      sessionHours: 12,
      secureCookies: false,
      publicUrl: 'http://coilpath.test',
      signInLimit: opts.signInLimit ?? 1000,
      signInLimits: opts.signInLimits ?? { perAccount: 1000, perAddress: 1000 },
    },
  };
  return { app: createApp(ctx), ctx, database, mailer, storage, close: () => database.close() };
}

/** Signs in and returns a supertest agent that carries the session cookie. */
export async function signedInAgent(app: Express, email: string, password: string) {
  const agent = request.agent(app);
  const res = await agent.post('/api/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}
