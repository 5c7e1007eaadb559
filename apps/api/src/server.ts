import { resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createServer } from 'node:http';
import { eq } from 'drizzle-orm';
import { appMeta } from './db/schema';
import { createApp } from './app';
import type { AppContext } from './context';
import { openDatabase } from './db/client';
import { DEMO_PASSWORD, demoToday, seedDemo } from './db/seed';
import { clockFromEnv, readEnv, startMode } from './lib/config';
import { issueOwnerSetup } from './modules/auth/owner-setup.service';
import { createSmtpMailer } from './mail/mailer';
import { openStorage } from './storage/s3';
import { loadSecret } from './secret';
import { DataDirLocked, lockDataDir } from './data-dir-lock';
import { startScheduler } from './jobs/scheduler';
import { createLogger } from './lib/logger';
import { createJobQueue } from './jobs/queue';
import { warmPasswordRules } from './auth/password-rules';
import './modules/watchlist/watchlist.jobs';
import './modules/events/events.jobs';

const env = readEnv();
// `npm run bench` only: the event-loop delay, answered over the IPC channel of the bench that started this process.
if (env.COILPATH_BENCH_ELD === '1') (await import('./lib/bench-event-loop')).answerEventLoopDelay();
const { clock, overridden: clockOverridden } = clockFromEnv(env);
const dataDir = resolve(env.COILPATH_DATA_DIR);
// The embedded database is for one process: a second server on the same data directory is refused before it
// opens anything. On PostgreSQL several processes may share the directory (its files), so no lock is taken.
try {
  if (!env.DATABASE_URL) lockDataDir(dataDir, 'server');
} catch (e) {
  if (!(e instanceof DataDirLocked)) throw e;
  console.error(`Coilpath cannot start: ${e.message}`);
  process.exit(1);
}
const database = await openDatabase({ databaseUrl: env.DATABASE_URL, dataDir: env.DATABASE_URL ? undefined : resolve(dataDir, 'pg') });
// Stored files: the S3 bucket S3_* names (checked now), or <data dir>/files.
const { storage, where: filesWhere } = await openStorage(env, dataDir).catch((e: unknown) => {
  console.error(`Coilpath cannot start: ${(e as Error).message}`);
  process.exit(1);
});
// Without SMTP_URL, mail goes to the local sink (read at /outbox). Its SMTP server and parser are
// development packages: a server installed without them (`npm ci --omit=dev`) must name a relay.
const sink = env.SMTP_URL
  ? null
  : await import('./mail/sink')
      .then(({ startMailSink }) => startMailSink(database.db, storage))
      .catch((e: unknown) => {
        const missing = (e as { code?: string }).code === 'ERR_MODULE_NOT_FOUND';
        console.error(
          `Coilpath cannot start: ${missing ? 'the local mail sink is not installed (a production install); set SMTP_URL to your mail relay' : (e as Error).message}.`,
        );
        process.exit(1);
      });
const mailer = createSmtpMailer(env.SMTP_URL ?? sink!.url, env.MAIL_FROM);

// Demo data only in demo mode (never on a published server); otherwise an empty database gets a setup link.
const mode = startMode(env);
let seeded = false;
if (mode === 'demo') seeded = (await seedDemo(database.db, { today: demoToday(clock.now()) })).seeded;

const logger = createLogger({ level: env.LOG_LEVEL });
const ctx: AppContext = {
  database,
  db: database.db,
  mailer,
  storage,
  clock,
  jobs: createJobQueue(logger),
  secret: loadSecret(env.COILPATH_SECRET, dataDir),
  logger,
  config: {
    sessionHours: env.SESSION_HOURS,
    secureCookies: (env.PUBLIC_URL ?? '').startsWith('https://'),
    publicUrl: env.PUBLIC_URL ?? `http://localhost:${env.PORT}`,
    signInLimit: 20,
    demoMode: mode === 'demo',
    clockOverridden,
    webDist: fileURLToPath(new URL('../../web/dist', import.meta.url)),
  },
};

const setupLink = mode === 'production' ? await issueOwnerSetup(ctx) : null;
const demoAccounts =
  mode === 'production' && !setupLink ? await database.db.select().from(appMeta).where(eq(appMeta.key, 'demo_seeded')).limit(1) : [];

const app = createApp(ctx);
const server = createServer(app);
server.listen(env.PORT, env.HOST, () => {
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : env.PORT;
  console.log(
    `Coilpath is running on http://localhost:${port} (database: ${database.kind}${database.kind === 'pglite' ? `, ${dataDir}` : ''})`,
  );
  console.log(`Stored files: ${filesWhere}`);
  if (clockOverridden) console.log(`Clock: COILPATH_NOW=${env.COILPATH_NOW} (now ${clock.now().toISOString()})`);
  if (seeded) console.log('Demo data loaded.');
  if (mode === 'demo')
    console.log(
      `Demo sign-ins: owner@coilpath.example, manager@coilpath.example, dispatch@coilpath.example (and dispatch2@), tech@coilpath.example — password "${DEMO_PASSWORD}"`,
    );
  if (setupLink)
    console.log(
      `No one has an account yet. The first owner sets their name, e-mail and password once at (valid 24 hours; a restart prints a new link):\n  ${setupLink}`,
    );
  if (demoAccounts.length)
    console.warn(
      'Warning: this database holds the demo data, whose accounts share a published password. Deactivate them on the Team screen.',
    );
  warmPasswordRules();
  if (sink) console.log(`Mail goes to the local sink (smtp port ${sink.port}); read it at /outbox as the owner.`);
});

const scheduler = env.COILPATH_JOBS === 'on' ? startScheduler(ctx, env.COILPATH_JOBS_INTERVAL_SECONDS) : null;

let closing = false;
async function shutdown(signal: string) {
  if (closing) return;
  closing = true;
  console.log(`${signal}: closing Coilpath…`);
  scheduler?.stop();
  server.close();
  server.closeAllConnections();
  await ctx.jobs.idle();
  await sink?.close();
  await database.close();
  process.exit(0);
}
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));
