/** Answers of the Unit file (`/api/units/:id/file`, the refrigerant record, `/api/unit-file`): the contract's own schemas. */
import { z } from 'zod';
import { circuitTargetsSchema } from '../sites';
import type { CircuitTargetsResult } from '../target-range';
import { refrigerantRecordSchema, unitFileSchema, unitSearchResultSchema } from '../unit-file';
import type { Agree, AllAgree } from './agree';

/** A circuit's target ranges as saved (`PUT /api/units/:id/circuits/:number/targets`). */
export const circuitTargetsResultSchema = z.object({ unitId: z.string(), circuit: z.number(), targets: circuitTargetsSchema });
export type UnitFileChecks = AllAgree<[Agree<CircuitTargetsResult, typeof circuitTargetsResultSchema>]>;

export { refrigerantRecordSchema, unitFileSchema };
export { unitSearchResultSchema };
