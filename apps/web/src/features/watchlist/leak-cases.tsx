import { useCallback, useState } from 'react';
import { AlertTriangle, CheckCircle2, Clock, Wrench } from 'lucide-react';
import { recordDate } from '@coilpath/contract/date-words';
import { epa608Labels, leakCaseStatusLabels, leakObligationStateLabels, priorities, priorityLabels } from '@coilpath/contract/vocabulary';
import type { LeakCaseRow, LeakDeadline, OpenReturnDetails, Priority } from '@coilpath/contract';
import { ApiError, errorMessage } from '@/lib/api-client';
import { Badge, Card, SafetyNote } from '@/components/ui/page';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { TableTools, downloadCsv, useTableFilter } from '@/components/ui/table-tools';
import { useAddVerificationTest, useBookRepair, useLeakCases, usePatchLeakCase } from './api';
import { OpenReturnOffer, OpenWorkOrderLink, openReturnOf, workOrderStateText } from './open-return';
import { ChangedByNote } from '@/components/changed-by';

const whatLabels: Record<LeakDeadline['what'], string> = {
  repair: 'Repair',
  initial_verification: 'Initial verification test',
  follow_up_verification: 'Follow-up verification test',
  retrofit_retire_plan: 'Retrofit or retirement plan',
  retrofit_retire_complete: 'Retrofit or retirement done',
};

export const woLabel = (n: number | null) => (n === null ? 'work order' : `WO-${n}`);
const isFinished = (state: OpenReturnDetails['state']) => state === 'closed' || state === 'cancelled';

export function DeadlineBadge({ d }: { d: LeakDeadline }) {
  if (d.state === 'met')
    return (
      <Badge tone="ok">
        <CheckCircle2 className="size-3.5" aria-hidden="true" /> Done
      </Badge>
    );
  if (d.state === 'overdue')
    return (
      <Badge tone="alarm">
        <AlertTriangle className="size-3.5" aria-hidden="true" /> Overdue by {-d.daysLeft} day{d.daysLeft === -1 ? '' : 's'}
      </Badge>
    );
  if (d.state === 'due_soon')
    return (
      <Badge tone="watch">
        <Clock className="size-3.5" aria-hidden="true" />{' '}
        {d.daysLeft === 0 ? 'Due today' : `Due in ${d.daysLeft} day${d.daysLeft === 1 ? '' : 's'}`}
      </Badge>
    );
  return <Badge tone="neutral">{d.daysLeft} days left</Badge>;
}

const caseText = (c: LeakCaseRow) =>
  `${c.unitTag} ${c.siteName} ${c.make} ${c.model} ${c.refrigerant} ${c.rule} ${leakCaseStatusLabels[c.status]} ${c.next ? whatLabels[c.next.what] : ''}`;

export function LeakCasesSection({ branchId }: { branchId: string | undefined }) {
  const q = useLeakCases(branchId);
  const rows = q.data ?? [];
  const toText = useCallback((row: Parameters<typeof caseText>[0]) => caseText(row), []);
  const { q: filter, setQ, filtered } = useTableFilter(rows, toText);
  const exportCsv = () =>
    downloadCsv(
      'leak-cases',
      filtered.map((c) => ({
        unit: c.unitTag,
        site: c.siteName,
        refrigerant: c.refrigerant,
        full_charge_lb: c.fullChargeLb,
        leak_rate_percent: c.leakRatePercent.toFixed(1),
        threshold_percent: c.thresholdPercent,
        rule: c.rule,
        method: c.method,
        opened_on: c.openedOn,
        repair_due: c.repairDueDate,
        status: c.status,
        next_deadline: c.next ? whatLabels[c.next.what] : '',
        next_due: c.next?.due ?? '',
        days_left: c.next?.daysLeft ?? '',
        repair_work_order: c.repairWorkOrder ? woLabel(c.repairWorkOrder.number) : '',
      })),
    );
  return (
    <section aria-labelledby="leak-cases-h" className="flex flex-col gap-3">
      <h2 id="leak-cases-h" className="text-lg font-semibold">
        Open leak cases
      </h2>
      <SafetyNote>
        Deadlines follow Coilpath's extract of the US EPA leak-repair rules (40 CFR 82.157 and 84.106); items marked [S] or [M] come from
        secondary sources or memory. Check the current eCFR, the manufacturer's data and local codes before relying on them. Leak repairs
        need an EPA 608 certified technician.
      </SafetyNote>
      {q.isPending ? (
        <LoadingState label="Loading leak cases…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : rows.length === 0 ? (
        <EmptyState title="No open leak cases">
          A leak case opens when refrigerant added on a visit puts a unit's leak rate over its threshold. Open cases appear here with their
          repair and verification deadlines.
        </EmptyState>
      ) : (
        <>
          <TableTools label="leak cases" q={filter} setQ={setQ} shown={filtered.length} total={rows.length} onExport={exportCsv} />
          <ul className="flex flex-col gap-3">
            {filtered.map((c) => (
              <li key={c.id}>
                <LeakCaseCard c={c} />
              </li>
            ))}
          </ul>
        </>
      )}
    </section>
  );
}

export function LeakCaseCard({ c }: { c: LeakCaseRow }) {
  const notify = useNotify();
  const book = useBookRepair();
  const patch = usePatchLeakCase();
  const [priority, setPriority] = useState<Priority>('high');
  const [panel, setPanel] = useState<'none' | 'test' | 'plan'>('none');
  /** The open return visit a refused booking named (409 `open_return_exists`), offered to open. */
  const [openReturn, setOpenReturn] = useState<{ wo: OpenReturnDetails; message: string } | null>(null);
  const urgent =
    c.next?.state === 'overdue' ? 'border-alarm border-l-4' : c.next?.state === 'due_soon' ? 'border-watch-base border-l-4' : '';

  const onBook = () =>
    book.mutate(
      { id: c.id, body: { priority } },
      {
        onSuccess: (r) => {
          setOpenReturn(null);
          const wo = r.leakCase.repairWorkOrder;
          notify(
            r.joined
              ? `The repair joined ${woLabel(wo?.number ?? null)}, the return visit already open for ${c.unitTag}: it now includes the leak repair, to be booked by ${recordDate(c.repairDueDate)} with an EPA 608 ${epa608Labels[c.requiredCertification]} technician.`
              : `Repair visit ${woLabel(wo?.number ?? null)} is in the Roster queue, to be booked by ${recordDate(c.repairDueDate)} with an EPA 608 ${epa608Labels[c.requiredCertification]} technician.`,
          );
        },
        onError: (e) => {
          const open = openReturnOf(e);
          if (open) setOpenReturn({ wo: open, message: errorMessage(e) });
          notify(e instanceof ApiError && e.status === 409 ? `${e.message} No second visit was created.` : errorMessage(e), 'alarm');
        },
      },
    );
  const onClose = () =>
    patch.mutate(
      { id: c.id, patch: { action: 'close' } },
      { onSuccess: () => notify(`Leak case on ${c.unitTag} closed.`), onError: (e) => notify(errorMessage(e), 'alarm') },
    );

  return (
    <Card className={urgent}>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <h3 className="font-semibold">
            {c.unitTag} <span className="font-normal text-slate">· {c.siteName}</span>
          </h3>
          <p className="tabular text-sm text-slate">
            {c.make} {c.model} · {c.refrigerant}, full charge {c.fullChargeLb.toFixed(1)} lb · opened {recordDate(c.openedOn)}
          </p>
          <ChangedByNote row="leakCase" id={c.id} />
        </div>
        <div className="flex flex-wrap gap-1">
          <Badge tone="neutral">{leakCaseStatusLabels[c.status]}</Badge>
          {c.obligationState && (
            <Badge
              tone={
                c.obligationState === 'open' || c.obligationState === 'overdue'
                  ? 'alarm'
                  : c.obligationState === 'repaired'
                    ? 'watch'
                    : 'ok'
              }
            >
              Record: {leakObligationStateLabels[c.obligationState]}
            </Badge>
          )}
          {c.chronic && <Badge tone="alarm">Chronic leaker (≥ 125 % a year)</Badge>}
          {c.next && <DeadlineBadge d={c.next} />}
        </div>
      </div>
      <p className="tabular mt-2 text-sm">
        Leak rate <strong>{c.leakRatePercent.toFixed(1)} %/yr</strong> ({c.method}) over the <strong>{c.thresholdPercent} %</strong>{' '}
        threshold of {c.rule}.
      </p>
      <table className="mt-3 w-full text-sm">
        <caption className="sr-only">Deadlines of the leak case on {c.unitTag}</caption>
        <thead className="text-left text-xs uppercase tracking-wide text-slate">
          <tr>
            <th scope="col" className="py-1 pr-2 font-semibold">
              Deadline
            </th>
            <th scope="col" className="py-1 pr-2 font-semibold">
              Due
            </th>
            <th scope="col" className="py-1 font-semibold">
              State
            </th>
          </tr>
        </thead>
        <tbody>
          {c.deadlines.map((d) => (
            <tr key={d.what} className="border-t border-slate-line/70 align-top">
              <td className="py-1.5 pr-2">
                {whatLabels[d.what]}
                <span className="block text-xs text-slate">{d.source}</span>
              </td>
              <td className="tabular py-1.5 pr-2 whitespace-nowrap">{recordDate(d.due)}</td>
              <td className="py-1.5">
                <DeadlineBadge d={d} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {c.tests.length > 0 && (
        <p className="mt-2 text-sm">
          Tests:{' '}
          {c.tests
            .map((t) => `${t.kind === 'initial' ? 'initial' : 'follow-up'} ${t.testedOn} ${t.passed ? 'passed' : 'failed'}`)
            .join(' · ')}
        </p>
      )}
      <div className="mt-3 flex flex-wrap items-end gap-2 border-t border-slate-line pt-3">
        {c.repairWorkOrder && (
          <p className="flex basis-full flex-wrap items-center gap-x-2 gap-y-0 text-sm">
            <span className="inline-flex items-center gap-1">
              <Wrench className="size-4 text-coolant" aria-hidden="true" />
              Repair visit {woLabel(c.repairWorkOrder.number)}: {workOrderStateText(c.repairWorkOrder.state)}
            </span>
            <OpenWorkOrderLink wo={{ number: c.repairWorkOrder.number, visitId: c.repairWorkOrder.visitId, unitId: c.unitId }} />
          </p>
        )}
        {c.status === 'open' && (!c.repairWorkOrder || isFinished(c.repairWorkOrder.state)) && (
          <>
            <div className="w-36">
              <SelectField label="Priority" value={priority} onChange={(e) => setPriority(e.target.value as Priority)}>
                {priorities.map((p) => (
                  <option key={p} value={p}>
                    {priorityLabels[p]}
                  </option>
                ))}
              </SelectField>
            </div>
            <Button onClick={onBook} busy={book.isPending}>
              {c.repairWorkOrder ? 'Book another repair visit' : 'Book repair visit'}
            </Button>
            <p className="basis-full text-xs text-slate">
              Creates a return visit in the Roster queue (or joins the one already open for this unit): needs EPA 608{' '}
              {epa608Labels[c.requiredCertification]}, to be booked by {recordDate(c.repairDueDate)}.
            </p>
          </>
        )}
        <Button variant="secondary" size="sm" aria-expanded={panel === 'test'} onClick={() => setPanel(panel === 'test' ? 'none' : 'test')}>
          Record verification test
        </Button>
        {!c.planKind && (
          <Button
            variant="secondary"
            size="sm"
            aria-expanded={panel === 'plan'}
            onClick={() => setPanel(panel === 'plan' ? 'none' : 'plan')}
          >
            Plan retrofit or retirement
          </Button>
        )}
        <Button variant="ghost" size="sm" onClick={onClose} busy={patch.isPending}>
          Close case
        </Button>
      </div>
      {openReturn && <OpenReturnOffer wo={openReturn.wo} message={openReturn.message} />}
      {panel === 'test' && <TestForm c={c} onDone={() => setPanel('none')} />}
      {panel === 'plan' && <PlanForm c={c} onDone={() => setPanel('none')} />}
    </Card>
  );
}

function TestForm({ c, onDone }: { c: LeakCaseRow; onDone: () => void }) {
  const notify = useNotify();
  const add = useAddVerificationTest();
  const initialPassed = c.tests.some((t) => t.kind === 'initial' && t.passed);
  const [kind, setKind] = useState<'initial' | 'follow_up'>(initialPassed ? 'follow_up' : 'initial');
  const [testedOn, setTestedOn] = useState(c.today);
  const [passed, setPassed] = useState('yes');
  const [error, setError] = useState<string>();
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    add.mutate(
      { id: c.id, body: { kind, testedOn, passed: passed === 'yes' } },
      {
        onSuccess: () => {
          notify(
            `${kind === 'initial' ? 'Initial' : 'Follow-up'} verification test on ${c.unitTag} recorded (${passed === 'yes' ? 'passed' : 'failed'}).`,
          );
          onDone();
        },
        onError: (err) => setError(errorMessage(err)),
      },
    );
  };
  return (
    <form onSubmit={submit} className="mt-3 grid gap-3 rounded-md bg-frost p-3 sm:grid-cols-4 sm:items-end">
      <SelectField label="Test" value={kind} onChange={(e) => setKind(e.target.value as 'initial' | 'follow_up')}>
        <option value="initial">Initial verification</option>
        <option value="follow_up">Follow-up verification</option>
      </SelectField>
      <TextField label="Tested on" type="date" value={testedOn} max={c.today} onChange={(e) => setTestedOn(e.target.value)} required />
      <SelectField label="Result" value={passed} onChange={(e) => setPassed(e.target.value)}>
        <option value="yes">Passed</option>
        <option value="no">Failed</option>
      </SelectField>
      <Button type="submit" busy={add.isPending}>
        Save test
      </Button>
      {error && (
        <p role="alert" className="text-sm text-alarm sm:col-span-4">
          {error}
        </p>
      )}
    </form>
  );
}

function PlanForm({ c, onDone }: { c: LeakCaseRow; onDone: () => void }) {
  const notify = useNotify();
  const patch = usePatchLeakCase();
  const [planKind, setPlanKind] = useState<'retrofit' | 'retire'>('retrofit');
  const [error, setError] = useState<string>();
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    patch.mutate(
      { id: c.id, patch: { action: 'plan', planKind } },
      {
        onSuccess: (r) => {
          notify(
            `${planKind === 'retrofit' ? 'Retrofit' : 'Retirement'} plan for ${c.unitTag} recorded; it is due to be carried out by ${r.leakCase.planDueDate ? recordDate(r.leakCase.planDueDate) : 'its deadline'}.`,
          );
          onDone();
        },
        onError: (err) => setError(errorMessage(err)),
      },
    );
  };
  return (
    <form onSubmit={submit} className="mt-3 grid gap-3 rounded-md bg-frost p-3 sm:grid-cols-3 sm:items-end">
      <SelectField
        label="Plan"
        value={planKind}
        onChange={(e) => setPlanKind(e.target.value as 'retrofit' | 'retire')}
        hint="A plan within 30 days replaces the repair; it must be carried out within a year."
      >
        <option value="retrofit">Retrofit the unit</option>
        <option value="retire">Retire the unit</option>
      </SelectField>
      <Button type="submit" busy={patch.isPending}>
        Record plan
      </Button>
      {error && (
        <p role="alert" className="text-sm text-alarm sm:col-span-3">
          {error}
        </p>
      )}
    </form>
  );
}
