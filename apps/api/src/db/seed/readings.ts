import type { UnitKind } from '@coilpath/contract';
import type { Rng } from './random';

/**
 * Approximate pressure–temperature points (psig at °F) used only to make demo readings look like a
 * running system. They are not Coilpath's saturation data: the API computes saturation, superheat and
 * subcooling from @coilpath/calc when readings are saved, so the seed leaves those columns empty.
 */
const TEMPS = [-20, 0, 20, 40, 60, 80, 100, 120, 130];
const BASE: Record<string, number[]> = {
  'R-410A': [26, 48, 78, 118, 170, 236, 317, 418, 476],
  'R-22': [10, 24, 43, 69, 102, 144, 196, 260, 297],
  'R-134a': [-2, 6.5, 18.4, 35, 57.4, 87, 124, 171, 199],
  'R-404A': [17, 33, 55, 86, 125, 176, 238, 313, 357],
};
/** Blends and near-equivalents scaled from a base fluid: [base, suction (dew) factor, liquid (bubble) factor]. */
const SCALED: Record<string, [string, number, number]> = {
  'R-410A': ['R-410A', 1, 1],
  'R-32': ['R-410A', 1.03, 1.03],
  'R-454B': ['R-410A', 0.92, 0.94],
  'R-22': ['R-22', 1, 1],
  'R-407C': ['R-22', 0.97, 1.1],
  'R-134a': ['R-134a', 1, 1],
  'R-513A': ['R-134a', 1.1, 1.1],
  'R-1234yf': ['R-134a', 1.05, 1.02],
  'R-404A': ['R-404A', 1, 1],
  'R-507A': ['R-404A', 1.04, 1.04],
  'R-448A': ['R-404A', 0.8, 0.98],
};

function interpolate(points: number[], t: number): number {
  for (let i = 0; i < TEMPS.length - 1; i++) {
    const t0 = TEMPS[i]!;
    const t1 = TEMPS[i + 1]!;
    if (t <= t1 || i === TEMPS.length - 2) {
      const p0 = points[i]!;
      const p1 = points[i + 1]!;
      return p0 + ((p1 - p0) * (t - t0)) / (t1 - t0);
    }
  }
  return points[points.length - 1]!;
}

export function approxPressure(refrigerant: string, tempF: number, side: 'suction' | 'liquid'): number {
  const [base, fs, fl] = SCALED[refrigerant] ?? ['R-410A', 1, 1];
  return interpolate(BASE[base]!, tempF) * (side === 'suction' ? fs : fl);
}

/** Evaporating temperature range (°F) by equipment kind. */
function evaporating(kind: UnitKind, rng: Rng): number {
  switch (kind) {
    case 'walk_in_freezer':
      return rng.range(-22, -12);
    case 'condensing_unit':
      return rng.range(-20, -10);
    case 'ice_machine':
      return rng.range(-2, 8);
    case 'walk_in_cooler':
    case 'reach_in':
      return rng.range(18, 27);
    case 'chiller':
      return rng.range(35, 41);
    default:
      return rng.range(38, 46);
  }
}

/**
 * How a circuit reads. `low_charge`: high superheat, low subcooling. `sensor_drift`: the controller's suction
 * reading well above the gauge. `recharged` and `sensor_elsewhere` read like `normal` (after a leak repair; a
 * sensor fault that the gauge readings do not show) but make the same draws as `low_charge` and
 * `sensor_drift`, so that choosing between them leaves the rest of the scenario as it was.
 */
export type CircuitCondition = 'normal' | 'low_charge' | 'recharged' | 'sensor_drift' | 'sensor_elsewhere';

export interface ReadingValues {
  suctionPressure: number;
  liquidPressure: number;
  dischargePressure: number | null;
  suctionLineTemp: number;
  liquidLineTemp: number;
  outdoorTemp: number;
  suctionPressureController: number | null;
  liquidPressureController: number | null;
  dischargePressureController: number | null;
  notes: string | null;
}

const r1 = (x: number) => Math.round(x * 10) / 10;

/** One circuit's gauge readings, with what the unit's own controller showed beside them. */
export function circuitReading(
  rng: Rng,
  unit: { kind: UnitKind; refrigerant: string },
  outdoorTemp: number,
  condition: CircuitCondition,
): ReadingValues {
  const refrigeration = ['walk_in_cooler', 'walk_in_freezer', 'reach_in', 'condensing_unit', 'ice_machine'].includes(unit.kind);
  let tEvap = evaporating(unit.kind, rng);
  let superheat = rng.range(8, 14);
  let subcooling = rng.range(8, 14);
  if (condition === 'low_charge' || condition === 'recharged') {
    const drop = rng.range(6, 10);
    const shortSuperheat = rng.range(22, 32);
    const shortSubcooling = rng.range(1.5, 4.5);
    if (condition === 'low_charge') {
      tEvap -= drop;
      superheat = shortSuperheat;
      subcooling = shortSubcooling;
    }
  }
  // Head pressure control keeps condensing temperature up on cool days.
  const tCond = Math.max(outdoorTemp + rng.range(15, 25), refrigeration ? 90 : 82);
  const suction = Math.round(approxPressure(unit.refrigerant, tEvap, 'suction'));
  const liquid = Math.round(approxPressure(unit.refrigerant, tCond, 'liquid'));
  const hasController = unit.kind !== 'reach_in' && unit.kind !== 'ice_machine' && unit.kind !== 'split_system';
  const discharge = unit.kind === 'chiller' || unit.kind === 'rooftop_unit' ? liquid + rng.int(4, 12) : null;
  const off = () => rng.pick([-1, 1]) * rng.int(0, 4);
  let suctionCtl = hasController ? suction + off() : null;
  let notes: string | null = null;
  if ((condition === 'sensor_drift' || condition === 'sensor_elsewhere') && suctionCtl !== null) {
    const drift = rng.int(21, 34);
    if (condition === 'sensor_drift') {
      suctionCtl = suction + drift;
      notes = 'Controller suction reading well above gauge; transducer suspect.';
    }
  } else if (condition === 'low_charge') {
    notes = 'High superheat and low subcooling: circuit short of charge.';
  }
  return {
    suctionPressure: suction,
    liquidPressure: liquid,
    dischargePressure: discharge,
    suctionLineTemp: r1(tEvap + superheat),
    liquidLineTemp: r1(tCond - subcooling),
    outdoorTemp: Math.round(outdoorTemp),
    suctionPressureController: suctionCtl,
    liquidPressureController: hasController ? liquid + off() : null,
    dischargePressureController: hasController && discharge !== null ? discharge + off() : null,
    notes,
  };
}
