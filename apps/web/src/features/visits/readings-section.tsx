import { useMemo } from 'react';
import { AlertTriangle, CheckCircle2 } from 'lucide-react';
import { pressureRange, sensorCheck, subcooling, superheat } from '@coilpath/calc';
import type { ReadingDto, ReadingInput, VisitDetail, VisitUnitDto } from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { Card, SafetyNote } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import type { VisitDraft } from './draft';
import { SaveStatus } from './save-status';
import { useSaveReadings } from './visit-api';

const fields = [
  'suctionPressure',
  'suctionPressureController',
  'suctionLineTemp',
  'liquidPressure',
  'liquidPressureController',
  'liquidLineTemp',
  'dischargePressure',
  'dischargePressureController',
  'outdoorTemp',
] as const;
type Field = (typeof fields)[number];

const labels: Record<Field, [string, 'psig' | '°F']> = {
  suctionPressure: ['Suction pressure', 'psig'],
  suctionPressureController: ['Suction pressure on the controller', 'psig'],
  suctionLineTemp: ['Suction line temperature', '°F'],
  liquidPressure: ['Liquid pressure', 'psig'],
  liquidPressureController: ['Liquid pressure on the controller', 'psig'],
  liquidLineTemp: ['Liquid line temperature', '°F'],
  dischargePressure: ['Discharge pressure', 'psig'],
  dischargePressureController: ['Discharge pressure on the controller', 'psig'],
  outdoorTemp: ['Outdoor air temperature', '°F'],
};

const fmt = (n: number) => (Math.round(n * 10) / 10).toFixed(1);
const num = (s: string | undefined): number | null => {
  if (s === undefined || s.trim() === '') return null;
  const n = Number(s.replace(',', '.'));
  return Number.isFinite(n) ? n : null;
};

function fromServer(r: ReadingDto | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  if (!r) return out;
  for (const f of fields) if (r[f] !== null) out[f] = String(r[f]);
  return out;
}

function NumberInput({ id, label, value, onChange, disabled }: { id: string; label: string; value: string; onChange(v: string): void; disabled: boolean }) {
  const invalid = value.trim() !== '' && num(value) === null;
  return (
    <div className="flex h-full flex-col justify-end gap-1">
      <label htmlFor={id} className="text-sm font-medium">
        {label}
      </label>
      <input
        id={id}
        inputMode="decimal"
        autoComplete="off"
        disabled={disabled}
        value={value}
        aria-invalid={invalid || undefined}
        onChange={(e) => onChange(e.target.value)}
        className="min-h-12 w-full rounded-md border border-slate-line bg-white px-3 text-lg tabular-nums aria-[invalid=true]:border-alarm disabled:bg-slate-faint"
      />
      {invalid && <span className="text-sm text-alarm">Enter a number</span>}
    </div>
  );
}

function SensorMark({ controller, reference, branch }: { controller: number | null; reference: number | null; branch: VisitDetail['branch'] }) {
  if (controller === null || reference === null) return null;
  const c = sensorCheck({
    controllerValue: controller,
    referenceValue: reference,
    tolerancePercent: branch.sensorTolerancePercent,
    toleranceAbsolute: branch.sensorToleranceAbsolute,
  });
  const diff = `${c.difference >= 0 ? '+' : '−'}${fmt(Math.abs(c.difference))} psi${c.percent === null ? '' : `, ${fmt(Math.abs(c.percent))} %`}`;
  return c.withinTolerance ? (
    <p className="inline-flex items-center gap-1 text-sm text-ok">
      <CheckCircle2 className="size-4" aria-hidden="true" /> Sensor within tolerance ({diff})
    </p>
  ) : (
    <p className="inline-flex items-center gap-1 text-sm font-medium text-alarm">
      <AlertTriangle className="size-4" aria-hidden="true" /> Sensor outside tolerance ({diff}; allowed {branch.sensorToleranceAbsolute} psi or{' '}
      {branch.sensorTolerancePercent} %)
    </p>
  );
}

function Computed({ refrigerant, v, where }: { refrigerant: string; v: Record<string, string>; where: string }) {
  const sp = num(v.suctionPressure);
  const st = num(v.suctionLineTemp);
  const high = num(v.liquidPressure) ?? num(v.dischargePressure);
  const lt = num(v.liquidLineTemp);
  let range: { min: number; max: number } | null = null;
  try {
    range = pressureRange(refrigerant);
  } catch {
    range = null;
  }
  const out: { key: string; text: string; detail: string; error?: boolean }[] = [];
  if (sp !== null && st !== null) {
    try {
      const s = superheat({ refrigerant, suctionPressure: sp, suctionLineTemp: st });
      out.push({ key: 'sh', text: `Superheat ${fmt(s.superheat)} °F`, detail: `line ${fmt(st)} °F − dew ${fmt(s.saturationTemp)} °F` });
    } catch {
      out.push({ key: 'sh', text: 'Superheat cannot be computed', detail: range ? `${refrigerant} table covers ${fmt(range.min)} to ${fmt(range.max)} psig` : `${refrigerant} is not in Coilpath’s tables`, error: true });
    }
  }
  if (high !== null && lt !== null) {
    try {
      const s = subcooling({ refrigerant, liquidPressure: high, liquidLineTemp: lt });
      out.push({ key: 'sc', text: `Subcooling ${fmt(s.subcooling)} °F`, detail: `bubble ${fmt(s.saturationTemp)} °F − line ${fmt(lt)} °F${num(v.liquidPressure) === null ? ' (from discharge pressure)' : ''}` });
    } catch {
      out.push({ key: 'sc', text: 'Subcooling cannot be computed', detail: range ? `${refrigerant} table covers ${fmt(range.min)} to ${fmt(range.max)} psig` : `${refrigerant} is not in Coilpath’s tables`, error: true });
    }
  }
  if (!out.length) return <p className="text-sm text-slate">Enter a pressure and its line temperature to see superheat and subcooling.</p>;
  return (
    <div className="flex flex-col gap-2 sm:flex-row sm:gap-6">
      {out.map((o) => (
        <div key={o.key}>
          <output aria-label={`${o.text.split(' ')[0]}, ${where}`} className={`block text-xl font-semibold tabular-nums ${o.error ? 'text-alarm' : 'text-ink'}`}>
            {o.text}
          </output>
          <span className="text-sm text-slate tabular-nums">({o.detail})</span>
        </div>
      ))}
    </div>
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
  const save = useSaveReadings(visit.id);
  const multi = visit.units.length > 1;
  const byCircuit = useMemo(() => new Map(visit.readings.map((r) => [r.circuitId, r])), [visit.readings]);
  const values = (circuitId: string): Record<string, string> =>
    draft.readingsDirty ? (draft.readings[circuitId] ?? fromServer(byCircuit.get(circuitId))) : fromServer(byCircuit.get(circuitId));

  const setField = (circuitId: string, f: Field, v: string) =>
    update((d) => {
      const all: Record<string, Record<string, string>> = {};
      for (const u of visit.units) for (const c of u.circuits) all[c.id] = d.readingsDirty ? (d.readings[c.id] ?? fromServer(byCircuit.get(c.id))) : fromServer(byCircuit.get(c.id));
      all[circuitId] = { ...all[circuitId], [f]: v };
      return { ...d, readings: all, readingsDirty: true };
    });

  const payload = (): ReadingInput[] => {
    const out: ReadingInput[] = [];
    for (const u of visit.units)
      for (const c of u.circuits) {
        const v = values(c.id);
        const entry: ReadingInput = { circuitId: c.id };
        let any = false;
        for (const f of fields) {
          const n = num(v[f]);
          if (n !== null) {
            entry[f] = n;
            any = true;
          }
        }
        if (any) out.push(entry);
      }
    return out;
  };

  const submit = () => {
    const readings = payload();
    if (!readings.length) {
      notify('Enter at least one reading before saving.', 'alarm');
      return;
    }
    save.mutate(
      { readings },
      {
        onSuccess: () => {
          update((d) => ({ ...d, readings: {}, readingsDirty: false, savedAt: new Date().toISOString() }));
          notify(`Readings saved for ${readings.length} circuit${readings.length === 1 ? '' : 's'}.`);
        },
        onError: (e) => notify(`Readings not saved: ${errorMessage(e)}`, 'alarm'),
      },
    );
  };

  const circuitsCount = visit.units.reduce((n, u) => n + u.circuits.length, 0);
  return (
    <Card title="Readings">
      <div className="flex flex-col gap-4">
        <SafetyNote />
        {circuitsCount === 0 && <p className="text-sm text-slate">This visit’s units have no circuits on file, so there is nothing to read here. The office can add circuits in the Unit file.</p>}
        {visit.units.map((u: VisitUnitDto) =>
          u.circuits.map((c) => {
            const where = multi ? `${u.tag} circuit ${c.number}` : `circuit ${c.number}`;
            const v = values(c.id);
            const input = (f: Field) => (
              <NumberInput
                key={f}
                id={`r-${c.id}-${f}`}
                label={`${labels[f][0]}, ${where} (${labels[f][1]})`}
                value={v[f] ?? ''}
                disabled={!visit.canWrite}
                onChange={(val) => setField(c.id, f, val)}
              />
            );
            return (
              <fieldset key={c.id} className="rounded-md border border-slate-line p-3">
                <legend className="px-1 text-base font-semibold">
                  {multi ? `${u.tag} · ` : ''}Circuit {c.number} <span className="text-sm font-normal text-slate">({u.refrigerant})</span>
                </legend>
                <div className="flex flex-col gap-4">
                  <div className="grid grid-cols-2 items-end gap-3 lg:grid-cols-3">
                    {input('suctionPressure')}
                    {input('suctionPressureController')}
                    <div className="col-span-2 lg:col-span-1">
                      <SensorMark controller={num(v.suctionPressureController)} reference={num(v.suctionPressure)} branch={visit.branch} />
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
                      <SensorMark controller={num(v.liquidPressureController)} reference={num(v.liquidPressure)} branch={visit.branch} />
                    </div>
                  </div>
                  <div className="grid grid-cols-2 items-end gap-3 lg:grid-cols-3">{input('liquidLineTemp')}</div>
                  <div className="grid grid-cols-2 items-end gap-3 lg:grid-cols-3">
                    {input('dischargePressure')}
                    {input('dischargePressureController')}
                    <div className="col-span-2 lg:col-span-1">
                      <SensorMark controller={num(v.dischargePressureController)} reference={num(v.dischargePressure)} branch={visit.branch} />
                    </div>
                  </div>
                </div>
                <div className="mt-3 rounded-md bg-frost p-3">
                  <Computed refrigerant={u.refrigerant} v={v} where={where} />
                </div>
              </fieldset>
            );
          }),
        )}
        {visit.canWrite && circuitsCount > 0 && (
          <div className="flex flex-col gap-2 sm:flex-row sm:items-center sm:justify-between">
            <SaveStatus
              pending={save.isPending}
              failureCount={save.failureCount}
              paused={save.isPaused}
              error={save.error}
              dirty={draft.readingsDirty}
              savedText={visit.readings.length ? 'Readings saved' : 'No readings yet'}
              onRetry={submit}
            />
            <Button size="lg" onClick={submit} busy={save.isPending}>
              Save readings
            </Button>
          </div>
        )}
      </div>
    </Card>
  );
}
