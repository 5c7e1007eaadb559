import { useQuery } from '@tanstack/react-query';
import type { UnitChoice } from '@coilpath/contract';
import { api } from '@/lib/api-client';

/** The units a person may pick (alarm entry on the Watchlist, covered units of a new agreement). */
export function useUnitChoices(branchId: string | undefined) {
  return useQuery({
    queryKey: ['unit-choices', branchId ?? 'all'],
    queryFn: () =>
      api.get<{ units: UnitChoice[] }>('/api/watchlist/units', { branchId }, { check: 'unitChoicesAnswerSchema' }).then((r) => r.units),
    staleTime: 60_000,
  });
}
