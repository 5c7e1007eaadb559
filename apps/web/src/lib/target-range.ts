/**
 * A circuit's target ranges against its computed superheat and subcooling, as a screen says it: the range in
 * the units shown, and below / within / above (`targetVerdict` in @coilpath/calc, the one rule). Shared by the
 * Visit screen's sticky bar and the Route briefing.
 */
import { convertTemperatureDifference, targetVerdict, type TargetVerdict } from '@coilpath/calc';
import { formatMeasure } from '@coilpath/contract/measure';
import { circuitTargetKindLabels, circuitTargetKinds, targetVerdictLabels } from '@coilpath/contract/target-range';
import type { CircuitTargetKind, CircuitTargets, ReadingUnits, TemperatureUnit } from '@coilpath/contract';

export interface TargetLine {
  kind: CircuitTargetKind;
  /** "Superheat target 8.0–12.0 °F" */
  range: string;
  /** Null while no value is computed. */
  verdict: TargetVerdict | null;
  /** "within target", "below target", "above target"; null with no verdict. */
  verdictText: string | null;
}

/**
 * One line per target range the circuit has. `targets` are in `from` (the unit branch's temperature unit, as the
 * API answers them); values and the lines are in `units` (what the screen reads in).
 */
export function targetLines(
  targets: CircuitTargets | null | undefined,
  from: TemperatureUnit,
  values: Partial<Record<CircuitTargetKind, number | null>>,
  units: ReadingUnits,
): TargetLine[] {
  if (!targets) return [];
  const d = (x: number) => convertTemperatureDifference(x, from, units.temperature);
  return circuitTargetKinds.flatMap((kind) => {
    const r = targets[kind];
    if (!r) return [];
    const range = { min: d(r.min), max: d(r.max) };
    const shown = (x: number) => formatMeasure(x, 'temperatureDifference', units).split(' ')[0];
    const verdict = targetVerdict(values[kind] ?? null, range);
    return [
      {
        kind,
        range: `${circuitTargetKindLabels[kind]} target ${shown(range.min)}–${formatMeasure(range.max, 'temperatureDifference', units)}`,
        verdict,
        verdictText: verdict ? targetVerdictLabels[verdict] : null,
      },
    ];
  });
}
