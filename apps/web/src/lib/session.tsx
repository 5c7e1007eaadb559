import { createContext, useContext, useEffect, type ReactNode } from 'react';
import { useQuery, useQueryClient, queryOptions } from '@tanstack/react-query';
import type { SessionUser } from '@coilpath/contract';
import { api, ApiError, setUnauthorizedHandler } from '@/lib/api-client';

export const sessionQuery = queryOptions({
  queryKey: ['session'],
  queryFn: async (): Promise<SessionUser | null> => {
    try {
      return (await api.get<{ user: SessionUser }>('/api/auth/me')).user;
    } catch (e) {
      if (e instanceof ApiError && e.status === 401) return null;
      throw e;
    }
  },
  staleTime: 5 * 60_000,
});

/** What the sign-in page is told after a sign-out, to say what happened. */
export type SignedOutState = { signedOut: 'here' } | { signedOut: 'everywhere'; email: string; endedAt: string };

const Ctx = createContext<SessionUser | null>(null);

/** The signed-in person; only used inside the app frame, where a session exists. */
export function useUser(): SessionUser {
  const u = useContext(Ctx);
  if (!u) throw new Error('useUser outside a signed-in frame');
  return u;
}

export function SessionProvider({ user, children }: { user: SessionUser; children: ReactNode }) {
  return <Ctx.Provider value={user}>{children}</Ctx.Provider>;
}

export function useSessionQuery() {
  const qc = useQueryClient();
  useEffect(() => {
    setUnauthorizedHandler(() => {
      qc.setQueryData(sessionQuery.queryKey, null);
    });
  }, [qc]);
  return useQuery(sessionQuery);
}
