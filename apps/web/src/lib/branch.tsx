import { createContext, useContext, useMemo, useState, type ReactNode } from 'react';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { useUser } from './session';

export interface BranchSummary {
  id: string;
  name: string;
  code: string;
  timeZone: string;
  unitSystem: 'imperial' | 'si';
  currency: string;
  sensorTolerancePercent: number;
  sensorToleranceAbsolute: number;
  repeatAlarmCount: number;
  repeatAlarmDays: number;
  callbackWindowDays: number;
  inspectionDueDays: number;
}

export const branchesQuery = queryOptions({
  queryKey: ['branches', 'visible'],
  queryFn: () =>
    api.get<{ branches: BranchSummary[] }>('/api/branches', undefined, { check: 'branchListAnswerSchema' }).then((r) => r.branches),
  staleTime: 5 * 60_000,
});

interface BranchContext {
  /** The branch the screens show; `undefined` = all branches (owner only). */
  branchId: string | undefined;
  branch: BranchSummary | undefined;
  branches: BranchSummary[];
  /** The time zone to show times in: the branch's, else the first branch's. */
  timeZone: string;
  setBranchId(id: string | undefined): void;
  canSwitch: boolean;
}

const Ctx = createContext<BranchContext | null>(null);
const storageKey = 'coilpath.branch';

export function BranchProvider({ children }: { children: ReactNode }) {
  const user = useUser();
  const { data: branches = [] } = useQuery(branchesQuery);
  const [chosen, setChosen] = useState<string | undefined>(() => localStorage.getItem(storageKey) ?? undefined);
  const value = useMemo<BranchContext>(() => {
    const canSwitch = user.role === 'owner';
    const id = canSwitch ? (chosen && branches.some((b) => b.id === chosen) ? chosen : undefined) : (user.branchId ?? undefined);
    const branch = branches.find((b) => b.id === id);
    return {
      branchId: id,
      branch,
      branches,
      timeZone: branch?.timeZone ?? branches[0]?.timeZone ?? Intl.DateTimeFormat().resolvedOptions().timeZone,
      canSwitch,
      setBranchId(next) {
        if (next) localStorage.setItem(storageKey, next);
        else localStorage.removeItem(storageKey);
        setChosen(next);
      },
    };
  }, [user, branches, chosen]);
  return <Ctx.Provider value={value}>{children}</Ctx.Provider>;
}

export function useBranch(): BranchContext {
  const c = useContext(Ctx);
  if (!c) throw new Error('useBranch outside BranchProvider');
  return c;
}
