import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  AlarmDeliveryRow,
  AlarmSourceCreate,
  AlarmSourceList,
  AlarmSourcePatch,
  AlarmSourceRow,
  AlarmSourceSecret,
  AlarmImportResult,
  AlarmInput,
  AlarmRow,
  BookRepair,
  BookRepairResult,
  LeakCasePatch,
  LeakCaseRow,
  QueueReturnVisit,
  RepeatAlarmResponse,
  ReturnVisitRow,
  VerificationTestInput,
} from '@coilpath/contract';
import { api } from '@/lib/api-client';

const key = (branchId: string | undefined) => ['watchlist', branchId ?? 'all'] as const;

export function useLeakCases(branchId: string | undefined) {
  return useQuery({
    queryKey: [...key(branchId), 'leak-cases'],
    queryFn: () =>
      api
        .get<{ leakCases: LeakCaseRow[] }>('/api/leak-cases', { branchId }, { check: 'leakCaseListAnswerSchema' })
        .then((r) => r.leakCases),
  });
}
export function useRepeatAlarms(branchId: string | undefined) {
  return useQuery({
    queryKey: [...key(branchId), 'repeat-alarms'],
    queryFn: () => api.get<RepeatAlarmResponse>('/api/watchlist/repeat-alarms', { branchId }, { check: 'repeatAlarmResponseSchema' }),
  });
}
export function useReturnVisits(branchId: string | undefined) {
  return useQuery({
    queryKey: [...key(branchId), 'return-visits'],
    queryFn: () =>
      api
        .get<{ returnVisits: ReturnVisitRow[] }>('/api/watchlist/return-visits', { branchId }, { check: 'returnVisitListAnswerSchema' })
        .then((r) => r.returnVisits),
  });
}
export function useRecentAlarms(branchId: string | undefined) {
  return useQuery({
    queryKey: [...key(branchId), 'alarms'],
    queryFn: () =>
      api.get<{ alarms: AlarmRow[] }>('/api/alarms', { branchId, limit: 20 }, { check: 'alarmListAnswerSchema' }).then((r) => r.alarms),
  });
}

/** Every Watchlist mutation refreshes the Watchlist's queries (and the Roster's, which shows the queue). */
function useRefresh() {
  const qc = useQueryClient();
  return () => {
    void qc.invalidateQueries({ queryKey: ['watchlist'] });
    void qc.invalidateQueries({ queryKey: ['roster'] });
  };
}

export function useCreateAlarm() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: (body: AlarmInput) =>
      api.post<{ alarm: AlarmRow }>('/api/alarms', body, { check: 'alarmAnswerSchema' }).then((r) => r.alarm),
    onSuccess: refresh,
  });
}
export function useImportAlarms() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: (body: { file: string; mode: 'dry_run' | 'commit'; branchId?: string | undefined }) =>
      api.post<AlarmImportResult>('/api/alarms/import', body, { check: 'alarmImportResultSchema' }),
    onSuccess: (r) => r.mode === 'commit' && refresh(),
  });
}
export function usePatchLeakCase() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: ({ id, patch }: { id: string; patch: LeakCasePatch }) =>
      api.patch<{ leakCase: LeakCaseRow }>(`/api/leak-cases/${id}`, patch, { check: 'leakCaseAnswerSchema' }),
    onSuccess: refresh,
  });
}
export function useAddVerificationTest() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: ({ id, body }: { id: string; body: VerificationTestInput }) =>
      api.post<{ leakCase: LeakCaseRow }>(`/api/leak-cases/${id}/verification-tests`, body, { check: 'leakCaseAnswerSchema' }),
    onSuccess: refresh,
  });
}
export function useBookRepair() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: ({ id, body }: { id: string; body: BookRepair }) =>
      api.post<BookRepairResult>(`/api/leak-cases/${id}/repair-visit`, body, { check: 'bookRepairResultSchema' }),
    onSettled: refresh,
  });
}
export function useQueueReturnVisit() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: ({ id, body }: { id: string; body: QueueReturnVisit }) =>
      api.patch<{ returnVisit: ReturnVisitRow }>(`/api/watchlist/return-visits/${id}`, body, { check: 'returnVisitAnswerSchema' }),
    onSuccess: refresh,
  });
}

/* ---------------------------------------------------------------- alarm sources */

export function useAlarmSources(branchId: string | undefined) {
  return useQuery({
    queryKey: [...key(branchId), 'alarm-sources'],
    queryFn: () => api.get<AlarmSourceList>('/api/alarm-sources', { branchId }, { check: 'alarmSourceListSchema' }).then((r) => r.sources),
  });
}
export function useCreateAlarmSource() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: (body: AlarmSourceCreate) => api.post<AlarmSourceSecret>('/api/alarm-sources', body, { check: 'alarmSourceSecretSchema' }),
    onSuccess: refresh,
  });
}
export function useRotateAlarmSource() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: (id: string) => api.post<AlarmSourceSecret>(`/api/alarm-sources/${id}/rotate`, {}, { check: 'alarmSourceSecretSchema' }),
    onSuccess: refresh,
  });
}
export function usePatchAlarmSource() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: ({ id, patch }: { id: string; patch: AlarmSourcePatch }) =>
      api.patch<{ source: AlarmSourceRow }>(`/api/alarm-sources/${id}`, patch, { check: 'alarmSourceAnswerSchema' }),
    onSuccess: refresh,
  });
}
export function useMapDelivery() {
  const refresh = useRefresh();
  return useMutation({
    mutationFn: ({ id, unitId }: { id: string; unitId: string }) =>
      api.post<{ delivery: AlarmDeliveryRow; alarmId: string }>(
        `/api/alarm-sources/deliveries/${id}/map`,
        { unitId },
        { check: 'mappedDeliveryAnswerSchema' },
      ),
    onSettled: refresh,
  });
}
