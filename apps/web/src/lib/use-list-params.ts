import { useCallback, useEffect, useMemo, useState } from 'react';
import { useSearchParams } from 'react-router-dom';
import type { SortingState } from '@tanstack/react-table';

export interface ListParams {
  page: number;
  pageSize: number;
  sort: string | undefined;
  dir: 'asc' | 'desc';
  q: string;
  status: string;
}

/**
 * A server-paged table's state kept in the URL (so a link or the back button restores it): page,
 * page size, sort, direction, search and status. Any change other than the page returns to page 1.
 */
export function useListParams(defaults: { sort?: string; status?: string; pageSize?: number } = {}) {
  const [sp, setSp] = useSearchParams();
  const params: ListParams = useMemo(
    () => ({
      page: Math.max(1, Number(sp.get('page')) || 1),
      pageSize: Number(sp.get('pageSize')) || defaults.pageSize || 25,
      sort: sp.get('sort') ?? defaults.sort,
      dir: sp.get('dir') === 'desc' ? 'desc' : 'asc',
      q: sp.get('q') ?? '',
      status: sp.get('status') ?? defaults.status ?? 'active',
    }),
    [sp, defaults.pageSize, defaults.sort, defaults.status],
  );
  const set = useCallback(
    (patch: Partial<Record<keyof ListParams | string, string | number | undefined>>) => {
      setSp(
        (prev) => {
          const next = new URLSearchParams(prev);
          for (const [k, v] of Object.entries(patch)) {
            if (v === undefined || v === '') next.delete(k);
            else next.set(k, String(v));
          }
          if (!('page' in patch)) next.delete('page');
          return next;
        },
        { replace: true },
      );
    },
    [setSp],
  );
  const sorting: SortingState = params.sort ? [{ id: params.sort, desc: params.dir === 'desc' }] : [];
  const onSortingChange = useCallback(
    (s: SortingState) => {
      const first = s[0];
      set({ sort: first?.id, dir: first?.desc ? 'desc' : undefined });
    },
    [set],
  );
  return { params, set, sorting, onSortingChange, searchParams: sp };
}

/** A search box's text, pushed to the URL a moment after typing stops. */
export function useDebouncedSearch(value: string, commit: (q: string) => void, ms = 300) {
  const [text, setText] = useState(value);
  // A new value from the URL (back, a link) replaces what is typed.
  const [shownValue, setShownValue] = useState(value);
  if (value !== shownValue) {
    setShownValue(value);
    setText(value);
  }
  useEffect(() => {
    if (text === value) return;
    const h = window.setTimeout(() => commit(text), ms);
    return () => window.clearTimeout(h);
  }, [text, value, commit, ms]);
  return [text, setText] as const;
}
