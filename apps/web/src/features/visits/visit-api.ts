import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import type {
  AttachmentDto,
  CloseVisit,
  CloseVisitResult,
  CurrentVisitResult,
  FindingDto,
  FindingInput,
  ReadingDto,
  RefrigerantEventInput,
  RefrigerantEventResult,
  SaveReadings,
  SummaryMailResult,
  VisitDetail,
} from '@coilpath/contract';
import { api } from '@/lib/api-client';
import { saveRetry } from '@/lib/visit-queries';

export const visitQuery = (id: string) =>
  queryOptions({ queryKey: ['visit', id], queryFn: () => api.get<VisitDetail>(`/api/visits/${id}`) });

export const currentVisitQuery = queryOptions({
  queryKey: ['visit', 'current'],
  queryFn: () => api.get<CurrentVisitResult>('/api/visits/current'),
  staleTime: 0,
});

export function useSaveReadings(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationKey: ['save-readings', id],
    mutationFn: (body: SaveReadings) => api.post<{ readings: ReadingDto[] }>(`/api/visits/${id}/readings`, body),
    ...saveRetry,
    onSuccess: () => qc.invalidateQueries({ queryKey: ['visit', id] }),
  });
}

export function useAddFinding(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: FindingInput) => api.post<{ finding: FindingDto }>(`/api/visits/${id}/findings`, body),
    ...saveRetry,
    onSuccess: () => qc.invalidateQueries({ queryKey: ['visit', id] }),
  });
}

export function useAddRefrigerant(visitId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ unitId, body }: { unitId: string; body: RefrigerantEventInput }) =>
      api.post<RefrigerantEventResult>(`/api/units/${unitId}/refrigerant-events`, body),
    ...saveRetry,
    onSuccess: (_r, v) => {
      void qc.invalidateQueries({ queryKey: ['visit', visitId] });
      void qc.invalidateQueries({ queryKey: ['unit-briefing', v.unitId] });
    },
  });
}

export function useUpload(visitId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ file, kind }: { file: File; kind: 'photo' | 'nameplate' | 'document' }) => {
      const form = new FormData();
      form.set('kind', kind);
      form.set('file', file);
      return api.upload<{ attachment: AttachmentDto }>(`/api/visits/${visitId}/attachments`, form);
    },
    ...saveRetry,
    onSuccess: () => qc.invalidateQueries({ queryKey: ['visit', visitId] }),
  });
}

export function useCloseVisit(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CloseVisit) => api.post<CloseVisitResult>(`/api/visits/${id}/close`, body),
    onSuccess: (r) => {
      qc.setQueryData(['visit', id], r.visit);
      void qc.invalidateQueries({ queryKey: ['day'] });
      void qc.invalidateQueries({ queryKey: ['visit', 'current'] });
    },
  });
}

export function useResendSummary(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<{ summary: SummaryMailResult }>(`/api/visits/${id}/summary`).then((r) => r.summary),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['visit', id] }),
  });
}
