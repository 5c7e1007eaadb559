import { useMemo } from 'react';
import { onlineManager, useQueryClient } from '@tanstack/react-query';
import { AlertTriangle, CheckCircle2 } from 'lucide-react';
import { elevationNote, measureSymbol, readingUnitsBySystem } from '@coilpath/contract/measure';
import type { ReadingUnits, VisitDetail, VisitUnitDto } from '@coilpath/contract';
import { targetRangeCaution } from '@coilpath/contract/target-range';
import { Button } from '@/components/ui/button';
import { Card, SafetyNote } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import type { VisitDraft } from './draft';
import { SaveStatus } from './save-status';
import {
  computeLive,
  convertEntries,
  entriesFromReading,
  fieldKind,
  fieldLabel,
  parseEntry,
  readingsForm,
  sensorCheckView,
  toggleSign,
  type ReadingField,
} from './reading-units';
import { queueWrite, useOutbox } from '@/lib/visit-outbox';
import { useOnline } from '@/lib/online';
import { appNow } from '@/lib/now';
import { useEnterNext } from '@/components/ui/enter-next';
import { CircuitSummary } from './circuit-summary';

function NumberInput({
  id,
  label,
  value,
  onChange,
  disabled,
  error,
  signed,
}: {
  id: string;
  label: string;
  value: string;
  onChange(v: string): void;
  disabled: boolean;
  error: string | undefined;
  /** Offer a ± key: temperatures go below zero and a phone's decimal keypad has no minus. */
  signed?: boolean;
}) {
  return (
    <div className="flex h-full flex-col justify-end gap-1">
      <label htmlFor={id} className="text-sm font-medium">
        {label}
      </label>
      <div className="flex gap-1">
        <input
          id={id}
          inputMode="decimal"
          autoComplete="off"
          disabled={disabled}
          value={value}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : undefined}
          onChange={(e) => onChange(e.target.value)}
          className="min-h-12 w-full min-w-0 rounded-md border border-slate-line bg-white px-3 text-lg tabular-nums aria-[invalid=true]:border-alarm disabled:bg-slate-faint"
        />
        {signed && !disabled && (
          <button
            type="button"
            onClick={() => onChange(toggleSign(value))}
            aria-label={`Change the sign of ${label}`}
            title="Change the sign (below zero)"
            className="min-h-12 min-w-11 shrink-0 rounded-md border border-slate-line bg-white text-lg font-semibold text-ink hover:bg-frost focus-visible:outline-2 focus-visible:outline-coolant"
          >
            ±
          </button>
        )}
      </div>
      {error && (
        <span id={`${id}-error`} className="text-sm text-alarm">
          {error}
        </span>
      )}
    </div>
  );
}

function SensorMark({
  controller,
  reference,
  units,
  branch,
}: {
  controller: string | undefined;
  reference: string | undefined;
  units: ReadingUnits;
  branch: VisitDetail['branch'];
}) {
  const num = (s: string | undefined) => {
    const n = parseEntry(s);
    return n === null || Number.isNaN(n) ? null : n;
  };
  const c = sensorCheckView(num(controller), num(reference), units, branch);
  if (!c) return null;
  return c.withinTolerance ? (
    <p className="inline-flex items-center gap-1 text-sm text-ok">
      <CheckCircle2 className="size-4 shrink-0" aria-hidden="true" /> Sensor within tolerance ({c.difference})
    </p>
  ) : (
    <p className="inline-flex items-center gap-1 text-sm font-medium text-alarm">
      <AlertTriangle className="size-4 shrink-0" aria-hidden="true" /> Sensor outside tolerance ({c.difference}; allowed {c.allowed})
    </p>
  );
}

/** How the live figures were reached ("line 48.0 °F − dew 36.9 °F"), or why one cannot be computed; the figures are in the circuit's summary bar. */
function ComputedDetail({
  refrigerant,
  v,
  units,
  elevationMeters,
}: {
  refrigerant: string;
  v: Record<string, string>;
  units: ReadingUnits;
  elevationMeters: number;
}) {
  const out = computeLive(refrigerant, v, units, elevationMeters);
  if (!out.length) return <p className="text-sm text-slate">Enter a pressure and its line temperature to see superheat and subcooling.</p>;
  return (
    <ul className="flex flex-col gap-1 text-sm tabular-nums">
      {out.map((o) => (
        <li key={o.key} className={o.error ? 'text-alarm' : 'text-slate'}>
          {o.text}: {o.detail}
        </li>
      ))}
    </ul>
  );
}

export function ReadingsSection({
  visit,
  draft,
  update,
}: {
  visit: VisitDetail;
  draft: VisitDraft;
  update(fn: (d: VisitDraft) => VisitDraft): void;
}) {
  const notify = useNotify();
  const qc = useQueryClient();
  const online = useOnline();
  const { entries } = useOutbox(visit.id);
  const readingsWaiting = entries.some((e) => e.state === 'waiting' && e.write.kind === 'readings');
  const multi = visit.units.length > 1;
  const units = readingUnitsBySystem[visit.branch.unitSystem];
  const byCircuit = useMemo(() => new Map(visit.readings.map((r) => [r.circuitId, r])), [visit.readings]);
  const circuitIds = visit.units.flatMap((u) => u.circuits.map((c) => c.id));
  /** What the form shows for a circuit, in the branch's units (a draft typed in other units is converted). */
  const valuesIn = (d: VisitDraft, circuitId: string): Record<string, string> => {
    if (!d.readingsDirty) return entriesFromReading(byCircuit.get(circuitId));
    const typed = d.readings[circuitId];
    if (!typed) return entriesFromReading(byCircuit.get(circuitId));
    return convertEntries(typed, d.readingsUnits ?? readingUnitsBySystem.imperial, units);
  };
  const values = (circuitId: string) => valuesIn(draft, circuitId);

  const setField = (circuitId: string, f: ReadingField, v: string) =>
    update((d) => {
      const all: Record<string, Record<string, string>> = {};
      for (const id of circuitIds) all[id] = valuesIn(d, id);
      all[circuitId] = { ...all[circuitId], [f]: v };
      return { ...d, readings: all, readingsUnits: units, readingsDirty: true };
    });

  const form = readingsForm(circuitIds, values, units);

  const submit = () => {
    if (Object.keys(form.errors).length) {
      notify(
        `Readings not saved: ${Object.keys(form.errors).length === 1 ? 'a value needs' : 'some values need'} correcting (marked in red).`,
        'alarm',
      );
      return;
    }
    if (!form.body) {
      notify('Enter at least one reading before saving.', 'alarm');
      return;
    }
    const body = form.body;
    const count = `${body.readings.length} circuit${body.readings.length === 1 ? '' : 's'}`;
    // Through the outbox: the values show as saved on this phone at once and are sent in order (a resend replaces, never doubles).
    queueWrite(
      qc,
      { kind: 'readings', visitId: visit.id, body },
      {
        sent: () => notify(`Readings saved for ${count}.`),
        stopped: (e) => notify(`Readings not saved: ${e.problem?.message ?? 'refused'}`, 'alarm'),
      },
    ).then(
      () => {
        update((d) => ({ ...d, readings: {}, readingsUnits: undefined, readingsDirty: false, savedAt: appNow().toISOString() }));
        if (!onlineManager.isOnline()) notify(`Readings for ${count} kept on this phone; they are sent when the connection is back.`);
      },
      (e: unknown) => notify(`Readings not kept: ${errorMessage(e)}`, 'alarm'),
    );
  };

  // "Enter" in a reading moves to the next one; from the last, to "Save readings".
  const { attach: enterGroup, onKeyDown: enterNext } = useEnterNext<HTMLDivElement>();
  const circuitsCount = visit.units.reduce((n, u) => n + u.circuits.length, 0);
  const hasTargets = visit.units.some((u) => u.circuits.some((c) => c.targets?.superheat || c.targets?.subcooling));
  return (
    <Card title="Readings">
      <div ref={enterGroup} onKeyDown={enterNext} className="flex flex-col gap-4">
        {hasTargets ? (
          <SafetyNote>
            Readings guide diagnosis alongside the manufacturer’s charging data, local codes and licensed practice. {targetRangeCaution}{' '}
            Refrigerant work needs the proper EPA 608 certification.
          </SafetyNote>
        ) : (
          <SafetyNote />
        )}
        <p className="text-sm text-slate">
          {units.temperature === 'C'
            ? `Pressures in ${measureSymbol('pressure', units)}; temperatures in °C; superheat and subcooling in K`
            : `Pressures in ${measureSymbol('pressure', units)}; temperatures, superheat and subcooling in °F`}{' '}
          — {visit.branch.name}’s unit setting.
          {elevationNote(visit.branch.elevationMeters, visit.branch.unitSystem) && (
            <> {elevationNote(visit.branch.elevationMeters, visit.branch.unitSystem)}</>
          )}
        </p>
        {circuitsCount === 0 && (
          <p className="text-sm text-slate">
            This visit’s units have no circuits on file, so there is nothing to read here. The office can add circuits in the Unit file.
          </p>
        )}
        {visit.units.map((u: VisitUnitDto) =>
          u.circuits.map((c) => {
            const where = multi ? `${u.tag} circuit ${c.number}` : `circuit ${c.number}`;
            const v = values(c.id);
            const input = (f: ReadingField) => (
              <NumberInput
                key={f}
                id={`r-${c.id}-${f}`}
                label={fieldLabel(f, where, units)}
                value={v[f] ?? ''}
                disabled={!visit.canRecord}
                error={form.errors[`${c.id}.${f}`]}
                signed={fieldKind(f) === 'temperature'}
                onChange={(val) => setField(c.id, f, val)}
              />
            );
            return (
              <fieldset key={c.id} className="rounded-md border border-slate-line p-3">
                <legend className="px-1 text-base font-semibold">
                  {multi ? `${u.tag} · ` : ''}Circuit {c.number} <span className="text-sm font-normal text-slate">({u.refrigerant})</span>
                </legend>
                <CircuitSummary
                  title={`${multi ? `${u.tag} · ` : ''}Circuit ${c.number}`}
                  where={where}
                  refrigerant={u.refrigerant}
                  values={v}
                  units={units}
                  branch={visit.branch}
                  targets={c.targets}
                  targetsUnit={readingUnitsBySystem[visit.branch.unitSystem].temperature}
                />
                <div className="flex flex-col gap-4">
                  <div className="grid grid-cols-2 items-end gap-3 lg:grid-cols-3">
                    {input('suctionPressure')}
                    {input('suctionPressureController')}
                    <div className="col-span-2 lg:col-span-1">
                      <SensorMark
                        controller={v.suctionPressureController}
                        reference={v.suctionPressure}
                        units={units}
                        branch={visit.branch}
                      />
                    </div>
                  </div>
                  <div className="grid grid-cols-2 items-end gap-3 lg:grid-cols-3">
                    {input('suctionLineTemp')}
                    {input('outdoorTemp')}
                  </div>
                  <div className="grid grid-cols-2 items-end gap-3 lg:grid-cols-3">
                    {input('liquidPressure')}
                    {input('liquidPressureController')}
                    <div className="col-span-2 lg:col-span-1">
                      <SensorMark
                        controller={v.liquidPressureController}
                        reference={v.liquidPressure}
                        units={units}
                        branch={visit.branch}
                      />
                    </div>
                  </div>
                  <div className="grid grid-cols-2 items-end gap-3 lg:grid-cols-3">{input('liquidLineTemp')}</div>
                  <div className="grid grid-cols-2 items-end gap-3 lg:grid-cols-3">
                    {input('dischargePressure')}
                    {input('dischargePressureController')}
                    <div className="col-span-2 lg:col-span-1">
                      <SensorMark
                        controller={v.dischargePressureController}
                        reference={v.dischargePressure}
                        units={units}
                        branch={visit.branch}
                      />
                    </div>
                  </div>
                </div>
                <div className="mt-3 rounded-md bg-frost p-3">
                  <ComputedDetail refrigerant={u.refrigerant} v={v} units={units} elevationMeters={visit.branch.elevationMeters} />
                </div>
              </fieldset>
            );
          }),
        )}
        {visit.canRecord && circuitsCount > 0 && (
          <div className="flex flex-col gap-2 sm:flex-row sm:items-center sm:justify-between">
            <SaveStatus
              pending={readingsWaiting && online}
              failureCount={0}
              paused={readingsWaiting && !online}
              error={null}
              dirty={draft.readingsDirty}
              savedText={visit.readings.length ? 'Readings saved' : 'No readings yet'}
            />
            <Button size="lg" onClick={submit} data-enter-action>
              Save readings
            </Button>
          </div>
        )}
      </div>
    </Card>
  );
}
