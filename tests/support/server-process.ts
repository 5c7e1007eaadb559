/**
 * The real Coilpath server as a child process (`node --import tsx apps/api/src/server.ts`), for the
 * crash-safety test and the browser journeys. Waits are bounded loops on a condition, never sleeps
 * standing in for one.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { fileURLToPath } from 'node:url';

export const repoRoot = fileURLToPath(new URL('../..', import.meta.url));

/** A TCP port that was free a moment ago (the OS picks it). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.unref();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const address = srv.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      srv.close(() => resolve(port));
    });
  });
}

export interface ServerProcess {
  base: string;
  port: number;
  child: ChildProcess;
  /** Everything the server printed so far (stdout and stderr). */
  output(): string;
  /** Resolves with the exit code or signal once the process has ended. */
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  /** SIGTERM (graceful close), SIGKILL after `graceMs` if it has not ended. Safe to call twice. */
  stop(graceMs?: number): Promise<void>;
}

export interface StartOptions {
  dataDir: string;
  port?: number;
  /** Extra environment; DATABASE_URL is never passed on (the server runs on the data directory). */
  env?: Record<string, string>;
  /** How long to wait for /api/health to answer. */
  readyTimeoutMs?: number;
}

/** Starts the server and resolves once `/api/health` answers 200. */
export async function startServer(opts: StartOptions): Promise<ServerProcess> {
  const port = opts.port ?? (await freePort());
  const env: NodeJS.ProcessEnv = { ...process.env };
  delete env.DATABASE_URL;
  delete env.NODE_OPTIONS;
  Object.assign(env, {
    PORT: String(port),
    HOST: '127.0.0.1',
    COILPATH_DATA_DIR: opts.dataDir,
    COILPATH_JOBS: 'off',
    ...opts.env,
  });
  const child = spawn(process.execPath, ['--import', 'tsx', 'apps/api/src/server.ts'], {
    cwd: repoRoot,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout!.on('data', (d: Buffer) => (out += d.toString()));
  child.stderr!.on('data', (d: Buffer) => (out += d.toString()));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    child.once('exit', (code, signal) => resolve({ code, signal })),
  );
  let ended = false;
  void exited.then(() => (ended = true));

  const base = `http://127.0.0.1:${port}`;
  const server: ServerProcess = {
    base,
    port,
    child,
    output: () => out,
    exited,
    async stop(graceMs = 10_000) {
      if (ended) return;
      child.kill('SIGTERM');
      const timer = setTimeout(() => child.kill('SIGKILL'), graceMs);
      await exited;
      clearTimeout(timer);
    },
  };

  try {
    await waitFor(
      async () => {
        if (ended) throw new Error(`the server exited before it was ready:\n${out}`);
        const res = await fetch(`${base}/api/health`).catch(() => null);
        return res?.ok === true;
      },
      { timeoutMs: opts.readyTimeoutMs ?? 90_000, what: `/api/health on ${base}` },
    );
  } catch (e) {
    await server.stop(2000);
    throw e;
  }
  return server;
}

/**
 * Polls `condition` until it is true: a bounded loop (by time and by attempts) with a short pause
 * between attempts so the machine is not spun. Throws with `what` when the bound is reached.
 */
export async function waitFor(
  condition: () => Promise<boolean> | boolean,
  opts: { timeoutMs: number; intervalMs?: number; what: string },
): Promise<void> {
  const interval = opts.intervalMs ?? 100;
  const deadline = Date.now() + opts.timeoutMs;
  const maxAttempts = Math.ceil(opts.timeoutMs / interval) + 1;
  for (let attempt = 0; attempt < maxAttempts && Date.now() <= deadline; attempt++) {
    if (await condition()) return;
    await new Promise((r) => setTimeout(r, interval));
  }
  throw new Error(`Timed out after ${opts.timeoutMs} ms waiting for ${opts.what}.`);
}
