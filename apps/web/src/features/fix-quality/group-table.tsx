import type { FixQualityGroup } from '@coilpath/contract';
import { createColumnHelper } from '@tanstack/react-table';
import { Download } from 'lucide-react';
import { DataTable, type CoilpathColumn, type CoilpathFeatures } from '@/components/ui/data-table';
import { Card } from '@/components/ui/page';
import { formatNumber, formatPercent } from '@/lib/format';

const col = createColumnHelper<CoilpathFeatures, FixQualityGroup>();

export function groupColumns(first: string): CoilpathColumn<FixQualityGroup>[] {
  return [
    col.accessor('label', { header: first, cell: (c) => <span className="font-medium">{c.getValue()}</span> }),
    col.accessor('eligible', { header: 'Service calls', cell: (c) => c.getValue() }),
    col.accessor('firstTimeFixRate', {
      header: 'First-time fix',
      cell: (c) => (
        <span>
          {formatPercent(c.getValue())} <span className="text-xs text-slate">({c.row.original.firstTimeFixed})</span>
        </span>
      ),
    }),
    col.accessor('callbackRate', {
      header: 'Callback rate',
      cell: (c) => (
        <span>
          {formatPercent(c.getValue())} <span className="text-xs text-slate">({c.row.original.callbacks})</span>
        </span>
      ),
    }),
    col.accessor('returnVisitsPerServiceCall', { header: 'Return visits / call', cell: (c) => formatNumber(c.getValue(), 2) }),
    col.accessor('avgDaysToResolve', { header: 'Days to resolve', cell: (c) => formatNumber(c.getValue(), 1) }),
    col.accessor('pending', { header: 'Still in callback window', cell: (c) => c.getValue() }),
  ] as CoilpathColumn<FixQualityGroup>[];
}

export function CsvLink({ href, label = 'Download CSV' }: { href: string; label?: string }) {
  return (
    <a
      href={href}
      download
      className="inline-flex min-h-9 items-center gap-1.5 rounded-md border border-slate-line bg-white px-3 text-sm font-medium text-ink hover:bg-slate-faint"
    >
      <Download className="size-4" aria-hidden="true" /> {label}
    </a>
  );
}

export function GroupSection({
  title,
  first,
  groups,
  csvHref,
  chart,
  note,
}: {
  title: string;
  first: string;
  groups: FixQualityGroup[];
  csvHref: string;
  chart?: React.ReactNode;
  note?: React.ReactNode;
}) {
  return (
    <Card title={title} actions={<CsvLink href={csvHref} label={`CSV`} />}>
      {note && <p className="mb-2 text-sm text-slate">{note}</p>}
      <div className={chart ? 'grid items-start gap-4 xl:grid-cols-[minmax(0,1fr)_minmax(0,2fr)]' : ''}>
        {chart}
        <DataTable
          caption={title}
          columns={groupColumns(first)}
          data={groups}
          getRowId={(g) => g.key}
          empty="No service calls in this period."
        />
      </div>
    </Card>
  );
}
