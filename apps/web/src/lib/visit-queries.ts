import { queryOptions } from '@tanstack/react-query';
import type { UnitBriefing, UnitFile, VisitDetail } from '@coilpath/contract';
import { api } from '@/lib/api-client';

/** What the technician's route, the visit screen and the Unit file share: the unit briefing and the unit file (writes go through ./visit-outbox.ts). */

export const briefingQuery = (unitId: string) =>
  queryOptions({
    queryKey: ['unit-briefing', unitId],
    queryFn: () => api.get<UnitBriefing>(`/api/units/${unitId}/briefing`, undefined, { check: 'unitBriefingSchema' }),
    staleTime: 5 * 60_000,
  });

export const unitFileQuery = (id: string) =>
  queryOptions({
    queryKey: ['units', 'file', id],
    queryFn: () => api.get<UnitFile>(`/api/units/${id}/file`, undefined, { check: 'unitFileSchema' }),
  });

export const visitQuery = (id: string) =>
  queryOptions({
    queryKey: ['visit', id],
    queryFn: () => api.get<VisitDetail>(`/api/visits/${id}`, undefined, { check: 'visitDetailSchema' }),
  });
