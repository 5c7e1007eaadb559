/**
 * The technician's outbox: every write made on the Route and Visit screens is kept on the phone (IndexedDB)
 * and sent to the server in the order it was made, when there is a connection.
 *
 * - A write is stored before anything is sent, so a reload, a closed tab or a dead battery loses nothing.
 * - Entries go out one at a time, oldest first. Each carries the write's client id where the API has one
 *   (findings, refrigerant, photos); readings replace the circuit's entry and state changes are no-ops when
 *   repeated, so sending an entry again after a lost answer never doubles anything.
 * - No connection, a timeout or a server error (5xx, 408, 429): the entry stays waiting and is tried again
 *   later (backoff, and at once when the connection returns).
 * - A refusal (another 4xx) is not tried again: the entry is kept as `failed` with the server's reason until
 *   the technician discards it (or tries it once more). A visit the office moved to someone else or unbooked
 *   meanwhile answers 404: the entry is kept as `conflict`, told in words, never sent over what the office did.
 * - While an entry of a visit is stopped (failed or conflict), that visit's later entries wait behind it
 *   (strict order per visit: a close-out never overtakes a refused reading); other visits' entries go on.
 *
 * Why not TanStack Query's paused-mutation persistence: it serialises to JSON (no photo Blobs), drops a
 * failed mutation rather than keeping it with its reason to show and discard, and resumes paused mutations
 * without a per-visit order. This module is small and owns exactly those rules.
 */
import { createStore, get, update, type UseStore } from 'idb-keyval';
import type { z } from 'zod';
import type { CloseVisit, findingInputSchema, RefrigerantEventInput, SaveReadings, VisitStateChange } from '@coilpath/contract';
import { ApiError } from './api-client';

export type AttachKind = 'photo' | 'nameplate' | 'document';

/** One write a technician makes, as it will be sent. */
export type OutboxWrite =
  | { kind: 'state'; visitId: string; body: VisitStateChange }
  | { kind: 'readings'; visitId: string; body: SaveReadings }
  | { kind: 'finding'; visitId: string; body: z.input<typeof findingInputSchema> & { id: string } }
  | { kind: 'refrigerant'; visitId: string; unitId: string; body: RefrigerantEventInput & { id: string } }
  | { kind: 'attachment'; visitId: string; id: string; attachKind: AttachKind; file: Blob; fileName: string }
  | { kind: 'close'; visitId: string; body: CloseVisit };

export interface OutboxProblem {
  status: number;
  code: string;
  message: string;
}

export interface OutboxEntry {
  /** The entry's own id. */
  id: string;
  /** Order of making (strictly increasing). */
  seq: number;
  queuedAt: string;
  write: OutboxWrite;
  state: 'waiting' | 'failed' | 'conflict';
  /** Sends tried so far whose outcome is unknown or retryable. */
  attempts: number;
  /** The server's reason (failed, conflict) or the last retryable error (waiting). */
  problem: OutboxProblem | null;
  /** Where the write was made, in words (the stop's site), to name it even after the visit is gone. */
  place?: string | undefined;
}

/**
 * Where the entries are kept: the whole list. `update` reads, changes and writes it in one step (one
 * IndexedDB transaction), so two tabs of the app never write over each other's entries.
 */
export interface OutboxStore {
  read(): Promise<OutboxEntry[]>;
  update(fn: (entries: OutboxEntry[]) => OutboxEntry[]): Promise<OutboxEntry[]>;
}

/** The store on the phone: IndexedDB database `coilpath-outbox` (idb-keyval keeps one object store per database). */
export function idbOutboxStore(store: UseStore = createStore('coilpath-outbox', 'entries')): OutboxStore {
  return {
    read: async () => (await get<OutboxEntry[]>('entries', store)) ?? [],
    update: async (fn) => {
      let out: OutboxEntry[] = [];
      await update<OutboxEntry[]>(
        'entries',
        (kept) => {
          out = fn(kept ?? []);
          return out;
        },
        store,
      );
      return out;
    },
  };
}

/** A store in memory (tests, and browsers without IndexedDB: the outbox then lasts as long as the page). */
export function memoryOutboxStore(initial: OutboxEntry[] = []): OutboxStore {
  let kept = structuredClone(initial);
  return {
    read: () => Promise.resolve(structuredClone(kept)),
    update: (fn) => {
      kept = structuredClone(fn(structuredClone(kept)));
      return Promise.resolve(structuredClone(kept));
    },
  };
}

export type Outcome =
  { kind: 'retry'; problem: OutboxProblem } | { kind: 'sent' } | { kind: 'failed' | 'conflict'; problem: OutboxProblem };

const problemOf = (err: unknown): OutboxProblem =>
  err instanceof ApiError
    ? { status: err.status, code: err.code, message: err.message }
    : { status: 0, code: 'network', message: err instanceof Error ? err.message : 'The write could not be sent.' };

/** What a failed send means for its entry. */
export function classify(err: unknown, entry: Pick<OutboxEntry, 'write' | 'attempts'>): Outcome {
  const problem = problemOf(err);
  const s = problem.status;
  if (s === 0 || s >= 500 || s === 408 || s === 429) return { kind: 'retry', problem };
  // A close-out whose answer was lost on an earlier try: the visit is closed because of it.
  if (s === 409 && problem.code === 'visit_closed' && entry.write.kind === 'close' && entry.attempts > 0) return { kind: 'sent' };
  if (s === 404) {
    return {
      kind: 'conflict',
      problem: {
        ...problem,
        message:
          'The office moved this visit to another technician or unbooked it while this phone was offline, so this change was not sent. Call the office before doing more on this visit.',
      },
    };
  }
  if (s === 401) return { kind: 'retry', problem }; // signed out: waits for the next sign-in, never dropped
  return { kind: 'failed', problem };
}

export interface OutboxOptions {
  store: OutboxStore;
  /** Sends one write; resolves with the server's answer, rejects with an ApiError. */
  send(write: OutboxWrite): Promise<unknown>;
  /** After an entry arrived (its answer), e.g. to put the server's answer in the kept data. */
  onSent?(entry: OutboxEntry, answer: unknown): void;
  /** After an entry stopped (failed or conflict). */
  onStopped?(entry: OutboxEntry): void;
  /** Whether to try at all now (the browser says it is online). */
  isOnline?(): boolean;
  /** Milliseconds before trying again after the n-th retryable failure in a row; null: only when told. */
  retryDelay?: ((n: number) => number) | null;
  now?(): Date;
  newId?(): string;
  /**
   * Runs a send run alone across the app's tabs (default: the Web Locks API where the browser has it), so
   * two tabs never send the same entry at once (it would arrive once anyway: the ids make a resend harmless).
   */
  exclusive?(run: () => Promise<void>): Promise<void>;
}

const webLock = (run: () => Promise<void>): Promise<void> =>
  typeof navigator !== 'undefined' && navigator.locks
    ? navigator.locks.request('coilpath-outbox', () => run()).then(() => undefined)
    : run();

export class Outbox {
  private entries: readonly OutboxEntry[] = [];
  private loaded: Promise<void>;
  private chain: Promise<unknown> = Promise.resolve();
  private flushing: Promise<void> | null = null;
  private again = false;
  private listeners = new Set<() => void>();
  private retryTimer: ReturnType<typeof setTimeout> | null = null;
  private retriesInRow = 0;

  constructor(private readonly o: OutboxOptions) {
    this.loaded = o.store.read().then(
      (kept) => {
        // Entries added before the store answered stay after the kept ones.
        const merged = [...kept, ...this.entries];
        this.entries = merged.map((e, i) => ({ ...e, seq: i + 1 }));
        this.emit();
      },
      () => undefined,
    );
  }

  /** Resolves once what the phone kept is read. */
  ready(): Promise<void> {
    return this.loaded;
  }

  /** The entries, oldest first (a new array after every change: a snapshot for React). */
  list(): readonly OutboxEntry[] {
    return this.entries;
  }

  subscribe(fn: () => void): () => void {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  }

  private emit() {
    for (const fn of this.listeners) fn();
  }

  /**
   * Runs changes to the list one after another, each applied to what the store holds (another tab may have
   * changed it) and written before the next; the page's list is then what the store holds.
   */
  private change(fn: (entries: readonly OutboxEntry[]) => readonly OutboxEntry[]): Promise<void> {
    const run = this.chain.then(async () => {
      await this.loaded;
      this.entries = await this.o.store.update((kept) => [...fn(kept)]);
      this.emit();
    });
    this.chain = run.catch(() => undefined);
    return run;
  }

  /** Keeps a write (resolves once it is stored) and starts sending. */
  async add(write: OutboxWrite, meta: { id?: string; place?: string | undefined } = {}): Promise<OutboxEntry> {
    let entry!: OutboxEntry;
    await this.change((es) => {
      entry = {
        id: meta.id ?? this.o.newId?.() ?? crypto.randomUUID(),
        seq: (es.at(-1)?.seq ?? 0) + 1,
        queuedAt: (this.o.now?.() ?? new Date()).toISOString(),
        write,
        state: 'waiting',
        attempts: 0,
        problem: null,
        place: meta.place,
      };
      return [...es, entry];
    });
    void this.flush();
    return entry;
  }

  /** Drops a stopped entry (the technician's choice); the visit's later entries go on. */
  async discard(id: string): Promise<void> {
    await this.change((es) => es.filter((e) => e.id !== id));
    void this.flush();
  }

  /** Puts a stopped entry back in line and sends. */
  async retry(id: string): Promise<void> {
    await this.change((es) => es.map((e) => (e.id === id ? { ...e, state: 'waiting' as const, problem: null } : e)));
    this.retriesInRow = 0;
    void this.flush();
  }

  /** The next entry to send: the oldest waiting one whose visit has no stopped entry before it. */
  private next(): OutboxEntry | undefined {
    const stopped = new Set<string>();
    for (const e of this.entries) {
      if (e.state !== 'waiting') stopped.add(e.write.visitId);
      else if (!stopped.has(e.write.visitId)) return e;
    }
    return undefined;
  }

  /**
   * Sends waiting entries in order until none is left or the connection fails. One run at a time; a call
   * during a run makes it look again at the end. Resolves when the run ends.
   */
  flush(): Promise<void> {
    if (this.flushing) {
      this.again = true;
      return this.flushing;
    }
    this.flushing = (async () => {
      await this.loaded;
      await this.chain;
      await (this.o.exclusive ?? webLock)(() => this.run());
    })().finally(() => {
      this.flushing = null;
    });
    return this.flushing;
  }

  private async run(): Promise<void> {
    await this.change((kept) => kept); // what another tab sent or added meanwhile
    do {
      this.again = false;
      if (this.o.isOnline && !this.o.isOnline()) return;
      for (let e = this.next(); e; e = this.next()) {
        let outcome: Outcome;
        let answer: unknown;
        try {
          answer = await this.o.send(e.write);
          outcome = { kind: 'sent' };
        } catch (err) {
          outcome = classify(err, e);
        }
        const id = e.id;
        if (outcome.kind === 'sent') {
          this.retriesInRow = 0;
          await this.change((es) => es.filter((x) => x.id !== id));
          this.o.onSent?.(e, answer);
        } else if (outcome.kind === 'retry') {
          const problem = outcome.problem;
          await this.change((es) => es.map((x) => (x.id === id ? { ...x, attempts: x.attempts + 1, problem } : x)));
          this.scheduleRetry();
          return;
        } else {
          const stopped: OutboxEntry = { ...e, state: outcome.kind, problem: outcome.problem };
          await this.change((es) => es.map((x) => (x.id === id ? stopped : x)));
          this.o.onStopped?.(stopped);
        }
      }
    } while (this.again);
  }

  private scheduleRetry() {
    const delay = this.o.retryDelay === undefined ? defaultRetryDelay : this.o.retryDelay;
    if (!delay || this.retryTimer) return;
    this.retriesInRow += 1;
    this.retryTimer = setTimeout(() => {
      this.retryTimer = null;
      void this.flush();
    }, delay(this.retriesInRow));
  }

  /** Stops the retry timer (tests, sign-out). */
  stop() {
    if (this.retryTimer) clearTimeout(this.retryTimer);
    this.retryTimer = null;
  }
}

/** 2 s, 4 s, 8 s … up to a minute. */
export const defaultRetryDelay = (n: number) => Math.min(1000 * 2 ** n, 60_000);

/** "3 changes waiting to send" and the like, for the banner and the Route. */
export function waitingText(entries: readonly OutboxEntry[]): string | null {
  const waiting = entries.filter((e) => e.state === 'waiting').length;
  const stopped = entries.length - waiting;
  const parts: string[] = [];
  if (waiting) parts.push(`${waiting} change${waiting === 1 ? '' : 's'} waiting to send`);
  if (stopped) parts.push(`${stopped} change${stopped === 1 ? '' : 's'} not accepted by the server`);
  return parts.length ? parts.join(', ') : null;
}
