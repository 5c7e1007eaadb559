import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { DataDirLocked, LOCK_FILE, lockDataDir, pidAlive, type LockHolder } from './data-dir-lock';

const tmp = mkdtempSync(join(tmpdir(), 'coilpath-lock-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));
let n = 0;
const freshDir = () => join(tmp, `d${++n}`);

/** The pid of a process that has ended (a child that ran and exited). */
function endedPid(): number {
  const r = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  const pid = Number(r.stdout);
  expect(pidAlive(pid)).toBe(false);
  return pid;
}

function writeLock(dir: string, h: Partial<LockHolder>) {
  const holder = { pid: 1, host: hostname(), purpose: 'server', startedAt: '2026-03-01T10:00:00.000Z', token: 'other', ...h };
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, LOCK_FILE), JSON.stringify(holder));
}

const holderIn = (dir: string) => JSON.parse(readFileSync(join(dir, LOCK_FILE), 'utf8')) as LockHolder;

describe('the data-directory lock', () => {
  it('holds the pid while taken, refuses a second taker naming it, and is gone after release', () => {
    const dir = freshDir();
    const lock = lockDataDir(dir, 'server');
    expect(holderIn(dir)).toMatchObject({ pid: process.pid, purpose: 'server', host: hostname() });

    const err = (() => {
      try {
        lockDataDir(dir, 'backup');
      } catch (e) {
        return e;
      }
    })();
    expect(err).toBeInstanceOf(DataDirLocked);
    expect((err as DataDirLocked).message).toContain(`pid ${process.pid}`);
    expect((err as DataDirLocked).message).toContain('server');
    expect(holderIn(dir).token).toBe(lock.holder.token);

    lock.release();
    expect(existsSync(join(dir, LOCK_FILE))).toBe(false);
    lock.release(); // twice is harmless
    const again = lockDataDir(dir, 'backup');
    expect(holderIn(dir).purpose).toBe('backup');
    again.release();
  });

  it('takes over a stale lock whose process has ended', () => {
    const dir = freshDir();
    const dead = endedPid();
    writeLock(dir, { pid: dead });
    const lock = lockDataDir(dir, 'server');
    expect(holderIn(dir).pid).toBe(process.pid);
    expect(holderIn(dir).token).toBe(lock.holder.token);
    lock.release();
  });

  it('refuses a lock held by another live process, naming its pid, and leaves it in place', () => {
    const dir = freshDir();
    writeLock(dir, { pid: process.ppid, token: 'live-one' });
    expect(() => lockDataDir(dir, 'server')).toThrow(`pid ${process.ppid}`);
    expect(holderIn(dir).token).toBe('live-one');
  });

  it('decides liveness through the given check (the holder alive or not)', () => {
    const dir = freshDir();
    writeLock(dir, { pid: 424242, token: 'checked' });
    expect(() => lockDataDir(dir, 'server', { alive: (pid) => pid === 424242 })).toThrow(DataDirLocked);
    const lock = lockDataDir(dir, 'server', { alive: () => false });
    expect(holderIn(dir).pid).toBe(process.pid);
    lock.release();
  });

  it('takes over a lock naming this pid that this process does not hold (left before a restart), and an unreadable one', () => {
    const dir = freshDir();
    writeLock(dir, { pid: process.pid, token: 'earlier-life' });
    const a = lockDataDir(dir, 'server');
    expect(holderIn(dir).token).toBe(a.holder.token);
    a.release();

    writeFileSync(join(dir, LOCK_FILE), '{"pid": 12');
    const b = lockDataDir(dir, 'server');
    expect(holderIn(dir).token).toBe(b.holder.token);
    b.release();
  });

  it("refuses another machine's lock (its process cannot be checked) and names the host", () => {
    const dir = freshDir();
    writeLock(dir, { pid: endedPid(), host: 'other-host.example' });
    expect(() => lockDataDir(dir, 'server')).toThrow(/pid \d+ on other-host\.example/);
  });

  it("release leaves alone a lock file that is no longer this process's", () => {
    const dir = freshDir();
    const lock = lockDataDir(dir, 'server');
    writeFileSync(join(dir, LOCK_FILE), JSON.stringify({ ...lock.holder, token: 'someone-else' }));
    lock.release();
    expect(holderIn(dir).token).toBe('someone-else');
  });
});
