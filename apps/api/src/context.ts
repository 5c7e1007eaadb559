import type { Database, Db } from './db/client';
import type { Mailer } from './mail/mailer';
import type { Storage } from './storage/storage';
import type { Clock } from './lib/clock';
import type { Logger } from './lib/logger';
import type { JobQueue } from './jobs/queue';

/** Everything a module needs, injected by createApp (tests pass in-memory stand-ins). */
export interface AppContext {
  database: Database;
  db: Db;
  mailer: Mailer;
  storage: Storage;
  clock: Clock;
  /** Work done after answering (`jobs/queue.ts`). */
  jobs: JobQueue;
  secret: Uint8Array;
  /** Where request lines and errors are logged (`lib/logger.ts`); absent, nothing is logged (tests). */
  logger?: Logger;
  config: {
    sessionHours: number;
    /** Served over HTTPS: the session cookie gets `Secure`. */
    secureCookies: boolean;
    publicUrl: string;
    /**
     * Started in demo mode (`startMode` in lib/config.ts): only then may `/api/config` show the demo password.
     */
    demoMode?: boolean;
    /** Failed sign-ins allowed per 15 minutes per address (IP) and e-mail. */
    signInLimit: number;
    /** Other sign-in limits (per account, per address); defaults in `auth/sign-in-limits.ts`. */
    signInLimits?: Partial<import('./auth/sign-in-limits').SignInLimits>;
    /**
     * The clock is set to another instant (`COILPATH_NOW`): every API answer carries `X-Coilpath-Now` so the
     * web app reckons "today" by the server's clock rather than the browser's.
     */
    clockOverridden?: boolean;
    /** How often `GET /api/events` sends a keep-alive comment (default 25 s; tests pass a short one). */
    liveKeepAliveMs?: number;
    /** Serve the built web app from this folder when it exists. */
    webDist?: string | undefined;
  };
}
