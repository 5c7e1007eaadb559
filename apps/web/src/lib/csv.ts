import { toCsv, type CsvValue } from '@coilpath/calc';

export { csvTimestamp } from '@coilpath/calc';

/**
 * Downloads rows as a CSV file through the shared writer (`toCsv` in @coilpath/calc, the same as the
 * server's exports): UTF-8 with a byte-order mark, CRLF, formulae neutralised. Columns in the given
 * order, else the first row's keys. Instants should be written with `csvTimestamp(iso, branchZone)`.
 */
export function downloadCsv(filename: string, rows: Record<string, CsvValue>[], columns?: string[]) {
  const csv = toCsv(columns ?? Object.keys(rows[0] ?? {}), rows);
  const blob = new Blob([csv], { type: 'text/csv;charset=utf-8' });
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = filename.endsWith('.csv') ? filename : `${filename}.csv`;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
