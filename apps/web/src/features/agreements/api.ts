import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  AgreementDetail,
  AgreementInput,
  AgreementPatch,
  AgreementRow,
  PlanApplyResult,
  PlanPreview,
  PmCompletionResponse,
} from '@coilpath/contract';
import { api } from '@/lib/api-client';

export function useAgreements(branchId: string | undefined) {
  return useQuery({
    queryKey: ['agreements', branchId ?? 'all', 'list'],
    queryFn: () =>
      api
        .get<{ agreements: AgreementRow[] }>('/api/agreements', { branchId }, { check: 'agreementListAnswerSchema' })
        .then((r) => r.agreements),
  });
}
export function useAgreement(id: string | null) {
  return useQuery({
    queryKey: ['agreements', 'detail', id],
    enabled: id !== null,
    queryFn: () =>
      api
        .get<{ agreement: AgreementDetail }>(`/api/agreements/${id}`, undefined, { check: 'agreementAnswerSchema' })
        .then((r) => r.agreement),
  });
}
export function usePmCompletion(branchId: string | undefined) {
  return useQuery({
    queryKey: ['agreements', branchId ?? 'all', 'pm-completion'],
    queryFn: () => api.get<PmCompletionResponse>('/api/agreements/pm-completion', { branchId }, { check: 'pmCompletionResponseSchema' }),
  });
}

function useRefresh() {
  const qc = useQueryClient();
  return () => {
    void qc.invalidateQueries({ queryKey: ['agreements'] });
    void qc.invalidateQueries({ queryKey: ['roster'] });
  };
}

export function useCreateAgreement() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: (body: AgreementInput) =>
      api.post<{ agreement: AgreementDetail }>('/api/agreements', body, { check: 'agreementAnswerSchema' }).then((r) => r.agreement),
    onSuccess: refresh,
  });
}
export function usePatchAgreement() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: ({ id, patch }: { id: string; patch: AgreementPatch }) =>
      api
        .patch<{ agreement: AgreementDetail }>(`/api/agreements/${id}`, patch, { check: 'agreementAnswerSchema' })
        .then((r) => r.agreement),
    onSuccess: refresh,
  });
}
export const previewPlan = (id: string) => api.post<PlanPreview>(`/api/agreements/${id}/plan`, undefined, { check: 'planPreviewSchema' });
export const applyPlan = (id: string) =>
  api.post<PlanApplyResult>(`/api/agreements/${id}/plan/apply`, undefined, { check: 'planApplyResultSchema' });
export function useApplyPlan() {
  const refresh = useRefresh();
  return useMutation({ mutationFn: applyPlan, onSuccess: refresh });
}
export { useRefresh as useRefreshAgreements };
