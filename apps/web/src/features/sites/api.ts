import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CustomerRow, Page, SiteRow, UnitRow } from '@coilpath/contract';
import { api } from '@/lib/api-client';
import type { ListParams } from '@/lib/use-list-params';

type Filter = Partial<ListParams> & { branchId?: string | undefined; siteId?: string | undefined; customerId?: string | undefined };

const clean = (f: Filter) => ({
  page: f.page,
  pageSize: f.pageSize,
  sort: f.sort,
  dir: f.dir,
  q: f.q || undefined,
  status: f.status,
  branchId: f.branchId,
  siteId: f.siteId,
  customerId: f.customerId,
});

export const keys = {
  customers: (f: Filter) => ['customers', clean(f)] as const,
  sites: (f: Filter) => ['sites', clean(f)] as const,
  site: (id: string) => ['sites', 'one', id] as const,
  units: (f: Filter) => ['units', clean(f)] as const,
};

export function useCustomers(f: Filter, enabled = true) {
  return useQuery({
    queryKey: keys.customers(f),
    queryFn: () => api.get<Page<CustomerRow>>('/api/customers', clean(f), { check: 'customerPageSchema' }),
    placeholderData: keepPreviousData,
    enabled,
  });
}

export function useSites(f: Filter, enabled = true) {
  return useQuery({
    queryKey: keys.sites(f),
    queryFn: () => api.get<Page<SiteRow>>('/api/sites', clean(f), { check: 'sitePageSchema' }),
    placeholderData: keepPreviousData,
    enabled,
  });
}

export function useSite(id: string) {
  return useQuery({ queryKey: keys.site(id), queryFn: () => api.get<SiteRow>(`/api/sites/${id}`, undefined, { check: 'siteRowSchema' }) });
}

export function useUnits(f: Filter) {
  return useQuery({
    queryKey: keys.units(f),
    queryFn: () => api.get<Page<UnitRow>>('/api/units', clean(f), { check: 'unitPageSchema' }),
    placeholderData: keepPreviousData,
  });
}

/** After any change in this area, lists and records refetch. */
export function useInvalidateSites() {
  const qc = useQueryClient();
  return () =>
    Promise.all([
      qc.invalidateQueries({ queryKey: ['customers'] }),
      qc.invalidateQueries({ queryKey: ['sites'] }),
      qc.invalidateQueries({ queryKey: ['units'] }),
    ]);
}

/** What archiving or unarchiving answers: the record as it now is. */
const rowSchemaOf = { customers: 'customerRowSchema', sites: 'siteRowSchema', units: 'unitRowSchema' } as const;

/** Archive, unarchive or delete a customer, site or unit. */
export function useRecordAction() {
  const invalidate = useInvalidateSites();
  return useMutation({
    mutationFn: ({
      kind,
      id,
      action,
    }: {
      kind: 'customers' | 'sites' | 'units';
      id: string;
      action: 'archive' | 'unarchive' | 'delete';
    }) =>
      action === 'delete'
        ? api.delete<void>(`/api/${kind}/${id}`)
        : api.post<unknown>(`/api/${kind}/${id}/${action}`, undefined, { check: rowSchemaOf[kind] }),
    onSuccess: () => invalidate(),
  });
}
