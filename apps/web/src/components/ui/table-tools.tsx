import { useId, useMemo, useState } from 'react';
import { Download, Search } from 'lucide-react';
import { downloadCsv } from '@/lib/csv';
import { Button } from './button';

/**
 * A filter box and a CSV export for a client-side table: `useTableFilter` keeps the rows whose
 * text (from `toText`) contains every word typed; the export writes the filtered rows.
 */
export function useTableFilter<T>(rows: T[], toText: (row: T) => string) {
  const [q, setQ] = useState('');
  const filtered = useMemo(() => {
    const words = q.toLowerCase().split(/\s+/).filter(Boolean);
    if (!words.length) return rows;
    return rows.filter((r) => {
      const text = toText(r).toLowerCase();
      return words.every((w) => text.includes(w));
    });
  }, [rows, q, toText]);
  return { q, setQ, filtered };
}

export function TableTools({
  label,
  q,
  setQ,
  shown,
  total,
  onExport,
}: {
  label: string;
  q: string;
  setQ: (q: string) => void;
  shown: number;
  total: number;
  onExport: () => void;
}) {
  const id = useId();
  return (
    <div className="mb-2 flex flex-wrap items-center gap-2">
      <label htmlFor={id} className="sr-only">
        Filter {label}
      </label>
      <div className="relative min-w-48 flex-1 sm:max-w-xs">
        <Search className="pointer-events-none absolute left-2.5 top-3 size-4 text-slate" aria-hidden="true" />
        <input
          id={id}
          type="search"
          value={q}
          onChange={(e) => setQ(e.target.value)}
          placeholder={`Filter ${label}`}
          className="min-h-10 w-full rounded-md border border-slate-line bg-white py-2 pl-8 pr-3 text-sm"
        />
      </div>
      <span className="text-xs text-slate" aria-live="polite">
        {shown === total ? `${total} shown` : `${shown} of ${total} shown`}
      </span>
      <Button variant="secondary" size="sm" onClick={onExport} disabled={shown === 0}>
        <Download className="size-4" aria-hidden="true" /> Export CSV
      </Button>
    </div>
  );
}

export { downloadCsv };
