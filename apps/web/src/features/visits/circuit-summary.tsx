import { AlertTriangle, CheckCircle2 } from 'lucide-react';
import { formatMeasure } from '@coilpath/contract/measure';
import type { CircuitTargets, ReadingUnits, TemperatureUnit } from '@coilpath/contract';
import { TargetRangeList } from '@/components/target-range';
import { targetLines } from '@/lib/target-range';
import { liveValues, parseEntry, sensorCheckView, type LiveSide, type LiveValues } from './reading-units';

type Branch = { sensorTolerancePercent: number; sensorToleranceAbsolute: number; elevationMeters: number };

const sensorPairs = [
  ['suction', 'Suction', 'suctionPressureController', 'suctionPressure'],
  ['liquid', 'Liquid', 'liquidPressureController', 'liquidPressure'],
  ['discharge', 'Discharge', 'dischargePressureController', 'dischargePressure'],
] as const;

const num = (s: string | undefined) => {
  const n = parseEntry(s);
  return n === null || Number.isNaN(n) ? null : n;
};

function Figure({
  label,
  name,
  side,
  pick,
  units,
  kind,
  live,
}: {
  label: string;
  /** The accessible name ("Superheat, circuit 1"). */
  name: string;
  side: LiveSide | undefined;
  pick: 'saturation' | 'value';
  units: ReadingUnits;
  kind: 'temperature' | 'temperatureDifference';
  /** Announced as it changes (superheat, subcooling); the saturation temperatures are read, not announced. */
  live: boolean;
}) {
  const text = !side ? '—' : side.ok ? formatMeasure(side[pick], kind, units) : 'out of table';
  return (
    <div className="min-w-0">
      <dt className="truncate text-xs text-slate">{label}</dt>
      <dd>
        <output
          aria-label={name}
          aria-live={live ? undefined : 'off'}
          className={`block truncate text-base font-semibold tabular-nums ${side && !side.ok ? 'text-alarm' : 'text-ink'}`}
        >
          {text}
        </output>
      </dd>
    </div>
  );
}

/**
 * The circuit's computed values, kept in view while the technician types (sticky under the header): the
 * dew and bubble points, superheat and subcooling (calc, through `liveValues`), and the controller against
 * the gauge (`sensorCheckView`, the branch's tolerance), and the circuit's target ranges with below / within /
 * above (`targetLines`, calc's `targetVerdict`). Nothing is computed here.
 */
export function CircuitSummary({
  title,
  where,
  refrigerant,
  values,
  units,
  branch,
  targets,
  targetsUnit,
}: {
  /** "RTU-1 · Circuit 2" */
  title: string;
  /** "RTU-1 circuit 2": names the figures for a screen reader. */
  where: string;
  refrigerant: string;
  values: Record<string, string>;
  units: ReadingUnits;
  branch: Branch;
  /** The circuit's target ranges (absent in answers kept from before they existed), in `targetsUnit`. */
  targets?: CircuitTargets | null;
  /** The unit of `targets` (the unit branch's system); the screen's own unit when not given. */
  targetsUnit?: TemperatureUnit;
}) {
  const live = liveValues(refrigerant, values, units, branch.elevationMeters);
  const value = (side: LiveValues['superheat']) => (side?.ok ? side.value : null);
  const targetList = targetLines(
    targets,
    targetsUnit ?? units.temperature,
    { superheat: value(live.superheat), subcooling: value(live.subcooling) },
    units,
  );
  const sensors = sensorPairs.flatMap(([key, label, controller, gauge]) => {
    const view = sensorCheckView(num(values[controller]), num(values[gauge]), units, branch);
    return view ? [{ key, label, view }] : [];
  });
  return (
    <div
      role="group"
      aria-label={`Computed values, ${where}`}
      data-testid="circuit-summary"
      className="sticky top-14 z-20 -mx-3 -mt-1 mb-3 border-b border-slate-line bg-frost px-3 py-2 shadow-sm"
    >
      <p className="text-xs font-medium text-slate">
        {title} · {refrigerant}
      </p>
      <dl className="grid grid-cols-4 gap-2">
        <Figure
          label="Dew point"
          name={`Suction saturation, ${where}`}
          side={live.superheat}
          pick="saturation"
          units={units}
          kind="temperature"
          live={false}
        />
        <Figure
          label="Superheat"
          name={`Superheat, ${where}`}
          side={live.superheat}
          pick="value"
          units={units}
          kind="temperatureDifference"
          live
        />
        <Figure
          label="Bubble point"
          name={`Liquid saturation, ${where}`}
          side={live.subcooling}
          pick="saturation"
          units={units}
          kind="temperature"
          live={false}
        />
        <Figure
          label="Subcooling"
          name={`Subcooling, ${where}`}
          side={live.subcooling}
          pick="value"
          units={units}
          kind="temperatureDifference"
          live
        />
      </dl>
      <TargetRangeList lines={targetList} label={`Target ranges, ${where}`} className="mt-1" />
      {sensors.length > 0 && (
        <ul aria-label={`Controller against gauge, ${where}`} className="mt-1 flex flex-wrap gap-x-3 gap-y-0.5 text-xs tabular-nums">
          {sensors.map(({ key, label, view }) => (
            <li key={key} className={`inline-flex items-center gap-1 ${view.withinTolerance ? 'text-ok' : 'font-semibold text-alarm'}`}>
              {view.withinTolerance ? (
                <CheckCircle2 className="size-3.5 shrink-0" aria-hidden="true" />
              ) : (
                <AlertTriangle className="size-3.5 shrink-0" aria-hidden="true" />
              )}
              {label} controller {view.difference} · {view.withinTolerance ? 'within' : 'outside'}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
