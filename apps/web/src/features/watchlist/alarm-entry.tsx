import { useMemo, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { FileUp } from 'lucide-react';
import { alarmInputSchema } from '@coilpath/contract/watchlist';
import type { AlarmImportResult, UnitChoice } from '@coilpath/contract';
import type { z } from 'zod';
import { ApiError, errorMessage } from '@/lib/api-client';
import { formatInZone } from '@/lib/format';
import { bytesToBase64, convertedNote } from '@/lib/file-bytes';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { Card } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { useUnitChoices } from '@/lib/unit-choices';
import { useCreateAlarm, useImportAlarms } from './api';
import { localToIso } from './dates';

type In = z.input<typeof alarmInputSchema>;
type Out = z.output<typeof alarmInputSchema>;

function UnitOptions({ units }: { units: UnitChoice[] }) {
  const bySite = useMemo(() => {
    const m = new Map<string, UnitChoice[]>();
    for (const u of units) m.set(u.siteName, [...(m.get(u.siteName) ?? []), u]);
    return [...m.entries()];
  }, [units]);
  return (
    <>
      <option value="">Choose a unit…</option>
      {bySite.map(([site, us]) => (
        <optgroup key={site} label={site}>
          {us.map((u) => (
            <option key={u.id} value={u.id}>
              {u.tag} — {u.make} {u.model} ({u.serial})
            </option>
          ))}
        </optgroup>
      ))}
    </>
  );
}

/** The alarm form: an alarm phoned in or read off a controller. */
export function AlarmForm({ branchId, timeZone, onDone }: { branchId: string | undefined; timeZone: string; onDone: () => void }) {
  const notify = useNotify();
  const units = useUnitChoices(branchId);
  const create = useCreateAlarm();
  const { register, handleSubmit, formState, setError } = useForm<In, unknown, Out>({
    resolver: zodResolver(alarmInputSchema),
    defaultValues: { source: 'form', circuit: null },
  });
  const e = formState.errors;
  const submit = handleSubmit((body) =>
    create.mutateAsync(body).then(
      (a) => {
        notify(`Alarm ${a.code} on ${a.unitTag} recorded for ${formatInZone(a.raisedAt, timeZone)}.`);
        onDone();
      },
      (err) => {
        if (err instanceof ApiError) for (const [k, v] of Object.entries(err.fieldErrors)) setError(k as keyof In, { message: v });
        setError('root', { message: errorMessage(err) });
      },
    ),
  );
  return (
    <Card title="Record an alarm">
      <form onSubmit={submit} className="grid gap-3 sm:grid-cols-2 lg:grid-cols-5 lg:items-start" noValidate>
        <div className="sm:col-span-2">
          <SelectField label="Unit" error={e.unitId?.message} {...register('unitId')} disabled={units.isPending}>
            <UnitOptions units={units.data ?? []} />
          </SelectField>
        </div>
        <TextField label="Alarm code" error={e.code?.message} autoComplete="off" {...register('code')} />
        <TextField
          label="Circuit (reported)"
          inputMode="numeric"
          hint="Leave empty if none"
          error={e.circuit?.message}
          {...register('circuit', { setValueAs: (v: string) => (v === '' || v === null ? null : Number(v)) })}
        />
        <TextField
          label={`Raised at (${timeZone})`}
          type="datetime-local"
          error={e.raisedAt?.message}
          {...register('raisedAt', { setValueAs: (v: string) => localToIso(v, timeZone) })}
        />
        <div className="flex flex-wrap items-center gap-2 sm:col-span-2 lg:col-span-5">
          <Button type="submit" busy={formState.isSubmitting}>
            Save alarm
          </Button>
          <Button variant="ghost" onClick={onDone}>
            Cancel
          </Button>
          {e.root && (
            <p role="alert" className="text-sm text-alarm">
              {e.root.message}
            </p>
          )}
        </div>
      </form>
    </Card>
  );
}

/** CSV import: a preview lists every row's error before anything is written; a file with any error imports nothing. */
export function AlarmImport({ branchId, onDone }: { branchId: string | undefined; onDone: () => void }) {
  const notify = useNotify();
  const m = useImportAlarms();
  /** The file's bytes, base64: the server reads the encoding (and converts an older spreadsheet encoding). */
  const [file, setFile] = useState<string | null>(null);
  const [name, setName] = useState('');
  const [preview, setPreview] = useState<AlarmImportResult | null>(null);
  const [error, setError] = useState<string>();
  const input = useRef<HTMLInputElement>(null);

  const check = async (chosen: File) => {
    setError(undefined);
    setPreview(null);
    setName(chosen.name);
    let data: string;
    try {
      data = bytesToBase64(await chosen.arrayBuffer());
    } catch (err) {
      setError(`${chosen.name} could not be read: ${errorMessage(err)}`);
      return;
    }
    setFile(data);
    m.mutate({ file: data, mode: 'dry_run', branchId }, { onSuccess: setPreview, onError: (err) => setError(errorMessage(err)) });
  };
  const commit = () => {
    if (!file) return;
    m.mutate(
      { file, mode: 'commit', branchId },
      {
        onSuccess: (r) => {
          notify(
            `Imported ${r.written} alarm${r.written === 1 ? '' : 's'} from ${name}${r.skipped ? `; ${r.skipped} already in Coilpath were skipped` : ''}.`,
          );
          onDone();
        },
        onError: (err) => {
          if (err instanceof ApiError && err.details && typeof err.details === 'object' && 'errors' in err.details)
            setPreview(err.details as AlarmImportResult);
          setError(errorMessage(err));
        },
      },
    );
  };
  const ready = preview ? preview.rows.filter((r) => !r.duplicate).length : 0;
  return (
    <Card title="Import alarms from a CSV file">
      <p className="text-sm text-slate">
        Columns: <code>unit_serial</code>, <code>circuit</code> (may be empty), <code>code</code>, <code>raised_at</code> (ISO-8601 such as
        2026-12-02T14:05:00Z, or a local “2026-12-02 08:05” in the branch's time zone). Nothing is written until the preview is clean and
        you import.
      </p>
      <div className="mt-3 flex flex-wrap items-center gap-2">
        <input
          ref={input}
          type="file"
          accept=".csv,text/csv"
          className="sr-only"
          id="alarm-csv"
          onChange={(e) => e.target.files?.[0] && void check(e.target.files[0])}
        />
        <label
          htmlFor="alarm-csv"
          className="inline-flex min-h-11 cursor-pointer items-center gap-2 rounded-md border border-slate-line bg-white px-4 text-sm font-medium hover:bg-slate-faint"
        >
          <FileUp className="size-4" aria-hidden="true" /> Choose CSV file
        </label>
        {name && <span className="text-sm">{name}</span>}
        <Button variant="ghost" onClick={onDone}>
          Cancel
        </Button>
      </div>
      {m.isPending && (
        <p role="status" className="mt-2 text-sm text-slate">
          Checking…
        </p>
      )}
      {error && (
        <p role="alert" className="mt-2 text-sm text-alarm">
          {error}
        </p>
      )}
      {preview && (
        <div className="mt-3 flex flex-col gap-3">
          {convertedNote(preview.encoding) && (
            <p role="status" className="rounded-md bg-watch-tint px-3 py-2 text-sm text-ink">
              {convertedNote(preview.encoding)}
            </p>
          )}
          <p className="text-sm" role="status">
            {preview.total} row{preview.total === 1 ? '' : 's'}: {ready} ready to import, {preview.skipped} already in Coilpath,{' '}
            {preview.errors.length} error{preview.errors.length === 1 ? '' : 's'}.
          </p>
          {preview.errors.length > 0 && (
            <table className="w-full text-sm">
              <caption className="mb-1 text-left font-semibold text-alarm">
                Fix these rows and choose the file again; nothing has been written.
              </caption>
              <thead className="text-left text-xs uppercase text-slate">
                <tr>
                  <th scope="col" className="py-1 pr-2">
                    Row
                  </th>
                  <th scope="col" className="py-1 pr-2">
                    Column
                  </th>
                  <th scope="col" className="py-1">
                    Problem
                  </th>
                </tr>
              </thead>
              <tbody>
                {preview.errors.map((er, i) => (
                  <tr key={i} className="border-t border-slate-line/70">
                    <td className="tabular py-1 pr-2">{er.row === 0 ? 'File' : er.row}</td>
                    <td className="py-1 pr-2 font-mono text-xs">{er.field ?? '—'}</td>
                    <td className="py-1">{er.message}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          {preview.rows.length > 0 && (
            <details>
              <summary className="cursor-pointer text-sm text-coolant">Rows read ({preview.rows.length})</summary>
              <ul className="mt-1 text-xs">
                {preview.rows.slice(0, 50).map((r) => (
                  <li key={r.row}>
                    Row {r.row}: {r.unitTag} ({r.serial}) {r.code} circuit {r.circuit ?? '—'} at {r.raisedAt}
                    {r.duplicate ? ' — already in Coilpath, skipped' : ''}
                  </li>
                ))}
              </ul>
            </details>
          )}
          <div>
            <Button onClick={commit} disabled={preview.errors.length > 0 || ready === 0} busy={m.isPending}>
              Import {ready} alarm{ready === 1 ? '' : 's'}
            </Button>
          </div>
        </div>
      )}
    </Card>
  );
}
