import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { atmosphericPressureAt } from './atmosphere';
import {
  atmosphereFor,
  gaugeToAbsolute,
  isRefrigerantId,
  KPA_PER_PSI,
  listRefrigerants,
  pressureRange,
  refrigerantIds,
  refrigerantInfo,
  saturationPressure,
  saturationTemperature,
  subcooling,
  superheat,
  temperatureRange,
  type RefrigerantId,
} from './refrigerants';
import { saturationTables } from './saturation-data';

const ids = [...refrigerantIds];

describe('listRefrigerants', () => {
  it('lists the eleven ids in order with their facts', () => {
    const list = listRefrigerants();
    expect(list.map((r) => r.id)).toEqual([
      'R-410A',
      'R-32',
      'R-454B',
      'R-134a',
      'R-22',
      'R-404A',
      'R-407C',
      'R-448A',
      'R-513A',
      'R-507A',
      'R-1234yf',
    ]);
    for (const r of list) {
      expect(['A1', 'A2L']).toContain(r.safetyGroup);
      expect(r.gwp).toBeGreaterThan(0);
      expect(typeof r.name).toBe('string');
    }
  });

  it('has a table for every id', () => {
    expect(Object.keys(saturationTables).sort()).toEqual([...ids].sort());
  });

  it('hasGlide matches the tables: 0.5 °F or more between bubble and dew somewhere', () => {
    for (const r of listRefrigerants()) {
      const { min, max } = pressureRange(r.id, { point: 'bubble' });
      const dewRange = pressureRange(r.id, { point: 'dew' });
      let glide = 0;
      for (let p = Math.max(min, dewRange.min) + 1; p < Math.min(max, dewRange.max) - 1; p += 5) {
        glide = Math.max(glide, saturationTemperature(r.id, p, { point: 'dew' }) - saturationTemperature(r.id, p, { point: 'bubble' }));
      }
      expect(glide >= 0.5, `${r.id} glide ${glide}`).toBe(r.hasGlide);
    }
  });

  it('isRefrigerantId narrows exact ids only', () => {
    expect(isRefrigerantId('R-410A')).toBe(true);
    expect(isRefrigerantId('r-410a')).toBe(false);
    expect(isRefrigerantId(410)).toBe(false);
  });

  it('refrigerantInfo rejects unknown ids naming the valid ones', () => {
    expect(refrigerantInfo('R-22').ozoneDepleting).toBe(true);
    expect(() => refrigerantInfo('R-12')).toThrow(/valid ids: R-410A, R-32/);
  });
});

describe('saturationTemperature / saturationPressure', () => {
  it('bubble is never above dew at the same pressure, pure fluids have none', () => {
    for (const id of ids) {
      const b = saturationTemperature(id, 50, { point: 'bubble' });
      const d = saturationTemperature(id, 50, { point: 'dew' });
      expect(b).toBeLessThanOrEqual(d + 1e-9);
      if (saturationTables[id].dewPsia === null) expect(d).toBe(b);
    }
  });

  it('defaults to psig, °F and the dew point', () => {
    expect(saturationTemperature('R-407C', 60)).toBe(
      saturationTemperature('R-407C', 60, { pressureUnit: 'psig', temperatureUnit: 'F', point: 'dew' }),
    );
    expect(saturationPressure('R-407C', 40)).toBe(
      saturationPressure('R-407C', 40, { pressureUnit: 'psig', temperatureUnit: 'F', point: 'dew' }),
    );
  });

  it('converts units consistently (kPag/°C against psig/°F)', () => {
    const f = saturationTemperature('R-410A', 118, {});
    const c = saturationTemperature('R-410A', 118 * 6.894757293168361 + 14.696 * 6.894757293168361 - 101.325, {
      pressureUnit: 'kPag',
      temperatureUnit: 'C',
    });
    expect(c).toBeCloseTo(((f - 32) * 5) / 9, 6);
  });

  it('returns table points exactly at whole degrees', () => {
    const t = saturationTables['R-22'];
    const psia = t.bubblePsia[100] as number; // 40 °F
    expect(saturationPressure('R-22', 40, { point: 'bubble' })).toBeCloseTo(psia - 14.696, 9);
    expect(saturationTemperature('R-22', psia - 14.696, { point: 'bubble' })).toBeCloseTo(40, 9);
  });

  it('gives a vacuum (negative psig) for R-134a at −40 °F', () => {
    expect(saturationPressure('R-134a', -40)).toBeLessThan(0);
  });

  it('rejects unknown refrigerants, NaN, non-numbers and out-of-table values with RangeError', () => {
    expect(() => saturationTemperature('R-999', 100)).toThrow(RangeError);
    expect(() => saturationTemperature('R-999', 100)).toThrow(/valid ids: .*R-1234yf/);
    expect(() => saturationTemperature('R-410A', Number.NaN)).toThrow(/valid range for R-410A \(dew point\) is/);
    expect(() => saturationTemperature('R-410A', '118' as unknown as number)).toThrow(RangeError);
    expect(() => saturationTemperature('R-410A', 1180)).toThrow(/outside the table; valid range .* psig/);
    expect(() => saturationTemperature('R-410A', -14.7)).toThrow(RangeError);
    expect(() => saturationPressure('R-410A', 151)).toThrow(/valid range for R-410A is -60 to 150 °F/);
    expect(() => saturationPressure('R-410A', -61)).toThrow(RangeError);
    expect(() => saturationPressure('R-410A', Number.POSITIVE_INFINITY)).toThrow(RangeError);
    expect(() => saturationPressure('R-410A', 40, { pressureUnit: 'bar' as 'psig' })).toThrow(/valid: psig, kPag/);
  });

  it('accepts the exact ends of pressureRange and temperatureRange', () => {
    for (const id of ids) {
      const { min, max } = pressureRange(id);
      expect(saturationTemperature(id, min)).toBeCloseTo(-60, 6);
      expect(saturationTemperature(id, max)).toBeCloseTo(temperatureRange(id).max, 6);
      const tc = temperatureRange(id, { temperatureUnit: 'C' });
      expect(saturationPressure(id, tc.min, { temperatureUnit: 'C' })).toBeCloseTo(min, 6);
    }
  });

  it('property: saturation temperature rises with pressure', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...ids),
        fc.constantFrom('bubble' as const, 'dew' as const),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (id, point, u, v) => {
          const { min, max } = pressureRange(id, { point });
          const [a, b] = u < v ? [u, v] : [v, u];
          const pa = min + a * (max - min);
          const pb = min + b * (max - min);
          const ta = saturationTemperature(id, pa, { point });
          const tb = saturationTemperature(id, pb, { point });
          // Strictly rising once the pressures differ by more than float noise; never falling.
          if (pb - pa > 1e-6) return ta < tb;
          return ta <= tb;
        },
      ),
    );
  });

  it('property: temperature → pressure → temperature round-trips within 0.05 °F', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...ids),
        fc.constantFrom('bubble' as const, 'dew' as const),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (id, point, u) => {
          const { min, max } = temperatureRange(id);
          const t = min + u * (max - min);
          const p = saturationPressure(id, t, { point });
          return Math.abs(saturationTemperature(id, p, { point }) - t) <= 0.05;
        },
      ),
    );
  });

  it('property: pressure → temperature → pressure round-trips (°C / kPag)', () => {
    fc.assert(
      fc.property(fc.constantFrom(...ids), fc.double({ min: 0, max: 1, noNaN: true }), (id, u) => {
        const opts = { pressureUnit: 'kPag' as const, temperatureUnit: 'C' as const };
        const { min, max } = pressureRange(id, opts);
        const p = min + u * (max - min);
        const t = saturationTemperature(id, p, opts);
        return Math.abs(saturationPressure(id, t, opts) - p) <= 1e-6 * Math.max(1, Math.abs(p));
      }),
    );
  });
});

describe('pressureRange / temperatureRange', () => {
  it('differ between bubble and dew for a gliding blend, in the chosen unit', () => {
    const bubble = pressureRange('R-407C', { point: 'bubble' });
    const dew = pressureRange('R-407C');
    expect(bubble.max).toBeGreaterThan(dew.max);
    const kpa = pressureRange('R-407C', { pressureUnit: 'kPag' });
    expect(kpa.max).toBeCloseTo((dew.max + 14.696) * 6.894757293168361 - 101.325, 6);
    expect(temperatureRange('R-22', { temperatureUnit: 'C' }).min).toBeCloseTo(-51.111, 3);
  });

  it('lets a screen flag a reading typed ten times too large', () => {
    const { max } = pressureRange('R-410A');
    expect(1450).toBeGreaterThan(max);
    expect(145).toBeLessThan(max);
  });
});

describe('superheat / subcooling', () => {
  it('superheat uses the dew point', () => {
    const dew = saturationTemperature('R-407C', 60, { point: 'dew' });
    const r = superheat({ refrigerant: 'R-407C', suctionPressure: 60, suctionLineTemp: 50 });
    expect(r.saturationTemp).toBe(dew);
    expect(r.superheat).toBeCloseTo(50 - dew, 12);
  });

  it('subcooling uses the bubble point', () => {
    const bubble = saturationTemperature('R-407C', 250, { point: 'bubble' });
    const r = subcooling({ refrigerant: 'R-407C', liquidPressure: 250, liquidLineTemp: 100 });
    expect(r.saturationTemp).toBe(bubble);
    expect(r.subcooling).toBeCloseTo(bubble - 100, 12);
  });

  it('works in kPag and °C', () => {
    const r = superheat({ refrigerant: 'R-32', suctionPressure: 800, suctionLineTemp: 10, pressureUnit: 'kPag', temperatureUnit: 'C' });
    expect(r.saturationTemp).toBe(saturationTemperature('R-32', 800, { pressureUnit: 'kPag', temperatureUnit: 'C' }));
    expect(r.superheat).toBeCloseTo(10 - r.saturationTemp, 12);
  });

  it('rejects a non-number line temperature and an unknown refrigerant', () => {
    expect(() => superheat({ refrigerant: 'R-410A', suctionPressure: 118, suctionLineTemp: Number.NaN })).toThrow(RangeError);
    expect(() => subcooling({ refrigerant: 'R-9' as RefrigerantId, liquidPressure: 300, liquidLineTemp: 90 })).toThrow(/valid ids/);
  });
});

describe('gauges at altitude (atmosphericPressureKPa)', () => {
  const denver = atmosphericPressureAt(1609); // ISA at 1,609 m, about 83.43 kPa

  it('the default, and 101.325 kPa given explicitly, give exactly the sea-level results', () => {
    for (const id of ids) {
      for (const point of ['bubble', 'dew'] as const) {
        for (const p of [5, 60, 140]) {
          expect(saturationTemperature(id, p, { point, atmosphericPressureKPa: 101.325 })).toBe(saturationTemperature(id, p, { point }));
          expect(
            saturationTemperature(id, p * 6.9, { point, pressureUnit: 'kPag', temperatureUnit: 'C', atmosphericPressureKPa: 101.325 }),
          ).toBe(saturationTemperature(id, p * 6.9, { point, pressureUnit: 'kPag', temperatureUnit: 'C' }));
        }
        expect(saturationPressure(id, 20, { point, atmosphericPressureKPa: 101.325 })).toBe(saturationPressure(id, 20, { point }));
        expect(pressureRange(id, { point, atmosphericPressureKPa: 101.325 })).toEqual(pressureRange(id, { point }));
      }
    }
    expect(superheat({ refrigerant: 'R-410A', suctionPressure: 118, suctionLineTemp: 50, atmosphericPressureKPa: 101.325 })).toEqual(
      superheat({ refrigerant: 'R-410A', suctionPressure: 118, suctionLineTemp: 50 }),
    );
    expect(subcooling({ refrigerant: 'R-410A', liquidPressure: 340, liquidLineTemp: 95, atmosphericPressureKPa: 101.325 })).toEqual(
      subcooling({ refrigerant: 'R-410A', liquidPressure: 340, liquidLineTemp: 95 }),
    );
  });

  it('a gauge at altitude reads more for the same absolute pressure: saturation gauge pressure up by the atmosphere difference', () => {
    const psiDiff = 14.696 - denver / KPA_PER_PSI; // ≈ 2.595 psi
    const kpaDiff = 101.325 - denver; // ≈ 17.89 kPa
    for (const id of ids) {
      expect(saturationPressure(id, 40, { atmosphericPressureKPa: denver }) - saturationPressure(id, 40)).toBeCloseTo(psiDiff, 9);
      expect(
        saturationPressure(id, 4, { pressureUnit: 'kPag', temperatureUnit: 'C', atmosphericPressureKPa: denver }) -
          saturationPressure(id, 4, { pressureUnit: 'kPag', temperatureUnit: 'C' }),
      ).toBeCloseTo(kpaDiff, 9);
    }
  });

  it('the same gauge reading at altitude is a lower absolute pressure, so a lower saturation temperature (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...ids),
        fc.double({ min: 20, max: 300, noNaN: true }),
        fc.double({ min: 500, max: 4000, noNaN: true }),
        (id, psig, elevation) => {
          const atm = atmosphericPressureAt(elevation);
          const { max } = pressureRange(id);
          fc.pre(psig < max);
          const high = saturationTemperature(id, psig, { atmosphericPressureKPa: atm });
          expect(high).toBeLessThan(saturationTemperature(id, psig));
          // and it is the sea-level temperature of the same absolute pressure
          expect(high).toBeCloseTo(saturationTemperature(id, psig + atm / KPA_PER_PSI - 14.696), 9);
        },
      ),
    );
  });

  it('superheat rises and subcooling falls by the saturation shift', () => {
    const sea = superheat({ refrigerant: 'R-410A', suctionPressure: 118, suctionLineTemp: 50 });
    const high = superheat({ refrigerant: 'R-410A', suctionPressure: 118, suctionLineTemp: 50, atmosphericPressureKPa: denver });
    expect(high.superheat - sea.superheat).toBeCloseTo(sea.saturationTemp - high.saturationTemp, 12);
    expect(high.superheat).toBeGreaterThan(sea.superheat);
    const scSea = subcooling({ refrigerant: 'R-410A', liquidPressure: 340, liquidLineTemp: 95 });
    const scHigh = subcooling({ refrigerant: 'R-410A', liquidPressure: 340, liquidLineTemp: 95, atmosphericPressureKPa: denver });
    expect(scHigh.subcooling).toBeLessThan(scSea.subcooling);
  });

  it('the table range in gauge pressure moves with the atmosphere (a low reading valid at altitude may not be at sea level)', () => {
    const sea = pressureRange('R-134a');
    const high = pressureRange('R-134a', { atmosphericPressureKPa: denver });
    expect(high.min - sea.min).toBeCloseTo(14.696 - denver / KPA_PER_PSI, 9);
    expect(() => saturationTemperature('R-134a', sea.min - 1)).toThrow(RangeError);
    expect(saturationTemperature('R-134a', sea.min - 1, { atmosphericPressureKPa: 101.325 * 1.2 })).toBeGreaterThan(-60);
  });

  it('refuses an atmosphere that is not a finite number above 0 and at most 130 kPa', () => {
    for (const bad of [0, -5, 130.5, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(() => saturationTemperature('R-410A', 118, { atmosphericPressureKPa: bad })).toThrow(/atmosphericPressureKPa/);
    }
    expect(saturationTemperature('R-410A', 118, { atmosphericPressureKPa: 130 })).toBeGreaterThan(saturationTemperature('R-410A', 118));
  });

  it('gaugeToAbsolute and atmosphereFor: psig → psia, kPa(g) → kPa', () => {
    expect(atmosphereFor('psig')).toBe(14.696);
    expect(atmosphereFor('kPag')).toBe(101.325);
    expect(gaugeToAbsolute(118, 'psig')).toBe(118 + 14.696);
    expect(gaugeToAbsolute(800, 'kPag', denver)).toBe(800 + denver);
    expect(gaugeToAbsolute(118, 'psig', denver)).toBeCloseTo(118 + denver / 6.894757, 5);
    expect(() => atmosphereFor('bar' as 'psig')).toThrow(/valid: psig, kPag/);
  });
});
