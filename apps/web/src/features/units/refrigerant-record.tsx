/**
 * The Unit file's refrigerant section: the unit's refrigerant record (`GET /api/units/:id/refrigerant-record`,
 * computed on the server with `leakObligations`) — each entry with the leak rate at that moment, the rule and
 * threshold, and each repair obligation's timeline and state, with the auditor's copy as CSV and PDF.
 */
import { queryOptions, useQuery } from '@tanstack/react-query';
import { AlertTriangle, CheckCircle2, FileDown } from 'lucide-react';
import { recordDate } from '@coilpath/contract/date-words';
import { additionExemptionLabels, leakObligationStateLabels, leakRateMethodLabels } from '@coilpath/contract/vocabulary';
import { refrigerantRecordEntryText } from '@coilpath/contract/unit-file';
import type { LeakObligationState, RefrigerantRecord, RefrigerantRecordEvent } from '@coilpath/contract';
import { Badge, Card, SafetyNote } from '@/components/ui/page';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { api } from '@/lib/api-client';
import { formatNumber } from '@/lib/format';
import { UnitTable } from './unit-table';

export const refrigerantRecordQuery = (unitId: string) =>
  queryOptions({
    queryKey: ['units', 'refrigerant-record', unitId],
    queryFn: () => api.get<RefrigerantRecord>(`/api/units/${unitId}/refrigerant-record`, undefined, { check: 'refrigerantRecordSchema' }),
  });

export const recordDownloadUrl = (unitId: string, format: 'csv' | 'pdf') => `/api/units/${unitId}/refrigerant-record?format=${format}`;

const stateTone: Record<LeakObligationState, 'alarm' | 'watch' | 'ok' | 'neutral'> = {
  open: 'alarm',
  overdue: 'alarm',
  repaired: 'watch',
  verified: 'ok',
  plan: 'neutral',
};

function Rate({ e }: { e: RefrigerantRecordEvent }) {
  if (e.kind !== 'addition') return <>—</>;
  if (e.exempt) return <span className="text-xs text-slate">{additionExemptionLabels[e.exempt]}</span>;
  if (!e.rate) return <>—</>;
  return e.rate.overThreshold ? (
    <span className="font-medium text-alarm">
      <AlertTriangle className="inline size-3.5" aria-hidden="true" /> {formatNumber(e.rate.leakRatePercent, 2)} %/yr — over
    </span>
  ) : (
    <span>
      <CheckCircle2 className="inline size-3.5 text-ok" aria-hidden="true" /> {formatNumber(e.rate.leakRatePercent, 2)} %/yr
      {e.rate.inScope ? ' — not over' : ''}
    </span>
  );
}

/** The record as read from the API (no fetching: the card below loads it). */
export function RefrigerantRecordView({ record: r }: { record: RefrigerantRecord }) {
  return (
    <div className="flex flex-col gap-3">
      <p className="text-sm">
        {r.computeError ? (
          <span className="text-alarm">{r.computeError}</span>
        ) : r.inScope ? (
          <>
            <strong>{r.rule}</strong>: a repair is owed when the leak rate is over <strong>{r.thresholdPercent} %</strong> per year. Latest
            rate {formatNumber(r.leakRatePercent, 2)} %/yr ({leakRateMethodLabels[r.method].toLowerCase()}, full charge{' '}
            {formatNumber(r.appliance.fullChargeLb, 1)} lb).
          </>
        ) : (
          <>No leak-repair rule applies to this refrigerant and full charge today. Latest rate {formatNumber(r.leakRatePercent, 2)} %/yr.</>
        )}
        {r.chronicYears.length > 0 && (
          <span className="block text-alarm">
            Chronic leaker in {r.chronicYears.join(', ')}: 125 % or more of full charge added in the year.
          </span>
        )}
      </p>
      <p className="text-xs text-slate">Full charge: {r.appliance.fullChargeBasis}</p>

      {r.events.length === 0 ? (
        <p className="text-sm text-slate">No refrigerant added or recovered, and no repairs or tests, on record.</p>
      ) : (
        <UnitTable
          caption="Refrigerant record: every entry with the leak rate at that moment"
          head={['Date', 'Entry', 'Pounds', 'Leak rate', 'Rule, threshold', 'By']}
        >
          {r.events.map((e) => (
            <tr key={`${e.kind}-${e.sourceId}`}>
              <td className="whitespace-nowrap">{recordDate(e.date)}</td>
              <td>
                {refrigerantRecordEntryText(e)}
                {e.opensObligation && <span className="block text-xs font-medium text-alarm">Opened a repair obligation</span>}
              </td>
              <td className="tabular whitespace-nowrap">
                {e.kind === 'addition' && e.poundsAdded ? `+${formatNumber(e.poundsAdded, 1)} lb` : ''}
                {e.poundsRecovered ? ` −${formatNumber(e.poundsRecovered, 1)} lb` : ''}
                {e.kind !== 'addition' && e.kind !== 'recovery' ? '—' : ''}
              </td>
              <td className="tabular whitespace-nowrap">
                <Rate e={e} />
              </td>
              <td>{e.rate ? (e.rate.inScope ? `${e.rate.rule}, ${e.rate.thresholdPercent} %` : 'No rule applies') : '—'}</td>
              <td>
                {e.by ? (
                  <>
                    {e.by.name}
                    {e.by.epa608Number && <span className="block text-xs text-slate">EPA 608 {e.by.epa608Number}</span>}
                  </>
                ) : (
                  '—'
                )}
              </td>
            </tr>
          ))}
        </UnitTable>
      )}

      <div>
        <h3 className="mb-2 text-sm font-semibold">Repair obligations</h3>
        {r.obligations.length === 0 ? (
          <p className="text-sm text-slate">None: no counted addition put the leak rate over the threshold.</p>
        ) : (
          <ol className="flex flex-col gap-2">
            {r.obligations.map((o) => (
              <li key={o.triggeredOn} className="rounded-md border border-slate-line p-3 text-sm">
                <Badge tone={stateTone[o.state]}>{leakObligationStateLabels[o.state]}</Badge> {recordDate(o.triggeredOn)}:{' '}
                {formatNumber(o.leakRatePercent, 2)} %/yr over {o.thresholdPercent} % ({o.rule}). Repair due {recordDate(o.repairDueDate)};
                initial verification test due {o.initialTestDue}
                {o.followUpTestDue ? `; follow-up test due ${o.followUpTestDue}` : ''}.
                {o.timeline.length > 0 && (
                  <ul className="mt-1 list-inside list-disc text-xs text-slate">
                    {o.timeline.map((x, i) => (
                      <li key={i}>
                        {recordDate(x.date)} — {x.text}
                      </li>
                    ))}
                  </ul>
                )}
              </li>
            ))}
          </ol>
        )}
      </div>
      <SafetyNote>{r.cautions.join(' ')}</SafetyNote>
    </div>
  );
}

export function RefrigerantRecordCard({ unitId }: { unitId: string }) {
  const q = useQuery(refrigerantRecordQuery(unitId));
  const link =
    'inline-flex min-h-11 items-center gap-2 rounded-md border border-slate-line px-3 text-sm font-medium text-ink hover:bg-frost';
  return (
    <Card
      title="Refrigerant record"
      actions={
        <div className="flex flex-wrap gap-2">
          <a href={recordDownloadUrl(unitId, 'csv')} download className={link}>
            <FileDown className="size-4" aria-hidden="true" /> CSV
          </a>
          <a href={recordDownloadUrl(unitId, 'pdf')} download className={link}>
            <FileDown className="size-4" aria-hidden="true" /> PDF for an audit
          </a>
        </div>
      }
    >
      {q.isPending ? (
        <LoadingState label="Computing the refrigerant record…" />
      ) : q.isError ? (
        <ErrorState error={q.error} onRetry={() => q.refetch()} title="The refrigerant record could not be loaded" />
      ) : (
        <RefrigerantRecordView record={q.data} />
      )}
    </Card>
  );
}
