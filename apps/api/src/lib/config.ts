import { z } from 'zod';
import { shiftedClock, systemClock, type Clock } from './clock';

const envSchema = z.object({
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  HOST: z.string().default('0.0.0.0'),
  DATABASE_URL: z
    .string()
    .regex(/^postgres(ql)?:\/\//, 'DATABASE_URL must be a postgres:// URL')
    .optional(),
  COILPATH_DATA_DIR: z.string().default('./data'),
  COILPATH_SECRET: z.string().min(32, 'COILPATH_SECRET needs at least 32 characters').optional(),
  /** `smtp://host:port` of a real relay; empty = the local sink. */
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default('Coilpath <no-reply@coilpath.example>'),
  /** Public address used in e-mailed links. */
  PUBLIC_URL: z.string().optional(),
  /**
   * Demo data on an empty database: `demo` always, `auto` only when `PUBLIC_URL` is unset or on this machine
   * (`startMode`), `never` not at all. Without demo data, an empty database gets a one-time setup link.
   */
  COILPATH_SEED: z.enum(['auto', 'demo', 'never']).default('auto'),
  /** Cron-like minute interval at which scheduled jobs check whether they are due. */
  COILPATH_JOBS_INTERVAL_SECONDS: z.coerce.number().int().min(5).default(300),
  COILPATH_JOBS: z.enum(['on', 'off']).default('on'),
  SESSION_HOURS: z.coerce
    .number()
    .min(1)
    .max(24 * 30)
    .default(12),
  NODE_ENV: z.string().default('development'),
  /**
   * Stored files in an S3-compatible bucket instead of `<data dir>/files` (several API processes share it):
   * set `S3_BUCKET`; `S3_URL` is the endpoint of a store other than Amazon S3 (MinIO, a local fake…).
   */
  S3_URL: z.preprocess(
    (v) => (v === '' ? undefined : v),
    z.url({ protocol: /^https?$/, message: 'S3_URL must be an http(s):// URL' }).optional(),
  ),
  S3_BUCKET: z.preprocess(
    (v) => (v === '' ? undefined : v),
    z
      .string()
      .regex(/^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/, 'S3_BUCKET must be a bucket name: 3–63 lowercase letters, digits, dots or hyphens')
      .optional(),
  ),
  S3_REGION: z.string().min(1).default('us-east-1'),
  S3_ACCESS_KEY_ID: z.preprocess((v) => (v === '' ? undefined : v), z.string().optional()),
  S3_SECRET_ACCESS_KEY: z.preprocess((v) => (v === '' ? undefined : v), z.string().optional()),
  /** `http://host/bucket/key` addressing (MinIO, local fakes); by default on when `S3_URL` is set. */
  S3_PATH_STYLE: z.enum(['true', 'false']).optional(),
  /** Level of the JSON log lines on stdout (one per request): `silent` logs nothing. */
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  /**
   * Runs the server as if it had been started at this instant (ISO 8601 with an offset, e.g.
   * `2027-03-15T06:00:00-05:00`); time then passes normally. For demos and browser journeys at a chosen
   * date; ignored unless set.
   */
  /**
   * `1`: the process measures its event-loop delay and answers it over the IPC channel of the process that
   * started it (`npm run bench` only; lib/bench-event-loop.ts). Off otherwise.
   */
  COILPATH_BENCH_ELD: z.enum(['0', '1']).default('0'),
  COILPATH_NOW: z.preprocess(
    (v) => (v === '' ? undefined : v),
    z.iso
      .datetime({ offset: true, message: 'COILPATH_NOW must be an ISO 8601 instant with an offset, e.g. 2027-03-15T06:00:00-05:00' })
      .optional(),
  ),
});

export type Env = z.infer<typeof envSchema>;

/** The server's clock: the system's, or one started at `COILPATH_NOW` when that is set. */
export function clockFromEnv(env: Pick<Env, 'COILPATH_NOW'>): { clock: Clock; overridden: boolean } {
  return env.COILPATH_NOW ? { clock: shiftedClock(env.COILPATH_NOW), overridden: true } : { clock: systemClock, overridden: false };
}

/** Reads the environment once; fails fast with the names of bad variables. */
export function readEnv(source: NodeJS.ProcessEnv = process.env): Env {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
    throw new Error(`Bad configuration:\n${lines.join('\n')}`);
  }
  return parsed.data;
}

/** True for an address on this machine: localhost (and `*.localhost`), 127.0.0.0/8, ::1. */
export function isLocalUrl(url: string): boolean {
  let host: string;
  try {
    host = new URL(url).hostname.toLowerCase();
  } catch {
    return false;
  }
  return host === 'localhost' || host.endsWith('.localhost') || /^127(\.\d{1,3}){3}$/.test(host) || host === '[::1]';
}

/**
 * How a start treats an empty database: `demo` loads the invented demo contractor (and `/api/config` may show
 * its password); `production` never does — the first owner is set up through a one-time link instead. Demo
 * only when asked (`COILPATH_SEED=demo`), or by default (`auto`) when the server is not published
 * (`PUBLIC_URL` unset or on this machine, as for `npm start`).
 */
export function startMode(env: Pick<Env, 'COILPATH_SEED' | 'PUBLIC_URL'>): 'demo' | 'production' {
  if (env.COILPATH_SEED === 'demo') return 'demo';
  if (env.COILPATH_SEED === 'never') return 'production';
  return !env.PUBLIC_URL || isLocalUrl(env.PUBLIC_URL) ? 'demo' : 'production';
}
