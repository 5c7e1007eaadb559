import { onlineManager, QueryClient } from '@tanstack/react-query';
import { ApiError } from './api-client';
import { KEPT_FOR_MS } from './query-persist';

export function createQueryClient() {
  // TanStack Query assumes a connection until an `offline` event: a page opened without signal starts offline.
  if (typeof navigator !== 'undefined' && navigator.onLine === false) onlineManager.setOnline(false);
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        // As long as the phone keeps answers (./query-persist.ts): a shorter time would drop them on restore.
        gcTime: KEPT_FOR_MS,
        retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
        refetchOnWindowFocus: false,
      },
    },
  });
}
