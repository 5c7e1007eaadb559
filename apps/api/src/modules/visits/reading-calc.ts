import { atmosphericPressureAt, convertPressure, convertTemperature, subcooling, superheat } from '@coilpath/calc';
import { readingPressureFields, readingTemperatureFields, type ReadingInput, type ReadingUnits } from '@coilpath/contract';

/** The stored (canonical) units of `readings`: psig and °F; superheat and subcooling in °F (a difference). */
export const STORED_UNITS: ReadingUnits = { pressure: 'psig', temperature: 'F' };

export interface ReadingValues {
  suctionPressure?: number | null | undefined;
  liquidPressure?: number | null | undefined;
  dischargePressure?: number | null | undefined;
  suctionLineTemp?: number | null | undefined;
  liquidLineTemp?: number | null | undefined;
}

export interface ReadingComputed {
  suctionSaturationTemp: number | null;
  liquidSaturationTemp: number | null;
  superheat: number | null;
  subcooling: number | null;
}

type Measured = Pick<ReadingInput, (typeof readingPressureFields)[number] | (typeof readingTemperatureFields)[number]>;

const given = (n: number | null | undefined): n is number => typeof n === 'number' && Number.isFinite(n);

/**
 * A reading's gauge and line values converted from the units the body stated to the stored psig/°F
 * (@coilpath/calc, exact factors, not rounded: a value typed in kPa(g) comes back as typed).
 */
export function toStoredUnits(r: Measured, from: ReadingUnits): Required<{ [K in keyof Measured]: number | null }> {
  const p = (x: number | null | undefined) => (given(x) ? convertPressure(x, from.pressure, STORED_UNITS.pressure) : null);
  const t = (x: number | null | undefined) => (given(x) ? convertTemperature(x, from.temperature, STORED_UNITS.temperature) : null);
  return {
    suctionPressure: p(r.suctionPressure),
    liquidPressure: p(r.liquidPressure),
    dischargePressure: p(r.dischargePressure),
    suctionPressureController: p(r.suctionPressureController),
    liquidPressureController: p(r.liquidPressureController),
    dischargePressureController: p(r.dischargePressureController),
    suctionLineTemp: t(r.suctionLineTemp),
    liquidLineTemp: t(r.liquidLineTemp),
    outdoorTemp: t(r.outdoorTemp),
  };
}

/**
 * Saturation temperatures, superheat (dew point at suction pressure) and subcooling (bubble point at
 * liquid pressure, or discharge pressure when no liquid pressure was taken) with @coilpath/calc, from
 * values in psig/°F. Kept at full precision: the answer rounds in the units it shows.
 * A value outside the refrigerant's table, or an unknown refrigerant, leaves that result empty.
 *
 * Gauge pressures are made absolute with the standard atmosphere at the branch's elevation
 * (`atmosphericPressureAt`, ISA / ISO 2533): at 1,609 m that is 83.4 kPa, not sea level's 101.325.
 */
export function computeReading(refrigerant: string, r: ReadingValues, at: { elevationMeters?: number } = {}): ReadingComputed {
  const out: ReadingComputed = { suctionSaturationTemp: null, liquidSaturationTemp: null, superheat: null, subcooling: null };
  const atmosphericPressureKPa = atmosphericPressureAt(at.elevationMeters ?? 0);
  if (given(r.suctionPressure) && given(r.suctionLineTemp)) {
    try {
      const s = superheat({ refrigerant, suctionPressure: r.suctionPressure, suctionLineTemp: r.suctionLineTemp, atmosphericPressureKPa });
      out.suctionSaturationTemp = s.saturationTemp;
      out.superheat = s.superheat;
    } catch {
      /* outside the table: left empty */
    }
  }
  const high = given(r.liquidPressure) ? r.liquidPressure : given(r.dischargePressure) ? r.dischargePressure : null;
  if (high !== null && given(r.liquidLineTemp)) {
    try {
      const s = subcooling({ refrigerant, liquidPressure: high, liquidLineTemp: r.liquidLineTemp, atmosphericPressureKPa });
      out.liquidSaturationTemp = s.saturationTemp;
      out.subcooling = s.subcooling;
    } catch {
      /* outside the table: left empty */
    }
  }
  return out;
}
