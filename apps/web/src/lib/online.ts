import { useSyncExternalStore } from 'react';
import { onlineManager } from '@tanstack/react-query';

/**
 * Whether the browser has a connection, as TanStack Query sees it (the `online`/`offline` events, and a request
 * that failed at the network layer: `noteNetworkFailure`): queries and saves pause while it is false and
 * resume when it comes back.
 */
export function useOnline(): boolean {
  return useSyncExternalStore(
    (onChange) => onlineManager.subscribe(onChange),
    () => onlineManager.isOnline(),
    () => true,
  );
}

/** How often the app asks whether the server can be reached again after a request failed at the network layer. */
export const PROBE_EVERY_MS = 5000;

let probe: ReturnType<typeof setTimeout> | null = null;

/**
 * A request failed at the network layer (no answer at all): the phone is offline, whatever `navigator.onLine`
 * says. On a roof with a weak signal, and when the app is reopened without signal, the browser often still says
 * it is online; trusting it would turn the kept route into "could not be loaded" and keep the outbox trying.
 * The app counts itself offline (queries pause and keep what the phone kept) and asks `/api/health` every few
 * seconds until an answer comes back (or the browser's `online` event says so).
 */
export function noteNetworkFailure(reachable: () => Promise<boolean> = reachServer): void {
  if (onlineManager.isOnline()) onlineManager.setOnline(false);
  if (probe) return;
  const again = () => {
    probe = setTimeout(() => {
      void reachable().then(
        (ok) => {
          probe = null;
          if (onlineManager.isOnline()) return; // the browser's own event came first
          if (ok) onlineManager.setOnline(true);
          else again();
        },
        () => again(),
      );
    }, PROBE_EVERY_MS);
  };
  again();
}

/** An answer came back (any status): the server is reachable. */
export function noteNetworkAnswer(): void {
  if (!onlineManager.isOnline()) onlineManager.setOnline(true);
}

async function reachServer(): Promise<boolean> {
  try {
    const res = await fetch('/api/health', { cache: 'no-store', credentials: 'same-origin' });
    return res.status > 0;
  } catch {
    return false;
  }
}

/** Stops asking (tests). */
export function stopNetworkProbe(): void {
  if (probe) clearTimeout(probe);
  probe = null;
}
