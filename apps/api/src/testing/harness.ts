import { randomBytes } from 'node:crypto';
import pg from 'pg';
import request from 'supertest';
import type { Express } from 'express';
import { createApp } from '../app';
import type { AppContext } from '../context';
import { openDatabase, type Database } from '../db/client';
import { fixedClock, systemClock, type Clock } from '../lib/clock';
import type { Mailer, MailMessage } from '../mail/mailer';
import { createMemoryStorage, type Storage } from '../storage/storage';

/**
 * A fresh, migrated database for one test file: in-memory PGlite, or — when `DATABASE_URL` is set
 * (the PostgreSQL pass of `.ci/run`) — a new database on that server, dropped on close. `migrate: false`
 * leaves it empty (a test of the migrations themselves).
 */
export async function openTestDatabase(opts: { migrate?: boolean } = {}): Promise<Database> {
  const url = process.env.DATABASE_URL;
  if (!url) return openDatabase(opts);
  const name = `coilpath_t_${randomBytes(6).toString('hex')}`;
  const admin = new pg.Client({ connectionString: url });
  await admin.connect();
  await admin.query(`CREATE DATABASE ${name}`);
  await admin.end();
  const u = new URL(url);
  u.pathname = `/${name}`;
  const database = await openDatabase({ databaseUrl: u.toString(), ...opts });
  const close = database.close;
  database.close = async () => {
    await close();
    await dropTestDatabase(url, name);
  };
  return database;
}

/**
 * Drops a test database. `WITH (FORCE)` ends other sessions in it — usually an autovacuum worker,
 * which only a superuser or a member of `pg_signal_backend` may end. Without that right the plain
 * drop is tried; if the database is still busy it is left behind with a warning rather than failing
 * a test whose assertions all passed (its name starts with `coilpath_t_`).
 */
async function dropTestDatabase(url: string, name: string): Promise<void> {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    await c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
  } catch {
    try {
      await c.query(`DROP DATABASE IF EXISTS ${name}`);
    } catch (err) {
      console.warn(`test database ${name} left behind: ${(err as Error).message}`);
    }
  } finally {
    await c.end();
  }
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

export async function createTestApp(opts: { clock?: Clock; now?: string; mailer?: Mailer; signInLimit?: number } = {}): Promise<TestApp> {
  const database = await openTestDatabase();
  const mailer = memoryMailer();
  const storage = createMemoryStorage();
  const ctx: AppContext = {
    database,
    db: database.db,
    mailer: opts.mailer ?? mailer,
    storage,
    clock: opts.clock ?? (opts.now ? fixedClock(opts.now) : systemClock),
    secret: new TextEncoder().encode('coilpath-test-secret-coilpath-test-secret'),
    config: {
      sessionHours: 12,
      secureCookies: false,
      publicUrl: 'http://coilpath.test',
      signInLimit: opts.signInLimit ?? 1000,
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
