import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { AlertTriangle, ClipboardPlus } from 'lucide-react';
import { modelAlertTitle } from '@coilpath/contract/fix-quality';
import { workOrderLabel } from '@coilpath/contract/work-orders';
import { workOrderStateLabels } from '@coilpath/contract/vocabulary';
import type { ModelAlert } from '@coilpath/contract';
import { Badge, Card } from '@/components/ui/page';
import { Button } from '@/components/ui/button';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { formatInZone } from '@/lib/format';
import { alertsQuery, createInspections, csvUrl, fixQualityKeys, type PeriodQuery } from './fix-quality-api';
import { CsvLink } from './group-table';

function AlertCard({ alert, canCreate, timeZone }: { alert: ModelAlert; canCreate: boolean; timeZone: string }) {
  const notify = useNotify();
  const qc = useQueryClient();
  const m = useMutation({
    mutationFn: () => createInspections({ make: alert.make, model: alert.model, causeCode: alert.causeCode }),
    onSuccess: (r) => {
      notify(
        r.created === 0
          ? 'Every unit of this model is already checked; no inspection was created.'
          : `Created ${r.created} inspection work order${r.created === 1 ? '' : 's'} (${r.branches.map((b) => `${b.created} in ${b.branchName}`).join(', ')}). They wait in each branch’s Roster queue.`,
      );
      void qc.invalidateQueries({ queryKey: fixQualityKeys.alerts() });
    },
    onError: (e) => notify(`No inspections were created: ${errorMessage(e)}`, 'alarm'),
  });
  const n = alert.unchecked.length;
  return (
    <article className="rounded-lg border border-alarm/30 bg-white p-4" aria-labelledby={`alert-${alert.key}`}>
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h3 id={`alert-${alert.key}`} className="flex items-center gap-2 text-base font-semibold">
            <AlertTriangle className="size-5 text-alarm" aria-hidden="true" />
            {modelAlertTitle(alert)}
          </h3>
          <p className="mt-1 text-sm text-slate">
            Factory defect found on {alert.affectedUnits} unit{alert.affectedUnits === 1 ? '' : 's'} at {alert.sites} sites (
            {alert.findings} finding{alert.findings === 1 ? '' : 's'}, first {formatInZone(alert.firstFoundAt, timeZone, 'd MMM yyyy')},
            latest {formatInZone(alert.lastFoundAt, timeZone, 'd MMM yyyy')}; alert raised{' '}
            {formatInZone(alert.raisedAt, timeZone, 'd MMM yyyy')}). {alert.checkedUnits} of {alert.unitsOfModel} units of this model are
            checked
            {alert.inspectionsOpen > 0 ? `, ${alert.inspectionsOpen} inspection${alert.inspectionsOpen === 1 ? '' : 's'} open` : ''}.
          </p>
        </div>
        {canCreate && n > 0 && (
          <Button onClick={() => m.mutate()} busy={m.isPending}>
            <ClipboardPlus className="size-4" aria-hidden="true" /> Create {n} inspection{n === 1 ? '' : 's'}
          </Button>
        )}
      </div>
      {n === 0 ? (
        <p className="mt-3 flex items-center gap-2 text-sm">
          <Badge tone="ok">All checked</Badge> Every other unit of this model{canCreate ? '' : ' in your branch'} has been checked or has an
          inspection.
        </p>
      ) : (
        <div className="mt-3 overflow-x-auto">
          <table className="w-full text-sm">
            <caption className="sr-only">
              Units of {alert.make} {alert.model} not yet checked
            </caption>
            <thead className="text-left text-xs uppercase tracking-wide text-slate">
              <tr>
                <th scope="col" className="px-2 py-1">
                  Unit
                </th>
                <th scope="col" className="px-2 py-1">
                  Serial
                </th>
                <th scope="col" className="px-2 py-1">
                  Site
                </th>
                <th scope="col" className="px-2 py-1">
                  Branch
                </th>
                <th scope="col" className="px-2 py-1">
                  Warranty until
                </th>
              </tr>
            </thead>
            <tbody>
              {alert.unchecked.map((u) => (
                <tr key={u.unitId} className="border-t border-slate-line/70">
                  <td className="whitespace-nowrap px-2 py-1.5">
                    <Link className="font-medium text-coolant hover:underline" to={`/units/${u.unitId}`}>
                      {u.tag}
                    </Link>
                  </td>
                  <td className="tabular px-2 py-1.5">{u.serial}</td>
                  <td className="px-2 py-1.5">{u.siteName}</td>
                  <td className="px-2 py-1.5">{u.branchName}</td>
                  <td className="tabular px-2 py-1.5">{u.warrantyEnd ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {alert.inspections.length > 0 && <InspectionTable alert={alert} timeZone={timeZone} />}
      {!canCreate && n > 0 && (
        <p className="mt-2 text-xs text-slate">The owner creates inspections for a model alert, because it spans every branch.</p>
      )}
    </article>
  );
}

/** The inspections created from the alert, each with its state and due date. */
function InspectionTable({ alert, timeZone }: { alert: ModelAlert; timeZone: string }) {
  return (
    <div className="mt-3 overflow-x-auto">
      <table className="w-full text-sm">
        <caption className="mb-1 text-left text-xs font-semibold uppercase tracking-wide text-slate">
          Inspections for this alert ({alert.inspections.length})
        </caption>
        <thead className="text-left text-xs uppercase tracking-wide text-slate">
          <tr>
            <th scope="col" className="px-2 py-1">
              Work order
            </th>
            <th scope="col" className="px-2 py-1">
              Unit
            </th>
            <th scope="col" className="px-2 py-1">
              Site
            </th>
            <th scope="col" className="px-2 py-1">
              Branch
            </th>
            <th scope="col" className="px-2 py-1">
              State
            </th>
            <th scope="col" className="px-2 py-1">
              Due
            </th>
          </tr>
        </thead>
        <tbody>
          {alert.inspections.map((i) => (
            <tr key={i.workOrderId} className="border-t border-slate-line/70">
              <td className="tabular whitespace-nowrap px-2 py-1.5">{workOrderLabel(i.number)}</td>
              <td className="whitespace-nowrap px-2 py-1.5">
                <Link className="font-medium text-coolant hover:underline" to={`/units/${i.unitId}`}>
                  {i.unitTag}
                </Link>
              </td>
              <td className="px-2 py-1.5">{i.siteName}</td>
              <td className="px-2 py-1.5">{i.branchName}</td>
              <td className="px-2 py-1.5">
                <Badge tone={i.state === 'closed' ? 'ok' : i.state === 'cancelled' ? 'neutral' : 'watch'}>
                  {workOrderStateLabels[i.state]}
                </Badge>
              </td>
              <td className="tabular whitespace-nowrap px-2 py-1.5">{i.dueAt ? formatInZone(i.dueAt, timeZone, 'd MMM yyyy') : '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function ModelAlertsSection({ isOwner, query, timeZone }: { isOwner: boolean; query: PeriodQuery; timeZone: string }) {
  const q = useQuery(alertsQuery());
  return (
    <Card title="Model alerts" actions={<CsvLink href={csvUrl(query, 'modelAlerts')} label="CSV" />}>
      <p className="mb-3 max-w-prose text-sm text-slate">
        When the same factory-defect cause turns up on one make and model at two or more sites, every other unit of that model is at risk.
        An alert is raised when the second site’s defect is recorded. From then on a unit counts as checked only by what is done on it for
        that cause: a finding with that cause, or an inspection created from the alert (a visit for other work does not count). Units the
        defect was found on count as checked. Alerts look at all history and every branch.
      </p>
      {q.isPending ? (
        <LoadingState label="Looking for model alerts…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} />
      ) : q.data.length === 0 ? (
        <EmptyState title="No model alerts">
          An alert appears when a factory-defect finding with the same cause is recorded on one make and model at a second site.
        </EmptyState>
      ) : (
        <div className="flex flex-col gap-3">
          {q.data.map((a) => (
            <AlertCard key={a.key} alert={a} canCreate={isOwner} timeZone={timeZone} />
          ))}
        </div>
      )}
    </Card>
  );
}
