import { useCallback, useMemo, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { Archive, ArchiveRestore, ArrowLeft, FileUp, Pencil, Plus, Trash2 } from 'lucide-react';
import { applianceCategoryLabels, unitKindLabels } from '@coilpath/contract/vocabulary';
import type { UnitRow } from '@coilpath/contract';
import { errorMessage } from '@/lib/api-client';
import { formatNumber } from '@/lib/format';
import { useListParams } from '@/lib/use-list-params';
import { Button } from '@/components/ui/button';
import { DataTable, type CoilpathColumn } from '@/components/ui/data-table';
import { Dialog } from '@/components/ui/dialog';
import { useNotify } from '@/components/ui/notices';
import { Badge, Card, PageHeader } from '@/components/ui/page';
import { Pager } from '@/components/ui/pager';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useRecordAction, useSite, useUnits } from './api';
import { SiteForm, UnitForm } from './forms';
import { SearchBox } from '@/components/search-box';
import { StatusFilter } from './sites-page';
import { UnitImport } from './unit-import';

function Detail({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-xs uppercase tracking-wide text-slate">{label}</dt>
      <dd className="mt-0.5 text-sm">{children || '—'}</dd>
    </div>
  );
}

/** One site: where it is, how to get in, who to tell, and its units (add, edit, import, archive). */
export default function SitePage() {
  const { siteId = '' } = useParams();
  const navigate = useNavigate();
  const notify = useNotify();
  const action = useRecordAction();
  const site = useSite(siteId);
  const list = useListParams({ sort: 'tag' });
  const units = useUnits({ ...list.params, siteId });
  const [dialog, setDialog] = useState<{ kind: 'unit'; unit?: UnitRow } | { kind: 'import' } | { kind: 'site' } | null>(null);

  const { mutateAsync } = action;
  const run = useCallback(
    async (kind: 'sites' | 'units', id: string, verb: 'archive' | 'unarchive' | 'delete', name: string) => {
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
        if (kind === 'sites' && verb === 'delete') navigate('/sites');
      } catch (e) {
        notify(errorMessage(e), 'alarm');
      }
    },
    [mutateAsync, notify, navigate],
  );

  const columns = useMemo<CoilpathColumn<UnitRow>[]>(
    () => [
      {
        accessorKey: 'tag',
        header: 'Tag',
        cell: ({ row }) => (
          <span>
            <Link to={`/units/${row.original.id}`} className="font-medium text-coolant underline-offset-2 hover:underline">
              {row.original.tag}
            </Link>
            {row.original.archivedAt && <Badge className="ml-2">Archived</Badge>}
          </span>
        ),
      },
      { accessorKey: 'kind', header: 'Kind', cell: ({ row }) => unitKindLabels[row.original.kind] },
      { accessorKey: 'make', header: 'Make' },
      { accessorKey: 'model', header: 'Model' },
      { accessorKey: 'serial', header: 'Serial' },
      { accessorKey: 'refrigerant', header: 'Refrigerant' },
      { accessorKey: 'fullChargeLb', header: 'Full charge', cell: ({ row }) => `${formatNumber(row.original.fullChargeLb)} lb` },
      {
        id: 'circuits',
        header: 'Circuits',
        enableSorting: false,
        cell: ({ row }) => (
          <span title="Compressors per circuit">
            {row.original.circuits.length} ({row.original.circuits.map((c) => c.compressorCount).join(' + ')} comp.)
          </span>
        ),
      },
      { accessorKey: 'warrantyEnd', header: 'Warranty end', cell: ({ row }) => row.original.warrantyEnd ?? '—' },
      {
        id: 'category',
        header: 'Leak-rule category',
        enableSorting: false,
        cell: ({ row }) => applianceCategoryLabels[row.original.applianceCategory],
      },
      {
        id: 'actions',
        header: () => <span className="sr-only">Actions</span>,
        enableSorting: false,
        cell: ({ row }) => {
          const u = row.original;
          return (
            <div className="flex justify-end gap-1">
              <Button variant="ghost" size="sm" aria-label={`Edit ${u.tag}`} onClick={() => setDialog({ kind: 'unit', unit: u })}>
                <Pencil className="size-4" aria-hidden="true" />
              </Button>
              <Button
                variant="ghost"
                size="sm"
                aria-label={u.archivedAt ? `Unarchive ${u.tag}` : `Archive ${u.tag}`}
                onClick={() => run('units', u.id, u.archivedAt ? 'unarchive' : 'archive', u.tag)}
              >
                {u.archivedAt ? (
                  <ArchiveRestore className="size-4" aria-hidden="true" />
                ) : (
                  <Archive className="size-4" aria-hidden="true" />
                )}
              </Button>
              <Button variant="ghost" size="sm" aria-label={`Delete ${u.tag}`} onClick={() => run('units', u.id, 'delete', u.tag)}>
                <Trash2 className="size-4" aria-hidden="true" />
              </Button>
            </div>
          );
        },
      },
    ],
    [run],
  );

  if (site.isPending) return <LoadingState label="Loading the site…" />;
  if (site.isError) return <ErrorState error={site.error} onRetry={() => site.refetch()} />;
  const s = site.data;
  const archived = Boolean(s.archivedAt);

  return (
    <>
      <Link to="/sites" className="mb-2 inline-flex min-h-11 items-center gap-1 text-sm text-coolant">
        <ArrowLeft className="size-4" aria-hidden="true" /> All sites
      </Link>
      <PageHeader
        title={s.name}
        subtitle={
          <>
            {s.customerName} · {s.branchName} — the site’s units, with their refrigerant and circuits.
            {archived && (
              <Badge className="ml-2">
                <Archive className="size-3" aria-hidden="true" /> Archived
              </Badge>
            )}
          </>
        }
        actions={
          <>
            <Button variant="secondary" onClick={() => setDialog({ kind: 'import' })} disabled={archived}>
              <FileUp className="size-4" aria-hidden="true" /> Import units (CSV)
            </Button>
            <Button onClick={() => setDialog({ kind: 'unit' })} disabled={archived}>
              <Plus className="size-4" aria-hidden="true" /> Add unit
            </Button>
          </>
        }
      />
      <Card
        title="Site"
        className="mb-5"
        actions={
          <div className="flex flex-wrap gap-1">
            <Button variant="ghost" size="sm" onClick={() => setDialog({ kind: 'site' })}>
              <Pencil className="size-4" aria-hidden="true" /> Edit
            </Button>
            <Button variant="ghost" size="sm" onClick={() => run('sites', s.id, archived ? 'unarchive' : 'archive', s.name)}>
              {archived ? <ArchiveRestore className="size-4" aria-hidden="true" /> : <Archive className="size-4" aria-hidden="true" />}
              {archived ? 'Unarchive' : 'Archive'}
            </Button>
            <Button variant="ghost" size="sm" onClick={() => run('sites', s.id, 'delete', s.name)}>
              <Trash2 className="size-4" aria-hidden="true" /> Delete
            </Button>
          </div>
        }
      >
        <dl className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
          <Detail label="Address">{[s.address, s.city, s.region, s.postalCode].filter(Boolean).join(', ')}</Detail>
          <Detail label="Coordinates">
            <span className="tabular">
              {s.lat.toFixed(5)}, {s.lon.toFixed(5)}
            </span>
          </Detail>
          <Detail label="Site contact">{[s.contactName, s.contactEmail, s.contactPhone].filter(Boolean).join(' · ')}</Detail>
          <Detail label="Access notes">{s.accessNotes}</Detail>
        </dl>
      </Card>

      <h2 className="mb-2 text-lg font-semibold">Units</h2>
      <div className="mb-3 flex flex-wrap items-center gap-3">
        <SearchBox value={list.params.q} onCommit={(text) => list.set({ q: text })} label="Search tag, make, model, serial" />
        <StatusFilter value={list.params.status} onChange={(v) => list.set({ status: v === 'active' ? undefined : v })} />
      </div>
      {units.isPending ? (
        <LoadingState label="Loading units…" />
      ) : units.isError ? (
        <ErrorState error={units.error} onRetry={() => units.refetch()} />
      ) : units.data.total === 0 && !list.params.q && list.params.status === 'active' ? (
        <EmptyState
          title="No units at this site yet"
          action={
            !archived && (
              <div className="flex flex-wrap gap-2">
                <Button onClick={() => setDialog({ kind: 'unit' })}>
                  <Plus className="size-4" aria-hidden="true" /> Add unit
                </Button>
                <Button variant="secondary" onClick={() => setDialog({ kind: 'import' })}>
                  <FileUp className="size-4" aria-hidden="true" /> Import units (CSV)
                </Button>
              </div>
            )
          }
        >
          Add the rooftop units, splits, chillers and walk-ins here one by one, or import a whole equipment list from a CSV file.
        </EmptyState>
      ) : (
        <DataTable
          caption={`Units at ${s.name}`}
          columns={columns}
          data={units.data.rows}
          getRowId={(r) => r.id}
          sorting={list.sorting}
          onSortingChange={list.onSortingChange}
          empty="No units match. Change the search or the filter."
          footer={
            <Pager
              page={list.params.page}
              pageSize={list.params.pageSize}
              total={units.data.total}
              noun="units"
              onPage={(p) => list.set({ page: p })}
              onPageSize={(n) => list.set({ pageSize: n })}
            />
          }
        />
      )}

      <Dialog
        open={dialog?.kind === 'unit'}
        onClose={() => setDialog(null)}
        title={dialog?.kind === 'unit' && dialog.unit ? `Edit ${dialog.unit.tag}` : `Add a unit at ${s.name}`}
        wide
      >
        {dialog?.kind === 'unit' && <UnitForm siteId={s.id} unit={dialog.unit} onDone={() => setDialog(null)} />}
      </Dialog>
      <Dialog open={dialog?.kind === 'import'} onClose={() => setDialog(null)} title={`Import units into ${s.name}`} wide>
        {dialog?.kind === 'import' && <UnitImport site={s} onDone={() => setDialog(null)} />}
      </Dialog>
      <Dialog open={dialog?.kind === 'site'} onClose={() => setDialog(null)} title={`Edit ${s.name}`}>
        {dialog?.kind === 'site' && <SiteForm site={s} onDone={() => setDialog(null)} />}
      </Dialog>
    </>
  );
}
