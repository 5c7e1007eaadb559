/**
 * What a technician's phone keeps of the server's answers, so Coilpath opens and shows the day without
 * signal: TanStack Query's cache, persisted to IndexedDB (idb-keyval) by the async-storage persister.
 *
 * Kept: only while a technician is signed in, only successful answers, only what the technician's screens
 * read (`keptQueryRoots`). Nothing is kept for the office roles (shared computers), and signing out clears
 * the cache, which the persister then writes through (an empty cache replaces what was kept).
 */
import type { Query, QueryClient } from '@tanstack/react-query';
import type { PersistQueryClientOptions } from '@tanstack/react-query-persist-client';
import { createAsyncStoragePersister } from '@tanstack/query-async-storage-persister';
import { createStore, del, get, set } from 'idb-keyval';
import type { SessionUser } from '@coilpath/contract';

/** The first element of the query keys the technician's screens read (Route, briefings, Visit, Unit file). */
export const keptQueryRoots: ReadonlySet<string> = new Set(['session', 'branches', 'day', 'visit', 'unit-briefing', 'units']);

/** Kept data older than this is dropped on start: a route three days old is no guide. */
export const KEPT_FOR_MS = 3 * 24 * 60 * 60_000;

/**
 * Bump when a kept answer's shape changes incompatibly: a phone then discards what it kept under the old
 * shape on its next start (online or not) rather than showing it wrongly.
 */
export const KEPT_SHAPE_VERSION = 'coilpath-1';

/** Whether a query's answer goes to the phone's storage. */
export function shouldKeep(query: Pick<Query, 'queryKey' | 'state'>, signedIn: SessionUser | null | undefined): boolean {
  if (signedIn?.role !== 'technician') return false;
  if (query.state.status !== 'success') return false;
  const root = query.queryKey[0];
  return typeof root === 'string' && keptQueryRoots.has(root);
}

function idbStorage() {
  const store = createStore('coilpath', 'kept-answers');
  return {
    getItem: (key: string) => get<string>(key, store).then((v) => v ?? null),
    setItem: (key: string, value: string) => set(key, value, store),
    removeItem: (key: string) => del(key, store),
  };
}

/** The persist options for `PersistQueryClientProvider`; null where the browser has no IndexedDB. */
export function persistOptions(client: QueryClient): Omit<PersistQueryClientOptions, 'queryClient'> | null {
  if (typeof indexedDB === 'undefined') return null;
  return {
    persister: createAsyncStoragePersister({ storage: idbStorage(), key: 'coilpath.query-cache', throttleTime: 1000 }),
    maxAge: KEPT_FOR_MS,
    buster: KEPT_SHAPE_VERSION,
    dehydrateOptions: {
      shouldDehydrateQuery: (query) => shouldKeep(query, client.getQueryData<SessionUser | null>(['session'])),
    },
  };
}
