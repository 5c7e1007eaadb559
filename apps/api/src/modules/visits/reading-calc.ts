import { subcooling, superheat } from '@coilpath/calc';

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

const round1 = (n: number) => Math.round(n * 10) / 10;
const given = (n: number | null | undefined): n is number => typeof n === 'number' && Number.isFinite(n);

/**
 * Saturation temperatures, superheat (dew point at suction pressure) and subcooling (bubble point at
 * liquid pressure, or discharge pressure when no liquid pressure was taken) with @coilpath/calc.
 * A value outside the refrigerant's table, or an unknown refrigerant, leaves that result empty.
 */
export function computeReading(refrigerant: string, r: ReadingValues): ReadingComputed {
  const out: ReadingComputed = { suctionSaturationTemp: null, liquidSaturationTemp: null, superheat: null, subcooling: null };
  if (given(r.suctionPressure) && given(r.suctionLineTemp)) {
    try {
      const s = superheat({ refrigerant, suctionPressure: r.suctionPressure, suctionLineTemp: r.suctionLineTemp });
      out.suctionSaturationTemp = round1(s.saturationTemp);
      out.superheat = round1(s.superheat);
    } catch {
      /* outside the table: left empty */
    }
  }
  const high = given(r.liquidPressure) ? r.liquidPressure : given(r.dischargePressure) ? r.dischargePressure : null;
  if (high !== null && given(r.liquidLineTemp)) {
    try {
      const s = subcooling({ refrigerant, liquidPressure: high, liquidLineTemp: r.liquidLineTemp });
      out.liquidSaturationTemp = round1(s.saturationTemp);
      out.subcooling = round1(s.subcooling);
    } catch {
      /* outside the table: left empty */
    }
  }
  return out;
}
