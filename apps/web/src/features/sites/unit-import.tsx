import { useMemo, useRef, useState } from 'react';
import Papa from 'papaparse';
import { AlertTriangle, CheckCircle2, Download, FileUp } from 'lucide-react';
import { normalizeImportHeader, unitImportColumns, unitImportExample, unitImportLimits } from '@coilpath/contract/sites';
import type { SiteRow, UnitImportResult, UnitImportRowError } from '@coilpath/contract';
import { api, ApiError, errorMessage } from '@/lib/api-client';
import { downloadCsv } from '@/lib/csv';
import { bytesToBase64, convertedNote, decodeAs } from '@/lib/file-bytes';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { useInvalidateSites } from './api';

type Phase =
  | { kind: 'idle' }
  | { kind: 'reading'; rows: number }
  | { kind: 'checking'; rows: number | null }
  | { kind: 'checked'; result: UnitImportResult }
  | { kind: 'importing'; rows: number }
  | { kind: 'failed'; message: string };

/** The template: header plus one example row. */
export function downloadTemplate() {
  downloadCsv('coilpath-units-template.csv', [unitImportExample], [...unitImportColumns]);
}

function Progress({ label, fraction }: { label: string; fraction?: number }) {
  return (
    <div className="flex flex-col gap-1" role="status">
      <div className="flex justify-between text-sm">
        <span>{label}</span>
        {fraction !== undefined && <span className="tabular">{Math.round(fraction * 100)} %</span>}
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={fraction === undefined ? undefined : Math.round(fraction * 100)}
        className="h-2 overflow-hidden rounded bg-slate-faint"
      >
        <div
          className={`h-full bg-coolant transition-[width] ${fraction === undefined ? 'w-1/3 animate-pulse' : ''}`}
          style={fraction === undefined ? undefined : { width: `${Math.max(2, fraction * 100)}%` }}
        />
      </div>
    </div>
  );
}

/**
 * Equipment import for one site: the file's bytes go to the server, which reads their encoding (a
 * spreadsheet's older Windows encoding is converted, an unreadable file refused) and checks every row
 * without writing; the preview shows the rows as the server read them; then all-or-nothing import.
 */
export function UnitImport({ site, onDone }: { site: SiteRow; onDone: () => void }) {
  const notify = useNotify();
  const invalidate = useInvalidateSites();
  const [phase, setPhase] = useState<Phase>({ kind: 'idle' });
  const [fileName, setFileName] = useState<string | null>(null);
  const [onlyProblems, setOnlyProblems] = useState(true);
  /** The file's bytes, base64: what is checked is what is imported. */
  const fileData = useRef<string>('');
  const [encoding, setEncoding] = useState<string | null>(null);
  const [rows, setRows] = useState<Record<string, string>[]>([]);

  async function read(file: File) {
    setFileName(file.name);
    setRows([]);
    setEncoding(null);
    if (file.size > unitImportLimits.maxBytes) {
      setPhase({ kind: 'failed', message: `${file.name} is larger than 6 MB. Split it into smaller files.` });
      return;
    }
    setPhase({ kind: 'reading', rows: 0 });
    let bytes: ArrayBuffer;
    try {
      bytes = await file.arrayBuffer();
      fileData.current = bytesToBase64(bytes);
    } catch (e) {
      setPhase({ kind: 'failed', message: `${file.name} could not be read: ${errorMessage(e)}` });
      return;
    }
    // The server reads the bytes (UTF-8, or a spreadsheet's older encoding it converts) and checks every row.
    setPhase({ kind: 'checking', rows: null });
    let result: UnitImportResult;
    try {
      result = await api.post<UnitImportResult>(
        '/api/units/import',
        { siteId: site.id, mode: 'dry-run', file: fileData.current },
        { check: 'unitImportResultSchema' },
      );
    } catch (e) {
      setPhase({ kind: 'failed', message: `${file.name}: ${errorMessage(e)}` });
      return;
    }
    // The preview shows the rows as the server read them.
    try {
      const parsed = Papa.parse<Record<string, string>>(decodeAs(bytes, result.encoding), {
        header: true,
        skipEmptyLines: 'greedy',
        transformHeader: normalizeImportHeader,
      });
      setRows(parsed.data);
    } catch (e) {
      setPhase({ kind: 'failed', message: `${file.name} could not be shown: ${errorMessage(e)}` });
      return;
    }
    setEncoding(result.encoding);
    setPhase({ kind: 'checked', result });
  }

  async function commit() {
    if (phase.kind !== 'checked') return;
    setPhase({ kind: 'importing', rows: phase.result.rowCount });
    try {
      const result = await api.post<UnitImportResult>(
        '/api/units/import',
        { siteId: site.id, mode: 'commit', file: fileData.current },
        { check: 'unitImportResultSchema' },
      );
      await invalidate();
      notify(`Imported ${result.created.toLocaleString('en-US')} units into ${site.name}.`);
      onDone();
    } catch (e) {
      // Refused as a whole (e.g. a serial saved meanwhile): show the fresh row errors.
      if (e instanceof ApiError && e.code === 'import_refused') setPhase({ kind: 'checked', result: e.details as UnitImportResult });
      else setPhase({ kind: 'failed', message: errorMessage(e) });
      notify('Nothing was imported.', 'alarm');
    }
  }

  const result = phase.kind === 'checked' ? phase.result : null;
  const errorsByRow = useMemo(() => {
    const m = new Map<number, UnitImportRowError[]>();
    for (const err of result?.errors ?? []) m.set(err.row, [...(m.get(err.row) ?? []), err]);
    return m;
  }, [result]);
  const shown = useMemo(() => {
    const all = rows.map((r, i) => ({ row: i + 1, data: r, errors: errorsByRow.get(i + 1) ?? [] }));
    const list = onlyProblems && errorsByRow.size > 0 ? all.filter((r) => r.errors.length > 0) : all;
    return { list: list.slice(0, 300), more: Math.max(0, list.length - 300) };
  }, [rows, errorsByRow, onlyProblems]);

  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm text-slate">
        One row per unit. Required columns: tag, kind, make, model, serial, refrigerant, full_charge_lb, appliance_category. Nothing is
        written until every row is right; then all rows are imported together.
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <label className="inline-flex min-h-11 cursor-pointer items-center gap-2 rounded-md bg-copper px-4 text-sm font-medium text-white focus-within:outline-2 focus-within:outline-coolant hover:bg-copper-hover">
          <FileUp className="size-4" aria-hidden="true" />
          {fileName ? 'Choose another file' : 'Choose CSV file'}
          <input
            type="file"
            accept=".csv,text/csv"
            className="sr-only"
            disabled={phase.kind === 'reading' || phase.kind === 'checking' || phase.kind === 'importing'}
            onChange={(e) => {
              const file = e.target.files?.[0];
              e.target.value = '';
              if (file) void read(file);
            }}
          />
        </label>
        <Button variant="secondary" onClick={downloadTemplate}>
          <Download className="size-4" aria-hidden="true" /> Download template
        </Button>
        {fileName && <span className="text-sm text-slate">{fileName}</span>}
      </div>

      {phase.kind === 'reading' && <Progress label="Reading the file…" />}
      {phase.kind === 'checking' && (
        <Progress
          label={
            phase.rows === null
              ? 'Checking the file on the server (nothing is written yet)…'
              : `Checking ${phase.rows.toLocaleString('en-US')} rows on the server (nothing is written yet)…`
          }
        />
      )}
      {phase.kind === 'importing' && <Progress label={`Importing ${phase.rows.toLocaleString('en-US')} units in one transaction…`} />}
      {phase.kind === 'failed' && (
        <p role="alert" className="flex items-start gap-2 rounded-md bg-alarm-tint px-3 py-2 text-sm text-alarm">
          <AlertTriangle className="mt-0.5 size-4 shrink-0" aria-hidden="true" /> {phase.message}
        </p>
      )}

      {result && (
        <>
          {encoding && convertedNote(encoding) && (
            <p role="status" className="flex items-start gap-2 rounded-md bg-watch-tint px-3 py-2 text-sm text-ink">
              <AlertTriangle className="mt-0.5 size-4 shrink-0 text-watch" aria-hidden="true" /> {convertedNote(encoding)}
            </p>
          )}
          {result.errors.length === 0 ? (
            <p role="status" className="flex items-center gap-2 rounded-md bg-ok-tint px-3 py-2 text-sm text-ok">
              <CheckCircle2 className="size-4" aria-hidden="true" /> All {result.rowCount.toLocaleString('en-US')} rows are ready to import.
            </p>
          ) : (
            <p role="alert" className="flex items-start gap-2 rounded-md bg-alarm-tint px-3 py-2 text-sm text-alarm">
              <AlertTriangle className="mt-0.5 size-4 shrink-0" aria-hidden="true" />
              {errorsByRow.size.toLocaleString('en-US')} of {result.rowCount.toLocaleString('en-US')} rows have problems. Fix them in the
              file and choose it again; nothing is imported until every row is right. Row numbers count data rows (row 1 is the first line
              under the header).
            </p>
          )}
          {result.errors.length > 0 && (
            <label className="flex items-center gap-2 text-sm">
              <input type="checkbox" className="size-4" checked={onlyProblems} onChange={(e) => setOnlyProblems(e.target.checked)} />
              Show only rows with problems
            </label>
          )}
          <div className="max-h-[50dvh] overflow-auto rounded-lg border border-slate-line">
            <table className="w-full border-collapse text-sm">
              <caption className="sr-only">Preview of the rows in {fileName}</caption>
              <thead className="sticky top-0 bg-frost text-left text-xs uppercase tracking-wide text-slate">
                <tr>
                  {['Row', 'Status', 'Tag', 'Kind', 'Make', 'Model', 'Serial', 'Refrigerant', 'Full charge (lb)'].map((h) => (
                    <th key={h} scope="col" className="whitespace-nowrap border-b border-slate-line px-2 py-2">
                      {h}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {shown.list.map(({ row, data, errors }) => (
                  <tr key={row} className={`border-b border-slate-line/70 align-top ${errors.length ? 'bg-alarm-tint/60' : ''}`}>
                    <td className="tabular px-2 py-1.5">{row}</td>
                    <td className="px-2 py-1.5">
                      {errors.length === 0 ? (
                        <Badge tone="ok">
                          <CheckCircle2 className="size-3" aria-hidden="true" /> Ready
                        </Badge>
                      ) : (
                        <ul className="flex flex-col gap-1">
                          {errors.map((er, i) => (
                            <li key={i} className="flex items-start gap-1 text-alarm">
                              <AlertTriangle className="mt-0.5 size-3.5 shrink-0" aria-hidden="true" />
                              <span>{er.message}</span>
                            </li>
                          ))}
                        </ul>
                      )}
                    </td>
                    {(['tag', 'kind', 'make', 'model', 'serial', 'refrigerant', 'full_charge_lb'] as const).map((c) => (
                      <td key={c} className="tabular whitespace-nowrap px-2 py-1.5">
                        {data[c] ?? ''}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {shown.more > 0 && <p className="text-sm text-slate">…and {shown.more.toLocaleString('en-US')} more rows not shown.</p>}
          <div className="flex flex-wrap justify-end gap-2 border-t border-slate-line pt-4">
            <Button variant="secondary" onClick={onDone}>
              Cancel
            </Button>
            <Button onClick={commit} disabled={result.errors.length > 0}>
              Import {result.rowCount.toLocaleString('en-US')} units
            </Button>
          </div>
        </>
      )}
    </div>
  );
}
