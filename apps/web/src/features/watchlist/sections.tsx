import { useCallback, useMemo, useState } from 'react';
import { AlertTriangle, Send } from 'lucide-react';
import {
  causeCodeLabels,
  priorities,
  priorityLabels,
  returnNeedLabels,
  visitOutcomeLabels,
  workOrderKindLabels,
} from '@coilpath/contract/vocabulary';
import type { Priority, RepeatAlarmUnit, ReturnVisitRow } from '@coilpath/contract';
import { addDays } from '@coilpath/calc';
import { errorMessage } from '@/lib/api-client';
import { formatInZone, todayInZone } from '@/lib/format';
import { Badge } from '@/components/ui/page';
import { Button } from '@/components/ui/button';
import { DataTable, type CoilpathColumn } from '@/components/ui/data-table';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { TableTools, downloadCsv, useTableFilter } from '@/components/ui/table-tools';
import { csvTimestamp } from '@/lib/csv';
import { useQueueReturnVisit, useRepeatAlarms, useReturnVisits } from './api';
import { woLabel } from './leak-cases';
import { ChangedByNote } from '@/components/changed-by';

/* ----------------------------------------------------------- repeat alarms */

export function RepeatAlarmsSection({ branchId, timeZone }: { branchId: string | undefined; timeZone: string }) {
  const q = useRepeatAlarms(branchId);
  const rows = q.data?.units ?? [];
  const rule = q.data?.rules.length === 1 ? q.data.rules[0] : undefined;
  const toText = useCallback((u: RepeatAlarmUnit) => `${u.unitTag} ${u.siteName} ${u.make} ${u.model} ${u.serial} ${u.code}`, []);
  const { q: filter, setQ, filtered } = useTableFilter(rows, toText);
  const columns = useMemo<CoilpathColumn<RepeatAlarmUnit>[]>(
    () => [
      {
        id: 'unit',
        header: 'Unit',
        accessorFn: (u) => u.unitTag,
        cell: ({ row: { original: u } }) => (
          <div>
            <a className="font-medium text-coolant underline-offset-2 hover:underline" href={`/units/${u.unitId}`}>
              {u.unitTag}
            </a>
            <div className="text-xs text-slate">
              {u.make} {u.model} · {u.serial}
            </div>
            <ChangedByNote row="unit" id={u.unitId} />
          </div>
        ),
      },
      { id: 'site', header: 'Site', accessorFn: (u) => u.siteName },
      {
        id: 'code',
        header: 'Alarm',
        accessorFn: (u) => u.code,
        cell: ({ row: { original: u } }) => <span className="font-mono">{u.code}</span>,
      },
      { id: 'count', header: 'Times', accessorFn: (u) => u.count },
      { id: 'last', header: 'Last raised', accessorFn: (u) => u.last, cell: ({ row: { original: u } }) => formatInZone(u.last, timeZone) },
      {
        id: 'circuits',
        header: 'Circuit',
        accessorFn: (u) => (u.circuitMismatch ? 1 : 0),
        cell: ({ row: { original: u } }) => (
          <div className="flex flex-col items-start gap-1">
            <span>Reported: {u.circuits.length ? u.circuits.join(', ') : '—'}</span>
            {u.circuitMismatch && (
              <Badge tone="alarm">
                <AlertTriangle className="size-3.5" aria-hidden="true" /> Actual circuit differed
              </Badge>
            )}
          </div>
        ),
      },
      {
        id: 'visits',
        header: 'Visits so far',
        accessorFn: (u) => u.visits.length,
        cell: ({ row: { original: u } }) =>
          u.visits.length === 0 ? (
            <span className="text-slate">None yet</span>
          ) : (
            <ul className="flex flex-col gap-0.5 text-xs">
              {u.visits.map((v) => (
                <li key={v.workOrderId}>
                  {woLabel(v.number)} {workOrderKindLabels[v.kind].toLowerCase()} ·{' '}
                  {v.outcome ? visitOutcomeLabels[v.outcome] : v.state.replace('_', ' ')}
                  {v.closedAt ? ` ${formatInZone(v.closedAt, timeZone, 'd MMM')}` : ''}
                  {v.techName ? ` · ${v.techName}` : ''}
                </li>
              ))}
            </ul>
          ),
      },
      {
        id: 'findings',
        header: 'Findings',
        enableSorting: false,
        cell: ({ row: { original: u } }) =>
          u.findings.length === 0 ? (
            <span className="text-slate">None recorded</span>
          ) : (
            <ul className="flex flex-col gap-0.5 text-xs">
              {u.findings.map((f) => (
                <li key={f.id}>
                  {causeCodeLabels[f.causeCode]}
                  {f.reportedCircuit !== null && f.actualCircuit !== null && f.reportedCircuit !== f.actualCircuit
                    ? ` — reported circuit ${f.reportedCircuit}, actual ${f.actualCircuit}`
                    : ''}
                  {f.notes ? `: ${f.notes}` : ''}
                </li>
              ))}
            </ul>
          ),
      },
    ],
    [timeZone],
  );
  const exportCsv = () =>
    downloadCsv(
      'repeat-alarm-units',
      filtered.map((u) => ({
        unit: u.unitTag,
        site: u.siteName,
        make: u.make,
        model: u.model,
        serial: u.serial,
        code: u.code,
        times: u.count,
        first: csvTimestamp(u.first, timeZone),
        last: csvTimestamp(u.last, timeZone),
        circuits_reported: u.circuits.join(' '),
        actual_circuit_differed: u.circuitMismatch ? 'yes' : 'no',
        visits: u.visits.length,
      })),
    );
  return (
    <section aria-labelledby="repeat-h" className="flex flex-col gap-2">
      <h2 id="repeat-h" className="text-lg font-semibold">
        Repeat-alarm units
      </h2>
      <p className="text-sm text-slate">
        {rule
          ? `The same alarm code ${rule.minCount} or more times in ${rule.windowDays} days`
          : 'The same alarm code N or more times in M days (each branch sets N and M)'}
        , with the work done since.
      </p>
      {q.isPending ? (
        <LoadingState label="Looking for repeat alarms…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : rows.length === 0 ? (
        <EmptyState title="No unit is alarming repeatedly">
          Alarms come in from the form above, a CSV import or other systems through the API. A unit appears here once the same code repeats
          within the branch's window.
        </EmptyState>
      ) : (
        <>
          <TableTools label="repeat-alarm units" q={filter} setQ={setQ} shown={filtered.length} total={rows.length} onExport={exportCsv} />
          <DataTable caption="Repeat-alarm units" columns={columns} data={filtered} getRowId={(u) => `${u.unitId}|${u.code}`} />
        </>
      )}
    </section>
  );
}

/* ----------------------------------------------------------- return visits */

export function ReturnVisitsSection({ branchId, timeZone }: { branchId: string | undefined; timeZone: string }) {
  const q = useReturnVisits(branchId);
  const rows = q.data ?? [];
  const toText = useCallback(
    (r: ReturnVisitRow) =>
      `${woLabel(r.number)} ${r.siteName} ${r.unitTag ?? ''} ${r.returnNeeds.map((n) => returnNeedLabels[n]).join(' ')} ${r.returnNotes ?? ''}`,
    [],
  );
  const { q: filter, setQ, filtered } = useTableFilter(rows, toText);
  const columns = useMemo<CoilpathColumn<ReturnVisitRow>[]>(
    () => [
      {
        id: 'closed',
        header: 'Closed',
        accessorFn: (r) => r.origin?.closedAt ?? r.createdAt,
        cell: ({ row: { original: r } }) => (
          <div>
            {formatInZone(r.origin?.closedAt ?? r.createdAt, timeZone, 'EEE d MMM')}
            <div className="text-xs text-slate">
              {r.origin ? `${woLabel(r.origin.number)}${r.origin.techName ? ` · ${r.origin.techName}` : ''}` : ''}
            </div>
          </div>
        ),
      },
      {
        id: 'where',
        header: 'Site and unit',
        accessorFn: (r) => r.siteName,
        cell: ({ row: { original: r } }) => (
          <div>
            {r.siteName}
            <div className="text-xs text-slate">
              {r.unitTag ?? 'Whole site'} · return {woLabel(r.number)}
            </div>
            <ChangedByNote row="workOrder" id={r.workOrderId} />
          </div>
        ),
      },
      {
        id: 'needs',
        header: 'Needs',
        enableSorting: false,
        cell: ({ row: { original: r } }) => (
          <div className="flex max-w-xs flex-col gap-1">
            <div className="flex flex-wrap gap-1">
              {r.returnNeeds.map((n) => (
                <Badge key={n} tone="info">
                  {returnNeedLabels[n]}
                </Badge>
              ))}
            </div>
            {r.returnNotes && <span className="text-xs">{r.returnNotes}</span>}
          </div>
        ),
      },
      {
        id: 'queue',
        header: 'Priority and latest date',
        enableSorting: false,
        cell: ({ row: { original: r } }) => <QueueForm r={r} timeZone={timeZone} />,
      },
    ],
    [timeZone],
  );
  const exportCsv = () =>
    downloadCsv(
      'return-visits-to-book',
      filtered.map((r) => ({
        work_order: woLabel(r.number),
        origin: r.origin ? woLabel(r.origin.number) : '',
        closed_at: csvTimestamp(r.origin?.closedAt, timeZone),
        site: r.siteName,
        unit: r.unitTag ?? '',
        needs: r.returnNeeds.join(' '),
        notes: r.returnNotes ?? '',
        priority: r.priority,
        latest: csvTimestamp(r.latestAt, timeZone),
      })),
    );
  return (
    <section aria-labelledby="returns-h" className="flex flex-col gap-2">
      <h2 id="returns-h" className="text-lg font-semibold">
        Return visits to book
      </h2>
      <p className="text-sm text-slate">
        Visits closed as needing a return whose return visit is not booked yet, oldest first. Set a priority and the latest date to send it
        to the Roster queue.
      </p>
      {q.isPending ? (
        <LoadingState label="Loading return visits…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : rows.length === 0 ? (
        <EmptyState title="No return visits waiting">
          When a technician closes a visit as needing a return, the return visit appears here until it is booked.
        </EmptyState>
      ) : (
        <>
          <TableTools label="return visits" q={filter} setQ={setQ} shown={filtered.length} total={rows.length} onExport={exportCsv} />
          <DataTable caption="Return visits to book" columns={columns} data={filtered} getRowId={(r) => r.workOrderId} />
        </>
      )}
    </section>
  );
}

function QueueForm({ r, timeZone }: { r: ReturnVisitRow; timeZone: string }) {
  const notify = useNotify();
  const m = useQueueReturnVisit();
  const today = todayInZone(timeZone);
  const [priority, setPriority] = useState<Priority>(r.priority);
  const [latestDate, setLatestDate] = useState(r.latestAt ? todayInZone(timeZone, new Date(r.latestAt)) : addDays(today, 7));
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    m.mutate(
      { id: r.workOrderId, body: { priority, latestDate } },
      {
        onSuccess: () =>
          notify(
            `Return visit ${woLabel(r.number)} is in the Roster queue: ${priorityLabels[priority].toLowerCase()} priority, book by ${latestDate}.`,
          ),
        onError: (err) => notify(errorMessage(err), 'alarm'),
      },
    );
  };
  return (
    <form onSubmit={submit} className="flex flex-wrap items-center gap-2" aria-label={`Send ${woLabel(r.number)} to the Roster queue`}>
      <label className="sr-only" htmlFor={`p-${r.workOrderId}`}>
        Priority
      </label>
      <select
        id={`p-${r.workOrderId}`}
        value={priority}
        onChange={(e) => setPriority(e.target.value as Priority)}
        className="min-h-10 rounded-md border border-slate-line bg-white px-2 text-sm"
      >
        {priorities.map((p) => (
          <option key={p} value={p}>
            {priorityLabels[p]}
          </option>
        ))}
      </select>
      <label className="sr-only" htmlFor={`d-${r.workOrderId}`}>
        Latest date
      </label>
      <input
        id={`d-${r.workOrderId}`}
        type="date"
        min={today}
        value={latestDate}
        onChange={(e) => setLatestDate(e.target.value)}
        required
        className="min-h-10 rounded-md border border-slate-line bg-white px-2 text-sm"
      />
      <Button type="submit" size="sm" busy={m.isPending}>
        <Send className="size-4" aria-hidden="true" /> {r.latestAt ? 'Update' : 'Send to Roster'}
      </Button>
      {r.latestAt && (
        <span className="basis-full text-xs text-ok">In the queue, book by {formatInZone(r.latestAt, timeZone, 'd MMM')}</span>
      )}
    </form>
  );
}
