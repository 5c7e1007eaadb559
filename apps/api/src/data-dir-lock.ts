/**
 * One Coilpath process per data directory: `<data dir>/coilpath.lock` holds the pid of the process that
 * uses it (the server on the embedded database, or a backup or restore). It is created exclusively, kept
 * for the process's life and removed when it exits. A lock whose process is gone (killed with SIGKILL, a
 * power cut) is taken over; a live one is refused with an error naming that process.
 */
import { randomBytes } from 'node:crypto';
import { linkSync, mkdirSync, readFileSync, renameSync, unlinkSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join, resolve } from 'node:path';

export const LOCK_FILE = 'coilpath.lock';

export interface LockHolder {
  pid: number;
  host: string;
  /** What the process does with the directory: 'server', 'backup', 'restore'. */
  purpose: string;
  startedAt: string;
  /** Unique per lock, so a process only ever removes its own. */
  token: string;
}

export class DataDirLocked extends Error {
  constructor(
    readonly dataDir: string,
    readonly lockFile: string,
    readonly holder: LockHolder,
  ) {
    const where = holder.host === hostname() ? `pid ${holder.pid}` : `pid ${holder.pid} on ${holder.host}`;
    super(
      `Another Coilpath process (${where}, ${holder.purpose}, started ${holder.startedAt}) is using the data directory ${dataDir}. ` +
        `Stop it first. If no such process is running, delete ${lockFile}.`,
    );
    this.name = 'DataDirLocked';
  }
}

export interface DataDirLock {
  file: string;
  holder: LockHolder;
  /** Removes the lock file if it is still this process's; safe to call twice. */
  release(): void;
}

/** Tokens of the locks this process holds: a lock file naming our own pid is ours only if listed here. */
const heldHere = new Set<string>();

/** Whether a process with this pid exists on this machine (EPERM: it exists, but is another user's). */
export function pidAlive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function readHolder(file: string): LockHolder | null {
  try {
    const h = JSON.parse(readFileSync(file, 'utf8')) as Partial<LockHolder>;
    if (typeof h.pid !== 'number' || typeof h.token !== 'string') return null;
    return {
      pid: h.pid,
      host: String(h.host ?? ''),
      purpose: String(h.purpose ?? 'unknown'),
      startedAt: String(h.startedAt ?? '?'),
      token: h.token,
    };
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') throw e;
    return null; // unreadable or half-written: treated as stale
  }
}

/** A lock that can be taken over: its process is gone (or it names no process at all). */
function isStale(h: LockHolder | null, alive: (pid: number) => boolean): boolean {
  if (!h) return true;
  if (h.host && h.host !== hostname()) return false; // another machine's process cannot be checked: refuse
  if (h.pid === process.pid) return !heldHere.has(h.token); // our pid, not our lock: left by an earlier process
  return !alive(h.pid);
}

/**
 * Takes `<dataDir>/coilpath.lock` for this process, or throws `DataDirLocked` naming the live holder.
 * The lock is removed at exit (normal exit, or after SIGINT/SIGTERM handlers call `process.exit`).
 */
export function lockDataDir(dataDir: string, purpose: string, opts: { alive?: (pid: number) => boolean; now?: Date } = {}): DataDirLock {
  const dir = resolve(dataDir);
  const file = join(dir, LOCK_FILE);
  const alive = opts.alive ?? pidAlive;
  mkdirSync(dir, { recursive: true });
  const holder: LockHolder = {
    pid: process.pid,
    host: hostname(),
    purpose,
    startedAt: (opts.now ?? new Date()).toISOString(),
    token: randomBytes(12).toString('hex'),
  };
  const content = `${JSON.stringify(holder, null, 2)}\n`;

  for (let attempt = 0; attempt < 5; attempt++) {
    try {
      writeFileSync(file, content, { flag: 'wx', mode: 0o644 });
      heldHere.add(holder.token);
      let released = false;
      const release = () => {
        if (released) return;
        released = true;
        heldHere.delete(holder.token);
        process.off('exit', release);
        try {
          if (readHolder(file)?.token === holder.token) unlinkSync(file);
        } catch {
          // already gone
        }
      };
      process.on('exit', release);
      return { file, holder, release };
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
    }
    let current: LockHolder | null;
    try {
      current = readHolder(file);
    } catch {
      continue; // removed meanwhile: try again
    }
    if (!isStale(current, alive)) throw new DataDirLocked(dir, file, current!);
    // Take the stale lock over: move it aside under a unique name (only one process can), check it is the
    // one judged stale (another process may have replaced it meanwhile), then create ours.
    const aside = `${file}.stale-${holder.token}`;
    try {
      renameSync(file, aside);
    } catch {
      continue;
    }
    let moved: LockHolder | null;
    try {
      moved = readHolder(aside);
    } catch {
      moved = null;
    }
    const asJudged = current ? moved?.token === current.token : moved === null;
    if (!asJudged && moved && !isStale(moved, alive)) {
      // We moved a fresh, live lock: put it back (link fails if yet another lock appeared) and give way.
      try {
        linkSync(aside, file);
      } catch {
        // the path holds another lock now; its holder is the one to name
      }
      unlinkSync(aside);
      throw new DataDirLocked(dir, file, moved);
    }
    unlinkSync(aside);
  }
  throw new Error(`Could not take the lock ${file}: it keeps changing. Is another Coilpath process starting?`);
}
