import { queryOptions } from '@tanstack/react-query';
import type { UnitBriefing } from '@coilpath/contract';
import { api } from '@/lib/api-client';

/** What the technician's route and the visit screen share: the unit briefing (writes go through ./visit-outbox.ts). */

export const briefingQuery = (unitId: string) =>
  queryOptions({ queryKey: ['unit-briefing', unitId], queryFn: () => api.get<UnitBriefing>(`/api/units/${unitId}/briefing`), staleTime: 5 * 60_000 });
