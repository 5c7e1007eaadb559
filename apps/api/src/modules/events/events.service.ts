/**
 * Live events: what the open screens hear (`GET /api/events`). The database's triggers write each change to
 * `live_events` and announce its id (`coilpath_live`, migration 0016); each API process listens once per
 * database (`LiveHub`) and hands the event to its connected screens whose person may see it (`mayHear`).
 */
import { liveKindsFor, type LiveEvent, type LiveEventKind, type SessionUser } from '@coilpath/contract';
import type { AppContext } from '../../context';
import type { Database } from '../../db/client';
import { branchScope } from '../../auth/policy';
import { eventsAfter, findEvent, lastEventId, pruneEvents, sessionState, type LiveEventRecord } from './events.repo';

/** The one rule of who hears what: within the person's branches, the kinds of their role, a `day` only their own. */
export function mayHear(user: SessionUser, e: Pick<LiveEventRecord, 'branchId' | 'kind' | 'userId'>): boolean {
  const branches = branchScope(user);
  if (branches && !branches.includes(e.branchId)) return false;
  if (!liveKindsFor(user.role).includes(e.kind)) return false;
  return e.userId === null || e.userId === user.id;
}

/** The rows an event names (migration 0018); a row written before names none. */
const namesNone: Partial<Record<LiveEventKind, Record<string, unknown>>> = {
  roster: { bookings: [], workOrders: [] },
  alarm: { units: [] },
  'leak-case': { leakCases: [] },
};

export function toLiveEvent(row: LiveEventRecord): LiveEvent {
  const { by = null, ...payload } = row.payload as { by?: LiveEvent['by'] } & Record<string, unknown>;
  const base = { id: Number(row.id), branchId: row.branchId, at: new Date(row.at).toISOString(), by, kind: row.kind };
  const named = { ...namesNone[row.kind], ...payload };
  return (row.kind === 'day' ? { ...named, ...base, techId: row.userId } : { ...named, ...base }) as LiveEvent;
}

interface Subscriber {
  user: SessionUser;
  send(event: LiveEvent): void;
  /** The person's row changed or a session of theirs ended (`coilpath_user`): is the stream's session still good? */
  recheck(): void;
}

/** One listener per database for this process, fanning out to the connected screens. */
class LiveHub {
  private readonly subscribers = new Set<Subscriber>();
  private started: Promise<void> | null = null;
  private stop: (() => Promise<void>)[] = [];

  constructor(private readonly database: Database) {}

  private start(): Promise<void> {
    this.started ??= (async () => {
      this.stop.push(await this.database.listen('coilpath_live', (id) => void this.deliver(Number(id))));
      this.stop.push(
        await this.database.listen('coilpath_user', (userId) => {
          for (const s of this.subscribers) if (s.user.id === userId) s.recheck();
        }),
      );
    })();
    return this.started;
  }

  private async deliver(id: number): Promise<void> {
    if (!Number.isSafeInteger(id) || this.subscribers.size === 0) return;
    const row = await findEvent(this.database.db, id).catch(() => undefined);
    if (!row) return;
    const event = toLiveEvent(row);
    for (const s of this.subscribers) if (mayHear(s.user, row)) s.send(event);
  }

  async subscribe(s: Subscriber): Promise<() => void> {
    await this.start();
    this.subscribers.add(s);
    return () => this.subscribers.delete(s);
  }
}

const hubs = new WeakMap<Database, LiveHub>();

function hubFor(database: Database): LiveHub {
  let hub = hubs.get(database);
  if (!hub) hubs.set(database, (hub = new LiveHub(database)));
  return hub;
}

/** At most this many missed events are sent again on a reconnect (more than a busy branch's day). */
const REPLAY_LIMIT = 2000;

export interface LiveStream {
  /** Sends an event (already checked against the person's scope). */
  send(event: LiveEvent): void;
  /** Tells the screen where it stands (the newest id) without an event, so its first reconnect misses nothing. */
  mark(id: number): void;
  drop(): void;
}

/**
 * Opens a person's stream: listens first, then sends what they missed after `lastId` (or, without one, marks
 * the newest id), then the events as they come, each once. Answers a function that closes it.
 */
export async function openLiveStream(
  ctx: AppContext,
  user: SessionUser,
  sessionId: string | null,
  lastId: number | undefined,
  out: LiveStream,
): Promise<() => void> {
  const held: LiveEvent[] = [];
  let replaying = true;
  const replayed = new Set<number>();
  // The session as it stood when the stream opened (it was just checked): a deactivation, a raised session
  // version (password reset, sign-out everywhere), this session's sign-out or another role or branch (the scope
  // the stream was opened with) ends the stream; a sign-in elsewhere does not. The screen reconnects, and is
  // checked again.
  const opened = await sessionState(ctx.db, user.id, sessionId);
  const stillGood = (now: typeof opened) =>
    !!now &&
    now.active &&
    !now.ended &&
    now.sessionVersion === opened?.sessionVersion &&
    now.role === user.role &&
    now.branchId === user.branchId;
  const recheck = async () => {
    if (!stillGood(await sessionState(ctx.db, user.id, sessionId).catch(() => undefined))) out.drop();
  };
  const unsubscribe = await hubFor(ctx.database).subscribe({
    user,
    send: (e) => {
      if (replaying) held.push(e);
      else out.send(e);
    },
    recheck: () => void recheck(),
  });
  try {
    if (!stillGood(opened)) {
      out.drop();
      return unsubscribe;
    }
    if (lastId === undefined) out.mark(await lastEventId(ctx.db));
    else {
      const scope = { branches: branchScope(user), kinds: liveKindsFor(user.role), userId: user.id };
      for (const row of await eventsAfter(ctx.db, lastId, scope, REPLAY_LIMIT)) {
        if (!mayHear(user, row)) continue;
        out.send(toLiveEvent(row));
        replayed.add(Number(row.id));
      }
    }
    replaying = false;
    for (const e of held) if (!replayed.has(e.id)) out.send(e);
  } catch (err) {
    unsubscribe();
    throw err;
  }
  return unsubscribe;
}

/** Rows older than a day are no longer asked for (a screen away that long reloads everything). */
export function pruneLiveEvents(ctx: AppContext): Promise<number> {
  return pruneEvents(ctx.db, '1 day');
}
