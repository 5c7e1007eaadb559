/**
 * A circuit's target ranges (the manufacturer's target superheat and subcooling) as words and types, free of
 * zod so a screen can show them without loading a schema; the form's and route's schema is
 * `circuitTargetsInputSchema` in `sites.ts`, the rule below / within / above is `targetVerdict` in @coilpath/calc.
 */
import type { TemperatureUnit } from './measure';

/**
 * Plausible bounds of a target superheat or subcooling (a temperature *difference*): 0 to 50 °F, in SI
 * 0 to 27.7 K (50 °F is 27.78 K; the SI bound stays inside the imperial one). Common practice, no source:
 * charging tables ask for a few degrees to a few tens; a target outside these is a typing error.
 */
export const targetRangeLimits: Record<TemperatureUnit, { min: number; max: number }> = {
  F: { min: 0, max: 50 },
  C: { min: 0, max: 27.7 },
};

export const circuitTargetKinds = ['superheat', 'subcooling'] as const;
export type CircuitTargetKind = (typeof circuitTargetKinds)[number];
export const circuitTargetKindLabels: Record<CircuitTargetKind, string> = { superheat: 'Superheat', subcooling: 'Subcooling' };

/** A range as the API answers it, in the unit branch's system (°F or K). */
export interface TargetRange {
  min: number;
  max: number;
}
/** A circuit's target ranges as the API answers them: in the unit branch's system (°F or K), null where none is set. */
export interface CircuitTargets {
  superheat: TargetRange | null;
  subcooling: TargetRange | null;
  source: string | null;
}

/** `PUT /api/units/:id/circuits/:number/targets` answers the circuit's ranges as saved. */
export interface CircuitTargetsResult {
  unitId: string;
  circuit: number;
  targets: CircuitTargets;
}

/** Where a computed superheat or subcooling lies against the circuit's target range (`targetVerdict` in @coilpath/calc). */
export const targetVerdictLabels = { below: 'below target', within: 'within target', above: 'above target' } as const;
/** The caution shown beside a target range. */
export const targetRangeCaution =
  'The target range is guidance from the unit’s data as recorded in Coilpath. The manufacturer’s charging data and licensed practice decide the charge.';
