import { convertTemperatureDifference } from '@coilpath/calc';
import type { CircuitTargetsResult, CircuitTargetsValues, SessionUser } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { notFound } from '../../lib/errors';
import { circuitTargetsDto } from '../visits/visits.present';
import { STORED_UNITS } from '../visits/reading-calc';
import { actAs } from '../events/actor';
import { getUnit } from './units.service';
import * as repo from './units.repo';

/**
 * Sets (or clears, with blank ranges) a circuit's target superheat and subcooling ranges. The body states
 * its temperature unit (°F, or C for kelvin); the ranges are stored as °F differences, like readings. The
 * contract has checked both ends, min ≤ max and the plausible bounds; the table's checks hold the same.
 */
export async function setCircuitTargets(
  ctx: AppContext,
  user: SessionUser,
  unitId: string,
  number: number,
  input: CircuitTargetsValues,
): Promise<CircuitTargetsResult> {
  const toF = (x: number | null) => (x === null ? null : convertTemperatureDifference(x, input.temperature, STORED_UNITS.temperature));
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const unit = await getUnit(tx, user, unitId);
    const circuit = unit.circuits.find((c) => c.number === number);
    if (!circuit) throw notFound('circuit');
    const row = await repo.updateUnitCircuit(tx, unitId, circuit.id, {
      targetSuperheatMinF: toF(input.superheatMin),
      targetSuperheatMaxF: toF(input.superheatMax),
      targetSubcoolingMinF: toF(input.subcoolingMin),
      targetSubcoolingMaxF: toF(input.subcoolingMax),
      targetSource: input.source,
    });
    const branch = await repo.branchUnitSystem(tx, unit.branchId);
    return { unitId, circuit: number, targets: circuitTargetsDto(row!, branch!.unitSystem) };
  });
}
