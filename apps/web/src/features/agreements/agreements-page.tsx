import { lazy, Suspense, useCallback, useMemo, useRef, useState } from 'react';
import { CalendarRange, Plus, RefreshCw } from 'lucide-react';
import { recordDate } from '@coilpath/contract/date-words';
import { describeAgreementRrule, PM_GRACE_DAYS } from '@coilpath/contract/agreements';
import type { AgreementRow, PlanPreview, PlanVisit } from '@coilpath/contract';
import { useBranch } from '@/lib/branch';
import { errorMessage } from '@/lib/api-client';
import { formatInZone, formatMoney, todayInZone } from '@/lib/format';
import { Badge, Card, PageHeader } from '@/components/ui/page';
import { Button } from '@/components/ui/button';
import { DataTable, type CoilpathColumn } from '@/components/ui/data-table';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { TableTools, downloadCsv, useTableFilter } from '@/components/ui/table-tools';
import { AgreementForm } from './agreement-form';
import {
  applyPlan,
  previewPlan,
  useAgreement,
  useAgreements,
  useApplyPlan,
  usePatchAgreement,
  usePmCompletion,
  useRefreshAgreements,
} from './api';
import { appNow } from '@/lib/now';

const VisitCalendar = lazy(() => import('./visit-calendar'));

const actionLabels: Record<PlanVisit['action'], string> = {
  new: 'Will be created',
  keep: 'Already planned',
  move: 'Planned date changes',
  locked: 'Booked or done — left as is',
  cancel: 'No longer in the plan — will be cancelled',
};
const actionTone = { new: 'info', keep: 'neutral', move: 'watch', locked: 'ok', cancel: 'alarm' } as const;

const summary = (c: PlanPreview['counts']) =>
  `${c.new} new, ${c.move} moved, ${c.cancel} cancelled, ${c.keep} unchanged, ${c.locked} booked or done left untouched`;

export default function AgreementsPage() {
  const { branchId, branch, timeZone } = useBranch();
  const [creating, setCreating] = useState(false);
  const [selected, setSelected] = useState<string | null>(null);
  const list = useAgreements(branchId);
  return (
    <>
      <PageHeader
        title="Agreements"
        subtitle={
          <>
            Maintenance agreements, their visit plans and PM completion — {branch ? branch.name : 'all branches'},{' '}
            {formatInZone(appNow(), timeZone, 'EEEE d MMMM yyyy')} ({timeZone}).
          </>
        }
        actions={
          <Button onClick={() => setCreating(true)} disabled={creating}>
            <Plus className="size-4" aria-hidden="true" /> New agreement
          </Button>
        }
      />
      <div className="flex flex-col gap-8">
        {creating && (
          <AgreementForm
            branchId={branchId}
            timeZone={timeZone}
            onCancel={() => setCreating(false)}
            onCreated={(a) => {
              setCreating(false);
              setSelected(a.id);
            }}
          />
        )}
        {selected && <AgreementPanel id={selected} timeZone={timeZone} onClose={() => setSelected(null)} />}
        <section aria-labelledby="agreements-h" className="flex flex-col gap-2">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <h2 id="agreements-h" className="text-lg font-semibold">
              Agreements
            </h2>
            {list.data && list.data.some((a) => a.status === 'active') && (
              <RegenerateAll agreements={list.data.filter((a) => a.status === 'active')} />
            )}
          </div>
          {list.isPending ? (
            <LoadingState label="Loading agreements…" />
          ) : list.isError ? (
            <ErrorState error={list.error} onRetry={() => list.refetch()} />
          ) : list.data.length === 0 ? (
            <EmptyState title="No maintenance agreements yet" action={<Button onClick={() => setCreating(true)}>New agreement</Button>}>
              An agreement names a site's covered units, how often they are serviced, the term, the response time and the price. Its planned
              visits then go to the Roster queue.
            </EmptyState>
          ) : (
            <AgreementsTable rows={list.data} onOpen={setSelected} selected={selected} />
          )}
        </section>
        <PmCompletionSection branchId={branchId} onOpen={setSelected} />
      </div>
    </>
  );
}

function AgreementsTable({ rows, onOpen, selected }: { rows: AgreementRow[]; onOpen: (id: string) => void; selected: string | null }) {
  const toText = useCallback(
    (a: AgreementRow) => `${a.name} ${a.siteName} ${a.customerName} ${a.status} ${a.units.map((u) => u.tag).join(' ')}`,
    [],
  );
  const { q, setQ, filtered } = useTableFilter(rows, toText);
  const columns = useMemo<CoilpathColumn<AgreementRow>[]>(
    () => [
      {
        id: 'name',
        header: 'Agreement',
        accessorFn: (a) => a.name,
        cell: ({ row: { original: a } }) => (
          <button
            type="button"
            className="text-left font-medium text-coolant underline-offset-2 hover:underline"
            onClick={() => onOpen(a.id)}
            aria-pressed={selected === a.id}
          >
            {a.name}
            <span className="block text-xs font-normal text-slate">{a.customerName}</span>
          </button>
        ),
      },
      { id: 'site', header: 'Site', accessorFn: (a) => a.siteName },
      {
        id: 'units',
        header: 'Units',
        accessorFn: (a) => a.units.length,
        cell: ({ row: { original: a } }) => a.units.map((u) => u.tag).join(', '),
      },
      {
        id: 'rule',
        header: 'Visits',
        enableSorting: false,
        cell: ({ row: { original: a } }) => <span className="text-xs">{describeAgreementRrule(a.rrule)}</span>,
      },
      {
        id: 'term',
        header: 'Term ends',
        accessorFn: (a) => a.termEnd,
        cell: ({ row: { original: a } }) => `${recordDate(a.termStart)} → ${recordDate(a.termEnd)}`,
      },
      { id: 'sla', header: 'SLA', accessorFn: (a) => a.slaHours, cell: ({ row: { original: a } }) => `${a.slaHours} h` },
      { id: 'price', header: 'Price', accessorFn: (a) => a.priceCents, cell: ({ row: { original: a } }) => formatMoney(a.priceCents) },
      {
        id: 'next',
        header: 'Next visit',
        accessorFn: (a) => a.nextPlannedDate ?? '',
        cell: ({ row: { original: a } }) =>
          a.nextPlannedDate ? recordDate(a.nextPlannedDate) : a.plannedCount ? 'None ahead' : 'Not planned',
      },
      {
        id: 'status',
        header: 'Status',
        accessorFn: (a) => a.status,
        cell: ({ row: { original: a } }) => (
          <Badge tone={a.status === 'active' ? 'ok' : 'neutral'}>
            {a.status === 'active' ? 'Active' : a.status === 'ended' ? 'Ended' : 'Cancelled'}
          </Badge>
        ),
      },
    ],
    [onOpen, selected],
  );
  const exportCsv = () =>
    downloadCsv(
      'agreements',
      filtered.map((a) => ({
        name: a.name,
        customer: a.customerName,
        site: a.siteName,
        units: a.units.map((u) => u.tag).join(' '),
        rrule: a.rrule,
        term_start: a.termStart,
        term_end: a.termEnd,
        sla_hours: a.slaHours,
        price: (a.priceCents / 100).toFixed(2),
        visit_minutes: a.visitMinutes,
        planned_visits: a.plannedCount,
        next_visit: a.nextPlannedDate ?? '',
        status: a.status,
      })),
    );
  return (
    <>
      <TableTools label="agreements" q={q} setQ={setQ} shown={filtered.length} total={rows.length} onExport={exportCsv} />
      <DataTable
        caption="Maintenance agreements"
        columns={columns}
        data={filtered}
        getRowId={(a) => a.id}
        rowClassName={(a) => (a.id === selected ? 'bg-coolant-tint' : '')}
      />
    </>
  );
}

/** One agreement: its terms, the visit plan (preview, apply) and its visits on a month calendar. */
function AgreementPanel({ id, timeZone, onClose }: { id: string; timeZone: string; onClose: () => void }) {
  const notify = useNotify();
  const q = useAgreement(id);
  const apply = useApplyPlan();
  const patch = usePatchAgreement();
  const [preview, setPreview] = useState<PlanPreview | null>(null);
  const [previewing, setPreviewing] = useState(false);
  const [error, setError] = useState<string>();
  const today = todayInZone(timeZone);

  if (q.isPending) return <LoadingState label="Loading the agreement…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} />;
  const a = q.data;
  const doPreview = async () => {
    setError(undefined);
    setPreviewing(true);
    try {
      setPreview(await previewPlan(a.id));
    } catch (e) {
      setError(errorMessage(e));
    } finally {
      setPreviewing(false);
    }
  };
  const doApply = () =>
    apply.mutate(a.id, {
      onSuccess: (r) => {
        setPreview(null);
        notify(`Visit plan for “${a.name}” applied: ${summary(r.counts)}. New visits are in the Roster queue.`);
      },
      onError: (e) => setError(errorMessage(e)),
    });
  const upcoming = a.visits.filter((v) => v.plannedDate && v.plannedDate >= today);
  const initialDate = upcoming[0]?.plannedDate ?? a.visits[0]?.plannedDate ?? today;

  return (
    <Card
      title={`${a.name} — ${a.siteName}`}
      actions={
        <Button variant="ghost" size="sm" onClick={onClose}>
          Close
        </Button>
      }
    >
      <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-2 lg:grid-cols-4">
        <div>
          <dt className="text-slate">Customer</dt>
          <dd>{a.customerName}</dd>
        </div>
        <div>
          <dt className="text-slate">Covered units</dt>
          <dd>{a.units.map((u) => `${u.tag} (${u.make} ${u.model})`).join(', ')}</dd>
        </div>
        <div>
          <dt className="text-slate">Visits</dt>
          <dd>{describeAgreementRrule(a.rrule)}</dd>
        </div>
        <div>
          <dt className="text-slate">Term</dt>
          <dd className="tabular">
            {recordDate(a.termStart)} → {recordDate(a.termEnd)}
          </dd>
        </div>
        <div>
          <dt className="text-slate">SLA response</dt>
          <dd>{a.slaHours} hours</dd>
        </div>
        <div>
          <dt className="text-slate">Price</dt>
          <dd>{formatMoney(a.priceCents)}</dd>
        </div>
        <div>
          <dt className="text-slate">Per visit</dt>
          <dd>{a.visitMinutes} minutes</dd>
        </div>
        <div>
          <dt className="text-slate">Status</dt>
          <dd>{a.status === 'active' ? 'Active' : a.status === 'ended' ? 'Ended' : 'Cancelled'}</dd>
        </div>
        {a.tasks.length > 0 && (
          <div className="sm:col-span-2 lg:col-span-4">
            <dt className="text-slate">Tasks per visit</dt>
            <dd>{a.tasks.join(' · ')}</dd>
          </div>
        )}
        {a.seasonNotes && (
          <div className="sm:col-span-2 lg:col-span-4">
            <dt className="text-slate">Season notes</dt>
            <dd>{a.seasonNotes}</dd>
          </div>
        )}
      </dl>

      <div className="mt-4 flex flex-wrap items-center gap-2 border-t border-slate-line pt-3">
        <Button variant="secondary" onClick={() => void doPreview()} busy={previewing}>
          <CalendarRange className="size-4" aria-hidden="true" /> Preview visit plan
        </Button>
        {preview && (
          <Button onClick={doApply} busy={apply.isPending}>
            Apply plan ({preview.counts.new} new, {preview.counts.move} moved, {preview.counts.cancel} cancelled)
          </Button>
        )}
        {a.status === 'active' && (
          <Button
            variant="ghost"
            size="sm"
            busy={patch.isPending}
            onClick={() =>
              patch.mutate(
                { id: a.id, patch: { status: 'ended' } },
                {
                  onSuccess: () => notify(`“${a.name}” marked ended. Regenerate its plan to cancel visits not yet booked.`),
                  onError: (e) => setError(errorMessage(e)),
                },
              )
            }
          >
            Mark ended
          </Button>
        )}
        {error && (
          <p role="alert" className="basis-full text-sm text-alarm">
            {error}
          </p>
        )}
      </div>

      {preview && (
        <div className="mt-3">
          <p className="text-sm" role="status">
            Preview: {summary(preview.counts)}. Nothing is written until you apply. Visits avoid weekends and branch holidays and are spread
            so one week is not overloaded.
          </p>
          {preview.dropped.length > 0 && (
            <div role="alert" className="mt-2 rounded-md border border-alarm/30 bg-alarm-tint p-3 text-sm">
              <p className="font-semibold">
                {preview.dropped.length} contracted visit{preview.dropped.length === 1 ? '' : 's'} cannot be placed in the term and will not
                be planned:
              </p>
              <ul className="mt-1 list-disc pl-5">
                {preview.dropped.map((d) => (
                  <li key={d.ruleDate}>
                    <span className="tabular">{recordDate(d.ruleDate)}</span> — {d.reason}
                  </li>
                ))}
              </ul>
              <p className="mt-1">Change the recurrence or extend the term to keep every contracted visit.</p>
            </div>
          )}
          <div className="mt-2 max-h-80 overflow-auto rounded border border-slate-line">
            <table className="w-full text-sm">
              <caption className="sr-only">Visit plan preview</caption>
              <thead className="sticky top-0 bg-frost text-left text-xs uppercase text-slate">
                <tr>
                  <th scope="col" className="px-2 py-1">
                    Planned date
                  </th>
                  <th scope="col" className="px-2 py-1">
                    Rule date
                  </th>
                  <th scope="col" className="px-2 py-1">
                    What happens
                  </th>
                  <th scope="col" className="px-2 py-1">
                    Why moved
                  </th>
                </tr>
              </thead>
              <tbody>
                {preview.visits.map((v) => (
                  <tr key={`${v.ruleDate}-${v.workOrderId ?? 'new'}`} className="border-t border-slate-line/70">
                    <td className="tabular px-2 py-1 whitespace-nowrap">{recordDate(v.plannedDate)}</td>
                    <td className="tabular px-2 py-1 whitespace-nowrap">{recordDate(v.ruleDate)}</td>
                    <td className="px-2 py-1">
                      <Badge tone={actionTone[v.action]}>{actionLabels[v.action]}</Badge>
                    </td>
                    <td className="px-2 py-1 text-xs">{v.moved ?? ''}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </div>
      )}

      <div className="mt-4">
        <h3 className="mb-2 font-semibold">Planned visits on the calendar</h3>
        {a.visits.length === 0 ? (
          <p className="text-sm text-slate">
            No visits planned yet: preview the plan and apply it. The visits then appear here and in the Roster's unplaced queue.
          </p>
        ) : (
          <>
            <p className="mb-2 text-sm text-slate">
              {a.visits.length} planned visit{a.visits.length === 1 ? '' : 's'}; {upcoming.length} ahead, waiting in the Roster queue until
              booked.
            </p>
            <Suspense fallback={<LoadingState label="Loading the calendar…" />}>
              <VisitCalendar visits={a.visits} name={a.name} initialDate={initialDate} today={today} />
            </Suspense>
          </>
        )}
      </div>
    </Card>
  );
}

/** Regenerates every active agreement's plan, one request per agreement, with a progress bar. */
function RegenerateAll({ agreements }: { agreements: AgreementRow[] }) {
  const notify = useNotify();
  const refresh = useRefreshAgreements();
  const [done, setDone] = useState<number | null>(null);
  const [failures, setFailures] = useState<string[]>([]);
  const stop = useRef(false);
  const running = done !== null;
  const run = async () => {
    stop.current = false;
    setFailures([]);
    setDone(0);
    const totals = { new: 0, move: 0, cancel: 0, keep: 0, locked: 0 };
    const failed: string[] = [];
    let i = 0;
    for (const a of agreements) {
      if (stop.current) break;
      try {
        const r = await applyPlan(a.id);
        for (const k of Object.keys(totals) as (keyof typeof totals)[]) totals[k] += r.counts[k];
      } catch (e) {
        failed.push(`${a.name} (${a.siteName}): ${errorMessage(e)}`);
      }
      setDone(++i);
    }
    setDone(null);
    setFailures(failed);
    refresh();
    notify(
      `${stop.current ? 'Stopped after' : 'Regenerated'} ${i} of ${agreements.length} agreement plans: ${summary(totals)}${failed.length ? `; ${failed.length} failed` : ''}.`,
      failed.length ? 'alarm' : 'ok',
    );
  };
  return (
    <div className="flex flex-wrap items-center gap-2">
      {running ? (
        <>
          <label htmlFor="regen-progress" className="text-sm">
            Regenerating {done} of {agreements.length}
          </label>
          <progress id="regen-progress" className="h-3 w-40 accent-copper" max={agreements.length} value={done ?? 0} />
          <Button variant="ghost" size="sm" onClick={() => (stop.current = true)}>
            Stop
          </Button>
        </>
      ) : (
        <Button variant="secondary" size="sm" onClick={() => void run()}>
          <RefreshCw className="size-4" aria-hidden="true" /> Regenerate all plans ({agreements.length})
        </Button>
      )}
      {failures.length > 0 && (
        <ul role="alert" className="basis-full text-sm text-alarm">
          {failures.map((f) => (
            <li key={f}>{f}</li>
          ))}
        </ul>
      )}
    </div>
  );
}

const pct = (n: number, d: number) => (d ? `${Math.round((n / d) * 100)} %` : '—');

function PmCompletionSection({ branchId, onOpen }: { branchId: string | undefined; onOpen: (id: string) => void }) {
  const q = usePmCompletion(branchId);
  type Row = NonNullable<typeof q.data>['agreements'][number];
  const rows = q.data?.agreements ?? [];
  const toText = useCallback((r: Row) => `${r.name} ${r.siteName}`, []);
  const { q: filter, setQ, filtered } = useTableFilter(rows, toText);
  const columns = useMemo<CoilpathColumn<Row>[]>(
    () => [
      {
        id: 'name',
        header: 'Agreement',
        accessorFn: (r) => r.name,
        cell: ({ row: { original: r } }) => (
          <button type="button" className="text-left text-coolant underline-offset-2 hover:underline" onClick={() => onOpen(r.agreementId)}>
            {r.name}
            <span className="block text-xs text-slate">{r.siteName}</span>
          </button>
        ),
      },
      { id: 'due', header: 'Due', accessorFn: (r) => r.due },
      {
        id: 'onTime',
        header: 'On time',
        accessorFn: (r) => r.onTime,
        cell: ({ row: { original: r } }) => `${r.onTime} (${pct(r.onTime, r.due)})`,
      },
      { id: 'late', header: 'Late', accessorFn: (r) => r.late },
      {
        id: 'missed',
        header: 'Missed',
        accessorFn: (r) => r.missed,
        cell: ({ row: { original: r } }) => (r.missed ? <Badge tone="alarm">{r.missed} missed</Badge> : '0'),
      },
      { id: 'open', header: 'Still open', accessorFn: (r) => r.open },
    ],
    [onOpen],
  );
  return (
    <section aria-labelledby="pm-h" className="flex flex-col gap-3">
      <h2 id="pm-h" className="text-lg font-semibold">
        PM completion
      </h2>
      {q.isPending ? (
        <LoadingState label="Counting planned visits…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : (
        <>
          <p className="text-sm text-slate">
            Planned visits due since {recordDate(q.data.from)}. On time: closed within {PM_GRACE_DAYS} days of the planned date; late:
            closed after that; missed: still not done {PM_GRACE_DAYS} days after it.
          </p>
          <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
            {q.data.branches.map((b) => (
              <Card key={b.branchId} title={b.branchName}>
                <p className="tabular text-3xl font-semibold">{pct(b.onTime, b.due)}</p>
                <p className="text-sm text-slate">done on time, of {b.due} due</p>
                <p className="tabular mt-2 text-sm">
                  {b.onTime} on time · {b.late} late · <span className={b.missed ? 'font-semibold text-alarm' : ''}>{b.missed} missed</span>{' '}
                  · {b.open} still open
                </p>
              </Card>
            ))}
          </div>
          <Card title={`Renewals: agreements ending within 60 days (${q.data.renewals.length})`}>
            {q.data.renewals.length === 0 ? (
              <p className="text-sm text-slate">No active agreement ends in the next 60 days.</p>
            ) : (
              <ul className="flex flex-col gap-1 text-sm">
                {q.data.renewals.map((r) => (
                  <li key={r.agreementId} className="flex flex-wrap items-center gap-2">
                    <Badge tone={r.daysLeft <= 14 ? 'alarm' : 'watch'}>{r.daysLeft} days left</Badge>
                    <button type="button" className="text-coolant underline-offset-2 hover:underline" onClick={() => onOpen(r.agreementId)}>
                      {r.name}
                    </button>
                    <span className="text-slate">
                      {r.customerName} · {r.siteName} · ends {recordDate(r.termEnd)} · {formatMoney(r.priceCents)}
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </Card>
          {rows.length > 0 && (
            <div>
              <TableTools
                label="PM completion by agreement"
                q={filter}
                setQ={setQ}
                shown={filtered.length}
                total={rows.length}
                onExport={() =>
                  downloadCsv(
                    'pm-completion',
                    filtered.map((r) => ({
                      agreement: r.name,
                      site: r.siteName,
                      due: r.due,
                      on_time: r.onTime,
                      late: r.late,
                      missed: r.missed,
                      open: r.open,
                    })),
                  )
                }
              />
              <DataTable caption="PM completion by agreement" columns={columns} data={filtered} getRowId={(r) => r.agreementId} />
            </div>
          )}
        </>
      )}
    </section>
  );
}
