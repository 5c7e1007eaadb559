import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { AlertTriangle, Droplets, History, Siren } from 'lucide-react';
import { recordDate } from '@coilpath/contract/date-words';
import { causeCodeLabels, causeOriginLabels, visitOutcomeLabels } from '@coilpath/contract/vocabulary';
import { formatMeasure, readingsElevationNote, unitSystemOf } from '@coilpath/contract/measure';
import type { MeasureKind, ReadingUnits } from '@coilpath/contract';
import { targetRangeCaution } from '@coilpath/contract/target-range';
import { daysFrom } from '@coilpath/calc';
import { Badge } from '@/components/ui/page';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { formatInZone } from '@/lib/format';
import { AttachmentThumb } from '@/components/attachment-thumb';
import { briefingQuery } from '@/lib/visit-queries';
import { TargetRangeList } from '@/components/target-range';
import { targetLines } from '@/lib/target-range';

/** A reading's value with its unit symbol (the reading states its units: the branch's system). */
const m = (n: number | null, kind: MeasureKind, units: ReadingUnits) => (n === null ? '—' : formatMeasure(n, kind, units));

/** The "prior findings" a technician wants before arriving at a unit. */
export function UnitBriefingView({ unitId, timeZone, today }: { unitId: string; timeZone: string; today: string }) {
  const q = useQuery(briefingQuery(unitId));
  if (q.isPending) return <LoadingState label="Loading the unit briefing…" />;
  if (q.isError) return <ErrorState error={q.error} onRetry={() => q.refetch()} title="The briefing could not be loaded" />;
  const b = q.data;
  const r = b.refrigerantThisYear;
  const leakDaysLeft = b.openLeakCase ? daysFrom(today, b.openLeakCase.repairDueDate) : null;
  return (
    <div className="flex flex-col gap-3 text-sm">
      <p className="text-slate">
        <Link to={`/units/${b.unit.id}`} className="inline-flex min-h-11 min-w-11 items-center font-medium text-coolant underline">
          {b.unit.tag}
        </Link>{' '}
        · {b.unit.make} {b.unit.model} · serial {b.unit.serial} · {b.unit.refrigerant}, full charge {b.unit.fullChargeLb} lb
      </p>

      {b.openLeakCase && (
        <div className="flex items-start gap-2 rounded-md border border-alarm/40 bg-alarm-tint p-2">
          <AlertTriangle className="mt-0.5 size-4 shrink-0 text-alarm" aria-hidden="true" />
          <p>
            <strong className="text-alarm">Open leak case</strong>: leak rate {b.openLeakCase.leakRatePercent.toFixed(1)} % a year over the{' '}
            {b.openLeakCase.thresholdPercent} % threshold ({b.openLeakCase.rule}); repair due{' '}
            <strong>{recordDate(b.openLeakCase.repairDueDate)}</strong>
            {leakDaysLeft !== null && (leakDaysLeft < 0 ? ` — ${-leakDaysLeft} days overdue` : ` — in ${leakDaysLeft} days`)}
            {b.openLeakCase.chronic ? '; chronic leaker' : ''}.
          </p>
        </div>
      )}

      <div className="flex items-start gap-2">
        <Droplets className="mt-0.5 size-4 shrink-0 text-slate" aria-hidden="true" />
        <p className="tabular-nums">
          Refrigerant added in {r.year}: <strong>{r.poundsAdded.toFixed(1)} lb</strong> of {r.fullChargeLb} lb full charge (
          {r.percentOfFullCharge.toFixed(1)} %)
          {r.poundsRecovered > 0 ? `; recovered ${r.poundsRecovered.toFixed(1)} lb` : ''}.
        </p>
      </div>

      <div className="flex items-start gap-2">
        <Siren className="mt-0.5 size-4 shrink-0 text-slate" aria-hidden="true" />
        {b.repeatAlarms.length === 0 ? (
          <p>No repeat alarms in the last {b.repeatAlarmWindow.days} days.</p>
        ) : (
          <div>
            <p>Repeat alarms in the last {b.repeatAlarmWindow.days} days:</p>
            <ul className="flex flex-wrap gap-1">
              {b.repeatAlarms.map((a) => (
                <li key={`${a.code}-${a.circuit}`}>
                  <Badge tone="watch">
                    {a.code}
                    {a.circuit !== null ? ` circuit ${a.circuit}` : ''} × {a.count}, last {formatInZone(a.lastRaisedAt, timeZone, 'd MMM')}
                  </Badge>
                </li>
              ))}
            </ul>
          </div>
        )}
      </div>

      <div className="flex items-start gap-2">
        <History className="mt-0.5 size-4 shrink-0 text-slate" aria-hidden="true" />
        {b.lastVisit ? (
          <div>
            <p>
              Last visit {formatInZone(b.lastVisit.closedAt, timeZone, 'd MMM yyyy')} by {b.lastVisit.techName}:{' '}
              {b.lastVisit.outcome ? visitOutcomeLabels[b.lastVisit.outcome] : '—'}.
            </p>
            {b.lastVisit.findings.length === 0 ? (
              <p className="text-slate">No findings recorded.</p>
            ) : (
              <ul className="list-disc pl-5">
                {b.lastVisit.findings.map((f) => (
                  <li key={f.id}>
                    {causeCodeLabels[f.causeCode]} ({causeOriginLabels[f.origin]}){f.alarmCode ? `, alarm ${f.alarmCode}` : ''}
                    {f.reportedCircuit !== null && f.actualCircuit !== null && f.reportedCircuit !== f.actualCircuit
                      ? ` — reported on circuit ${f.reportedCircuit}, really circuit ${f.actualCircuit}`
                      : ''}
                    {f.notes ? `: ${f.notes}` : ''}
                  </li>
                ))}
              </ul>
            )}
          </div>
        ) : (
          <p>No earlier visit on record.</p>
        )}
      </div>

      {b.lastReadings.length > 0 && (
        <div className="overflow-x-auto">
          <table className="w-full text-left tabular-nums">
            <caption className="text-left text-slate">Last readings per circuit</caption>
            <thead>
              <tr className="text-xs text-slate">
                <th scope="col" className="pr-3 font-medium">
                  Circuit
                </th>
                <th scope="col" className="pr-3 font-medium">
                  Suction, superheat
                </th>
                <th scope="col" className="font-medium">
                  Liquid, subcooling
                </th>
              </tr>
            </thead>
            <tbody className="[&_td]:pb-1.5 [&_td]:align-top [&_th]:pb-1.5 [&_th]:align-top">
              {b.lastReadings.map((x) => {
                const fromDischarge = x.liquidPressure === null && x.dischargePressure !== null;
                return (
                  <tr key={x.id}>
                    <th scope="row" className="whitespace-nowrap pr-3 font-normal">
                      {x.circuitNumber}
                      <span className="block text-xs text-slate">{formatInZone(x.takenAt, timeZone, 'd MMM')}</span>
                    </th>
                    <td className="whitespace-nowrap pr-3">
                      {m(x.suctionPressure, 'pressure', x.units)}
                      <span className="block text-xs">superheat {m(x.superheat, 'temperatureDifference', x.units)}</span>
                    </td>
                    <td className="whitespace-nowrap">
                      {m(fromDischarge ? x.dischargePressure : x.liquidPressure, 'pressure', x.units)}
                      {fromDischarge && <span className="text-xs text-slate"> (discharge)</span>}
                      <span className="block text-xs">subcooling {m(x.subcooling, 'temperatureDifference', x.units)}</span>
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          {readingsElevationNote(b.lastReadings, unitSystemOf(b.units) ?? 'imperial') && (
            <p className="text-xs text-slate">{readingsElevationNote(b.lastReadings, unitSystemOf(b.units) ?? 'imperial')}</p>
          )}
        </div>
      )}

      {b.circuits.some((c) => c.targets?.superheat || c.targets?.subcooling) && (
        <div className="flex flex-col gap-1">
          <p className="font-medium">Target ranges</p>
          <ul className="flex flex-col gap-1">
            {b.circuits.map((c) => {
              const last = b.lastReadings.find((x) => x.circuitId === c.id);
              const lines = targetLines(
                c.targets,
                b.units.temperature,
                { superheat: last?.superheat ?? null, subcooling: last?.subcooling ?? null },
                b.units,
              );
              if (lines.length === 0) return null;
              return (
                <li key={c.id}>
                  <span className="text-xs text-slate">
                    Circuit {c.number}
                    {last ? ', last readings' : ''}
                    {c.targets.source ? ` — from ${c.targets.source}` : ''}
                  </span>
                  <TargetRangeList lines={lines} label={`Target ranges, circuit ${c.number}`} />
                </li>
              );
            })}
          </ul>
          <p className="text-xs text-slate">{targetRangeCaution}</p>
        </div>
      )}

      {b.photos.length > 0 && (
        <ul className="flex flex-wrap gap-2" aria-label="Photos of the unit">
          {b.photos.map((a) => (
            <li key={a.id}>
              <AttachmentThumb a={a} />
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
