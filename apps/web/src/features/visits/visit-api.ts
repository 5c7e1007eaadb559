import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type { CurrentVisitResult, SummaryMailResult } from '@coilpath/contract';
import { api } from '@/lib/api-client';

// The technician's writes on a visit go through the outbox (`@/lib/visit-outbox`); what is here reads,
// or (sending the summary again) needs the connection there and then.

export const currentVisitQuery = queryOptions({
  queryKey: ['visit', 'current'],
  queryFn: () => api.get<CurrentVisitResult>('/api/visits/current', undefined, { check: 'currentVisitResultSchema' }),
  staleTime: 0,
});

export function useResendSummary(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () =>
      api
        .post<{ summary: SummaryMailResult }>(`/api/visits/${id}/summary`, undefined, { check: 'summaryAnswerSchema' })
        .then((r) => r.summary),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['visit', id] }),
  });
}
