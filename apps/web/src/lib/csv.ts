import Papa from 'papaparse';

/** Downloads rows as a CSV file (papaparse), with the given header order. */
export function downloadCsv(filename: string, rows: Record<string, unknown>[], columns?: string[]) {
  const csv = Papa.unparse(rows, columns ? { columns } : undefined);
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
