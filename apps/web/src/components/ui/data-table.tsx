import { useState, type ReactNode } from 'react';
import {
  createSortedRowModel,
  flexRender,
  rowSortingFeature,
  sortFns,
  tableFeatures,
  useTable,
  type ColumnDef,
  type RowData,
  type SortingState,
} from '@tanstack/react-table';
import { ArrowDown, ArrowUp, ArrowUpDown } from 'lucide-react';

/** The table features every Coilpath table uses: sorting (client-side unless the caller sorts on the server). */
export const coilpathTableFeatures = tableFeatures({
  rowSortingFeature,
  sortedRowModel: createSortedRowModel(),
  sortFns,
});
export type CoilpathFeatures = typeof coilpathTableFeatures;
export type CoilpathColumn<T extends RowData> = ColumnDef<CoilpathFeatures, T, any>; // eslint-disable-line @typescript-eslint/no-explicit-any
export type { SortingState };

export interface DataTableProps<T extends RowData> {
  columns: CoilpathColumn<T>[];
  data: T[];
  /** Accessible name of the table. */
  caption: string;
  /** Server-side sorting: pass the state and a setter (e.g. kept in the URL). */
  sorting?: SortingState;
  onSortingChange?: (s: SortingState) => void;
  getRowId?: (row: T) => string;
  rowClassName?: (row: T) => string;
  empty?: ReactNode;
  /** Rendered under the table (paging controls). */
  footer?: ReactNode;
}

/**
 * A dense, sortable table (@tanstack/react-table v9). Headers are buttons announcing their sort state;
 * on a phone the table scrolls sideways inside its card instead of squeezing.
 */
export function DataTable<T extends RowData>({
  columns,
  data,
  caption,
  sorting,
  onSortingChange,
  getRowId,
  rowClassName,
  empty,
  footer,
}: DataTableProps<T>) {
  const [localSorting, setLocalSorting] = useState<SortingState>([]);
  const manual = sorting !== undefined;
  const state = manual ? sorting : localSorting;
  const table = useTable({
    features: coilpathTableFeatures,
    columns,
    data,
    state: { sorting: state },
    manualSorting: manual,
    onSortingChange: (updater) => {
      const next = typeof updater === 'function' ? updater(state) : updater;
      if (manual) onSortingChange?.(next);
      else setLocalSorting(next);
    },
    ...(getRowId ? { getRowId: (row: T) => getRowId(row) } : {}),
  });

  return (
    <div className="overflow-hidden rounded-lg border border-slate-line bg-white">
      {/* relative: visually hidden (sr-only) header text is positioned inside the scroller, not the page */}
      <div className="relative overflow-x-auto">
        <table className="w-full border-collapse text-sm">
          <caption className="sr-only">{caption}</caption>
          <thead className="bg-frost text-left text-xs uppercase tracking-wide text-slate">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const canSort = h.column.getCanSort();
                  const dir = h.column.getIsSorted();
                  const label = h.isPlaceholder ? null : flexRender(h.column.columnDef.header, h.getContext());
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : undefined}
                      className="whitespace-nowrap border-b border-slate-line px-3 py-2 font-semibold"
                    >
                      {canSort ? (
                        <button
                          type="button"
                          className="inline-flex min-h-8 items-center gap-1 uppercase"
                          onClick={h.column.getToggleSortingHandler()}
                        >
                          {label}
                          {dir === 'asc' ? (
                            <ArrowUp className="size-3.5" aria-hidden="true" />
                          ) : dir === 'desc' ? (
                            <ArrowDown className="size-3.5" aria-hidden="true" />
                          ) : (
                            <ArrowUpDown className="size-3.5 opacity-40" aria-hidden="true" />
                          )}
                        </button>
                      ) : (
                        label
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-slate">
                  {empty ?? 'Nothing to show.'}
                </td>
              </tr>
            ) : (
              table.getRowModel().rows.map((row) => (
                <tr key={row.id} className={`border-b border-slate-line/70 last:border-0 ${rowClassName?.(row.original) ?? ''}`}>
                  {row.getAllCells().map((cell) => (
                    <td key={cell.id} className="tabular px-3 py-2 align-top">
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      {footer && <div className="border-t border-slate-line px-3 py-2">{footer}</div>}
    </div>
  );
}
