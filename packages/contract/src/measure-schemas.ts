import { z } from 'zod';
import { ELEVATION_LIMITS_M, pressureUnits, temperatureUnits, unitSystemOf, unitSystems } from './measure';

/* The zod schemas of the reading units and of a branch's elevation (`measure.ts` holds the units and helpers). */

export const unitSystemSchema = z.enum(unitSystems, { message: 'Choose imperial or SI units' });
export const pressureUnitSchema = z.enum(pressureUnits, { message: 'State the pressure unit: psig or kPag' });
export const temperatureUnitSchema = z.enum(temperatureUnits, { message: 'State the temperature unit: F or C' });

/** The units a body's readings are in: one system, never mixed. */
export const readingUnitsSchema = z
  .strictObject({ pressure: pressureUnitSchema, temperature: temperatureUnitSchema })
  .refine((u) => unitSystemOf(u) !== null, {
    message: 'Pressure and temperature units must come from one system: psig with F, or kPag with C',
    path: ['temperature'],
  });

/** A branch's elevation, metres (`ELEVATION_LIMITS_M`). */
export const elevationMetersSchema = z.coerce
  .number({ message: 'Enter the elevation' })
  .min(ELEVATION_LIMITS_M.min, 'At least −500 m (−1,640 ft)')
  .max(ELEVATION_LIMITS_M.max, 'At most 5,000 m (16,404 ft)');
