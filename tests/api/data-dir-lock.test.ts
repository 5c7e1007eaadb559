/**
 * One server per data directory: a second server process started on the directory of a running one is
 * refused (exit code 1) with a message naming the running one's pid; after the first is killed with SIGKILL
 * its lock is stale and a new server takes it over; a graceful stop removes the lock.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { LOCK_FILE } from '../../apps/api/src/data-dir-lock';
import { freePort, repoRoot, startServer, type ServerProcess } from '../support/server-process';

const tmp = mkdtempSync(join(tmpdir(), 'coilpath-lock-'));
const running: ServerProcess[] = [];
afterAll(async () => {
  for (const s of running) await s.stop(2000);
  rmSync(tmp, { recursive: true, force: true });
});

/** Runs server.ts on `dataDir` to its end; returns its exit code and what it printed. */
async function runToExit(dataDir: string): Promise<{ code: number | null; output: string }> {
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    PORT: String(await freePort()),
    HOST: '127.0.0.1',
    COILPATH_DATA_DIR: dataDir,
    COILPATH_JOBS: 'off',
    COILPATH_SEED: 'never',
  };
  delete env.DATABASE_URL;
  delete env.NODE_OPTIONS;
  const child = spawn(process.execPath, ['--import', 'tsx', 'apps/api/src/server.ts'], {
    cwd: repoRoot,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  child.stdout.on('data', (d: Buffer) => (output += d.toString()));
  child.stderr.on('data', (d: Buffer) => (output += d.toString()));
  const code = await new Promise<number | null>((resolve) => child.once('exit', (c) => resolve(c)));
  return { code, output };
}

const lockPid = (dataDir: string) => (JSON.parse(readFileSync(join(dataDir, LOCK_FILE), 'utf8')) as { pid: number }).pid;

describe.runIf(!process.env.DATABASE_URL)('the data-directory lock of the server', () => {
  it('refuses a second server naming the first one’s pid, and takes over the lock of a killed one', { timeout: 300_000 }, async () => {
    const dataDir = join(tmp, 'data');
    const env = { COILPATH_SEED: 'never' };
    const first = await startServer({ dataDir, env });
    running.push(first);
    expect(lockPid(dataDir)).toBe(first.child.pid);

    const second = await runToExit(dataDir);
    expect(second.code, second.output).toBe(1);
    expect(second.output).toContain(`Coilpath cannot start: Another Coilpath process (pid ${first.child.pid}, server`);
    expect(second.output).toContain(dataDir);
    // The first server still owns the directory and still answers.
    expect(lockPid(dataDir)).toBe(first.child.pid);
    expect((await fetch(`${first.base}/api/health`)).status).toBe(200);

    // Killed without a chance to clean up: the lock stays behind, naming a process that is gone.
    first.child.kill('SIGKILL');
    expect((await first.exited).signal).toBe('SIGKILL');
    expect(lockPid(dataDir)).toBe(first.child.pid);

    const third = await startServer({ dataDir, env });
    running.push(third);
    expect(lockPid(dataDir)).toBe(third.child.pid);
    await third.stop();
    expect((await third.exited).code).toBe(0);
    expect(existsSync(join(dataDir, LOCK_FILE)), 'a graceful stop removes the lock').toBe(false);
  });
});
