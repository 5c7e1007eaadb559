import { useCallback, useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { Archive, ArchiveRestore, Pencil, Plus, Trash2 } from 'lucide-react';
import type { CustomerRow, SiteRow } from '@coilpath/contract';
import { errorMessage } from '@/lib/api-client';
import { useListParams } from '@/lib/use-list-params';
import { useBranch } from '@/lib/branch';
import { Button } from '@/components/ui/button';
import { SearchBox } from '@/components/search-box';
import { DataTable, type CoilpathColumn } from '@/components/ui/data-table';
import { Dialog } from '@/components/ui/dialog';
import { useNotify } from '@/components/ui/notices';
import { Badge, PageHeader } from '@/components/ui/page';
import { Pager } from '@/components/ui/pager';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useCustomers, useRecordAction, useSites } from './api';
import { CustomerForm, SiteForm } from './forms';

type Tab = 'sites' | 'customers';

export function StatusFilter({ value, onChange }: { value: string; onChange: (v: string) => void }) {
  return (
    <label className="flex items-center gap-2 text-sm">
      <span className="text-slate">Show</span>
      <select
        className="min-h-11 rounded-md border border-slate-line bg-white px-2"
        value={value}
        onChange={(e) => onChange(e.target.value)}
      >
        <option value="active">In use</option>
        <option value="archived">Archived</option>
        <option value="all">All</option>
      </select>
    </label>
  );
}

export default function SitesPage() {
  const { branchId, branch } = useBranch();
  const list = useListParams({ sort: 'name' });
  const tab: Tab = list.searchParams.get('tab') === 'customers' ? 'customers' : 'sites';
  const [dialog, setDialog] = useState<{ kind: 'site'; site?: SiteRow } | { kind: 'customer'; customer?: CustomerRow } | null>(null);
  const notify = useNotify();
  const action = useRecordAction();
  const filter = { ...list.params, branchId };
  const customerFilter = list.searchParams.get('customer') ?? undefined;
  const sites = useSites({ ...filter, customerId: customerFilter }, tab === 'sites');
  const customers = useCustomers(filter, tab === 'customers');
  const where = branch ? branch.name : 'all branches';

  const { mutateAsync } = action;
  const run = useCallback(
    async (kind: 'customers' | 'sites', id: string, verb: 'archive' | 'unarchive' | 'delete', name: string) => {
      if (verb === 'delete' && !window.confirm(`Delete ${name}? This cannot be undone.`)) return;
      try {
        await mutateAsync({ kind, id, action: verb });
        notify(
          verb === 'delete'
            ? `Deleted ${name}.`
            : verb === 'archive'
              ? `Archived ${name}: hidden from booking, history kept.`
              : `${name} is back in use.`,
        );
      } catch (e) {
        notify(errorMessage(e), 'alarm');
      }
    },
    [mutateAsync, notify],
  );

  const siteColumns = useMemo<CoilpathColumn<SiteRow>[]>(
    () => [
      {
        accessorKey: 'name',
        header: 'Site',
        cell: ({ row }) => (
          <div>
            <Link to={`/sites/${row.original.id}`} className="font-medium text-coolant underline-offset-2 hover:underline">
              {row.original.name}
            </Link>
            {row.original.archivedAt && (
              <Badge className="ml-2">
                <Archive className="size-3" aria-hidden="true" /> Archived
              </Badge>
            )}
            <div className="text-xs text-slate">{row.original.address}</div>
          </div>
        ),
      },
      { accessorKey: 'customerName', header: 'Customer' },
      {
        accessorKey: 'city',
        header: 'City',
        cell: ({ row }) => [row.original.city, row.original.region].filter(Boolean).join(', ') || '—',
      },
      ...(branchId ? [] : [{ accessorKey: 'branchName', header: 'Branch' } as CoilpathColumn<SiteRow>]),
      { accessorKey: 'unitCount', header: 'Units', cell: ({ row }) => <span className="tabular">{row.original.unitCount}</span> },
      {
        id: 'contact',
        header: 'Site contact',
        enableSorting: false,
        cell: ({ row }) => row.original.contactName ?? row.original.contactEmail ?? '—',
      },
      {
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        enableSorting: false,
        cell: ({ row }) => {
          const s = row.original;
          return (
            <div className="flex justify-end gap-1">
              <Button variant="ghost" size="sm" aria-label={`Edit ${s.name}`} onClick={() => setDialog({ kind: 'site', site: s })}>
                <Pencil className="size-4" aria-hidden="true" />
              </Button>
              <Button
                variant="ghost"
                size="sm"
                aria-label={s.archivedAt ? `Unarchive ${s.name}` : `Archive ${s.name}`}
                onClick={() => run('sites', s.id, s.archivedAt ? 'unarchive' : 'archive', s.name)}
              >
                {s.archivedAt ? (
                  <ArchiveRestore className="size-4" aria-hidden="true" />
                ) : (
                  <Archive className="size-4" aria-hidden="true" />
                )}
              </Button>
              <Button variant="ghost" size="sm" aria-label={`Delete ${s.name}`} onClick={() => run('sites', s.id, 'delete', s.name)}>
                <Trash2 className="size-4" aria-hidden="true" />
              </Button>
            </div>
          );
        },
      },
    ],
    [branchId, run],
  );

  const customerColumns = useMemo<CoilpathColumn<CustomerRow>[]>(
    () => [
      {
        accessorKey: 'name',
        header: 'Customer',
        cell: ({ row }) => (
          <span className="font-medium">
            {row.original.name}
            {row.original.archivedAt && <Badge className="ml-2">Archived</Badge>}
          </span>
        ),
      },
      { accessorKey: 'contactName', header: 'Contact', cell: ({ row }) => row.original.contactName ?? '—' },
      { id: 'email', header: 'E-mail', enableSorting: false, cell: ({ row }) => row.original.contactEmail ?? '—' },
      ...(branchId ? [] : [{ accessorKey: 'branchName', header: 'Branch' } as CoilpathColumn<CustomerRow>]),
      {
        accessorKey: 'siteCount',
        header: 'Sites',
        cell: ({ row }) => (
          <Link className="tabular text-coolant underline-offset-2 hover:underline" to={`/sites?customer=${row.original.id}`}>
            {row.original.siteCount}
          </Link>
        ),
      },
      {
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        enableSorting: false,
        cell: ({ row }) => {
          const c = row.original;
          return (
            <div className="flex justify-end gap-1">
              <Button variant="ghost" size="sm" aria-label={`Edit ${c.name}`} onClick={() => setDialog({ kind: 'customer', customer: c })}>
                <Pencil className="size-4" aria-hidden="true" />
              </Button>
              <Button
                variant="ghost"
                size="sm"
                aria-label={c.archivedAt ? `Unarchive ${c.name}` : `Archive ${c.name}`}
                onClick={() => run('customers', c.id, c.archivedAt ? 'unarchive' : 'archive', c.name)}
              >
                {c.archivedAt ? (
                  <ArchiveRestore className="size-4" aria-hidden="true" />
                ) : (
                  <Archive className="size-4" aria-hidden="true" />
                )}
              </Button>
              <Button variant="ghost" size="sm" aria-label={`Delete ${c.name}`} onClick={() => run('customers', c.id, 'delete', c.name)}>
                <Trash2 className="size-4" aria-hidden="true" />
              </Button>
            </div>
          );
        },
      },
    ],
    [branchId, run],
  );

  const q = tab === 'sites' ? sites : customers;

  const tabButton = (t: Tab, label: string) => (
    <button
      type="button"
      role="tab"
      aria-selected={tab === t}
      onClick={() =>
        list.set({
          tab: t === 'sites' ? undefined : t,
          sort: undefined,
          dir: undefined,
          q: undefined,
          customer: undefined,
          status: undefined,
        })
      }
      className={`min-h-11 border-b-2 px-4 text-sm font-medium ${tab === t ? 'border-copper text-ink' : 'border-transparent text-slate hover:text-ink'}`}
    >
      {label}
    </button>
  );

  return (
    <>
      <PageHeader
        title="Sites"
        subtitle={`Customers, their sites and the units on them — ${where}. Archived records leave booking and keep their history.`}
        actions={
          <>
            <Button variant={tab === 'customers' ? 'primary' : 'secondary'} onClick={() => setDialog({ kind: 'customer' })}>
              <Plus className="size-4" aria-hidden="true" /> Add customer
            </Button>
            {tab === 'sites' && (
              <Button onClick={() => setDialog({ kind: 'site' })}>
                <Plus className="size-4" aria-hidden="true" /> Add site
              </Button>
            )}
          </>
        }
      />
      <div role="tablist" aria-label="What to list" className="mb-4 flex border-b border-slate-line">
        {tabButton('sites', 'Sites')}
        {tabButton('customers', 'Customers')}
      </div>
      <div className="mb-3 flex flex-wrap items-center gap-3">
        <SearchBox
          key={tab}
          value={list.params.q}
          onCommit={(text) => list.set({ q: text })}
          label={tab === 'sites' ? 'Search site, address or customer' : 'Search customer or contact'}
        />
        <StatusFilter value={list.params.status} onChange={(v) => list.set({ status: v === 'active' ? undefined : v })} />
        {customerFilter && tab === 'sites' && (
          <Button variant="secondary" size="sm" onClick={() => list.set({ customer: undefined })}>
            Showing one customer’s sites — show all
          </Button>
        )}
      </div>
      {q.isPending ? (
        <LoadingState label={`Loading ${tab}…`} />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : q.data.total === 0 && !list.params.q && list.params.status === 'active' && !customerFilter ? (
        tab === 'sites' ? (
          <EmptyState
            title="No sites yet"
            action={
              <Button onClick={() => setDialog({ kind: 'site' })}>
                <Plus className="size-4" aria-hidden="true" /> Add site
              </Button>
            }
          >
            Sites are the buildings you service. Add the customer, then its sites; then add units one by one or import them from a CSV file
            on the site’s page.
          </EmptyState>
        ) : (
          <EmptyState
            title="No customers yet"
            action={
              <Button onClick={() => setDialog({ kind: 'customer' })}>
                <Plus className="size-4" aria-hidden="true" /> Add customer
              </Button>
            }
          >
            Customers own the sites you service. Add one to start.
          </EmptyState>
        )
      ) : tab === 'sites' ? (
        <DataTable
          caption={`Sites in ${where}`}
          columns={siteColumns}
          data={(q.data?.rows ?? []) as SiteRow[]}
          getRowId={(r) => r.id}
          sorting={list.sorting}
          onSortingChange={list.onSortingChange}
          empty="No sites match. Change the search or the filter."
          footer={
            <Pager
              page={list.params.page}
              pageSize={list.params.pageSize}
              total={q.data?.total ?? 0}
              noun="sites"
              onPage={(p) => list.set({ page: p })}
              onPageSize={(s) => list.set({ pageSize: s })}
            />
          }
        />
      ) : (
        <DataTable
          caption={`Customers in ${where}`}
          columns={customerColumns}
          data={(q.data?.rows ?? []) as CustomerRow[]}
          getRowId={(r) => r.id}
          sorting={list.sorting}
          onSortingChange={list.onSortingChange}
          empty="No customers match. Change the search or the filter."
          footer={
            <Pager
              page={list.params.page}
              pageSize={list.params.pageSize}
              total={q.data?.total ?? 0}
              noun="customers"
              onPage={(p) => list.set({ page: p })}
              onPageSize={(s) => list.set({ pageSize: s })}
            />
          }
        />
      )}

      <Dialog
        open={dialog?.kind === 'site'}
        onClose={() => setDialog(null)}
        title={dialog?.kind === 'site' && dialog.site ? `Edit ${dialog.site.name}` : 'Add site'}
        description="The address and coordinates place the site on routes; access notes and the site contact go with every visit."
      >
        {dialog?.kind === 'site' && <SiteForm site={dialog.site} onDone={() => setDialog(null)} />}
      </Dialog>
      <Dialog
        open={dialog?.kind === 'customer'}
        onClose={() => setDialog(null)}
        title={dialog?.kind === 'customer' && dialog.customer ? `Edit ${dialog.customer.name}` : 'Add customer'}
      >
        {dialog?.kind === 'customer' && <CustomerForm customer={dialog.customer} onDone={() => setDialog(null)} />}
      </Dialog>
    </>
  );
}
