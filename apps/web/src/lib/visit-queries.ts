import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { UnitBriefing, VisitDetail, VisitStateChange } from '@coilpath/contract';
import { api, ApiError } from '@/lib/api-client';

/** What the technician's route and the visit screen share: the unit briefing, the save retry and the state change. */

export const briefingQuery = (unitId: string) =>
  queryOptions({ queryKey: ['unit-briefing', unitId], queryFn: () => api.get<UnitBriefing>(`/api/units/${unitId}/briefing`), staleTime: 5 * 60_000 });

/** A save worth retrying: the network failed or the server had a problem (not a refusal). */
export function isRetryable(err: unknown): boolean {
  return err instanceof ApiError && (err.status === 0 || err.status >= 500 || err.status === 408 || err.status === 429);
}

/** Retries a failed save with backoff (1 s, 2 s, 4 s … up to 30 s), for phones on a bad connection. */
export const saveRetry = {
  retry: (count: number, err: unknown) => count < 6 && isRetryable(err),
  retryDelay: (attempt: number) => Math.min(1000 * 2 ** attempt, 30_000),
};

export function useVisitState(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: VisitStateChange) => api.patch<VisitDetail>(`/api/visits/${id}`, body),
    ...saveRetry,
    onSuccess: (v) => {
      qc.setQueryData(['visit', id], v);
      void qc.invalidateQueries({ queryKey: ['day'] });
      void qc.invalidateQueries({ queryKey: ['visit', 'current'] });
    },
  });
}
