import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  Booking,
  BookingCreate,
  BookingUpdate,
  EvenOutPreview,
  Proposal,
  RosterSite,
  SuggestResult,
  Technician,
  TechnicianDayLoad,
  WorkOrder,
  WorkOrderCreate,
  EvenOutMove,
} from '@coilpath/contract';
import { api, ApiError } from '@/lib/api-client';

export const rosterKeys = {
  all: ['roster'] as const,
  technicians: (branchId: string) => ['roster', 'technicians', branchId] as const,
  sites: (branchId: string) => ['roster', 'sites', branchId] as const,
  bookings: (branchId: string, from: string, to: string) => ['roster', 'bookings', branchId, from, to] as const,
  load: (branchId: string, from: string, to: string) => ['roster', 'load', branchId, from, to] as const,
  unplaced: (branchId: string) => ['work-orders', { branchId, state: 'unplaced' }] as const,
};

export function useTechnicians(branchId: string | undefined) {
  return useQuery({
    queryKey: rosterKeys.technicians(branchId ?? ''),
    queryFn: () =>
      api.get<{ timeZone: string; technicians: Technician[] }>('/api/roster/technicians', { branchId }, { check: 'technicianListSchema' }),
    enabled: !!branchId,
    staleTime: 60_000,
  });
}

export function useRosterSites(branchId: string | undefined, enabled: boolean) {
  return useQuery({
    queryKey: rosterKeys.sites(branchId ?? ''),
    queryFn: () =>
      api.get<{ sites: RosterSite[] }>('/api/roster/sites', { branchId }, { check: 'rosterSiteListSchema' }).then((r) => r.sites),
    enabled: !!branchId && enabled,
    staleTime: 60_000,
  });
}

export function useBookings(branchId: string | undefined, from: string, to: string) {
  return useQuery({
    queryKey: rosterKeys.bookings(branchId ?? '', from, to),
    queryFn: () =>
      api.get<{ bookings: Booking[] }>('/api/bookings', { branchId, from, to }, { check: 'bookingListSchema' }).then((r) => r.bookings),
    enabled: !!branchId && !!from && !!to,
    placeholderData: keepPreviousData,
  });
}

export function useLoad(branchId: string | undefined, from: string, to: string) {
  return useQuery({
    queryKey: rosterKeys.load(branchId ?? '', from, to),
    queryFn: () =>
      api
        .get<{ timeZone: string; load: TechnicianDayLoad[] }>('/api/roster/load', { branchId, from, to }, { check: 'loadSchema' })
        .then((r) => r.load),
    enabled: !!branchId && !!from && !!to,
    placeholderData: keepPreviousData,
  });
}

export function useUnplaced(branchId: string | undefined) {
  return useQuery({
    queryKey: rosterKeys.unplaced(branchId ?? ''),
    queryFn: () =>
      api
        .get<{ workOrders: WorkOrder[] }>('/api/work-orders', { branchId, state: 'unplaced' }, { check: 'workOrderListSchema' })
        .then((r) => r.workOrders),
    enabled: !!branchId,
  });
}

/** Work orders of a site that a return visit or callback may come from. */
export function useSiteWorkOrders(branchId: string | undefined, siteId: string | undefined) {
  return useQuery({
    queryKey: ['work-orders', { branchId, siteId }],
    queryFn: () =>
      api
        .get<{ workOrders: WorkOrder[] }>('/api/work-orders', { branchId, siteId, limit: 50 }, { check: 'workOrderListSchema' })
        .then((r) => r.workOrders),
    enabled: !!branchId && !!siteId,
  });
}

function useInvalidateRoster() {
  const qc = useQueryClient();
  return () => Promise.all([qc.invalidateQueries({ queryKey: rosterKeys.all }), qc.invalidateQueries({ queryKey: ['work-orders'] })]);
}

export function useCreateBooking() {
  const invalidate = useInvalidateRoster();
  return useMutation({
    mutationFn: (body: BookingCreate) =>
      api.post<{ booking: Booking }>('/api/bookings', body, { check: 'bookingAnswerSchema' }).then((r) => r.booking),
    onSettled: invalidate,
  });
}

export function useUpdateBooking() {
  const invalidate = useInvalidateRoster();
  return useMutation({
    mutationFn: ({ id, ...body }: BookingUpdate & { id: string }) =>
      api.patch<{ booking: Booking }>(`/api/bookings/${id}`, body, { check: 'bookingAnswerSchema' }).then((r) => r.booking),
    onSettled: invalidate,
  });
}

export function useDeleteBooking() {
  const invalidate = useInvalidateRoster();
  return useMutation({
    mutationFn: (id: string) => api.delete<void>(`/api/bookings/${id}`),
    onSettled: invalidate,
  });
}

export function useCreateWorkOrder() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: WorkOrderCreate) =>
      api.post<{ workOrder: WorkOrder }>('/api/work-orders', body, { check: 'workOrderAnswerSchema' }).then((r) => r.workOrder),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['work-orders'] }),
  });
}

export function useSuggest() {
  return useMutation({
    mutationFn: (body: { workOrderId: string; day: string }) =>
      api.post<SuggestResult>('/api/roster/suggest', body, { check: 'suggestResultSchema' }),
  });
}

export function useEvenOutPreview() {
  return useMutation({
    mutationFn: (body: { branchId: string; week: string }) =>
      api.post<EvenOutPreview>('/api/roster/even-out', body, { check: 'evenOutPreviewSchema' }),
  });
}

export function useEvenOutApply() {
  const invalidate = useInvalidateRoster();
  return useMutation({
    mutationFn: (body: { proposals: Proposal[]; moves: EvenOutMove[] }) =>
      api.post<{ bookings: Booking[] }>('/api/roster/even-out/apply', body, { check: 'evenOutApplyResultSchema' }).then((r) => r.bookings),
    onSettled: invalidate,
  });
}

/** True for the API's "moved by someone else" answer. */
export const isStale = (e: unknown) => e instanceof ApiError && e.code === 'stale_version';
