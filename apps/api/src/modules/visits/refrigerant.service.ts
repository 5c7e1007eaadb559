import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { leakRepairObligation, listRefrigerants } from '@coilpath/calc';
import type { LeakCheckDto, RefrigerantEventResult, SessionUser } from '@coilpath/contract';
import { andList, refrigerantEventInputSchema } from '@coilpath/contract';
import type { z } from 'zod';
import type { AppContext } from '../../context';
import type { Tx } from '../../db/client';
import { badRequest, conflict, notFound } from '../../lib/errors';
import { enforce, mayRecordRefrigerant } from '../../auth/policy';
import { assertVisitRecordable, loadReadableUnit, loadVisit, type UnitRow } from './access';
import { leakCaseDto, refrigerantEventDto } from './visits.present';
import * as repo from './visits.repo';
import { additionOf } from '../unit-file/refrigerant-record';
import { actAs } from '../events/actor';

/** Leak cases in these states still stand: a new case is not opened beside one. */
export { OPEN_LEAK_CASE_STATUSES } from './visits.repo';

/** The leak-rate method Coilpath applies (40 CFR 82.152 allows annualizing or rolling average, one per facility). */
const METHOD = 'annualizing' as const;

type Input = z.output<typeof refrigerantEventInputSchema>;

/** The unit's leak rate and repair obligation as of a date, over every addition on record (exempt ones not counted). */
async function leakCheck(tx: Tx, unit: UnitRow, asOf: string): Promise<LeakCheckDto | null> {
  const rows = await repo.unitAdditions(tx, unit.id);
  // Counted and exempt additions as the unit's refrigerant record has them (one mapping for both).
  const additions = rows.map((r) => additionOf(r)).filter((a) => a !== null);
  try {
    const o = leakRepairObligation({
      appliance: { category: unit.applianceCategory, fullCharge: unit.fullChargeLb, refrigerant: unit.refrigerant },
      additions,
      asOf,
      method: METHOD,
    });
    return {
      inScope: o.inScope,
      rule: o.rule,
      method: METHOD,
      leakRatePercent: Math.round(o.leakRate * 100) / 100,
      thresholdPercent: o.thresholdPercent,
      exceeds: o.exceeds,
      repairDueDate: o.repairDueDate,
      chronic: o.chronic,
    };
  } catch {
    // A refrigerant or charge Coilpath cannot compute: the event is kept, the leak check left empty.
    return null;
  }
}

/**
 * Records refrigerant added to or recovered from a unit (technicians only; on their own visit, on
 * site, when one is named). In the same transaction it recomputes the unit's leak rate with
 * `leakRepairObligation` and opens a leak case when the rate is over the threshold and no case is
 * open for the unit yet.
 */
export async function recordRefrigerantEvent(
  ctx: AppContext,
  user: SessionUser,
  unitId: string,
  input: Input,
): Promise<RefrigerantEventResult & { created: boolean }> {
  const unit = await loadReadableUnit(ctx.db, user, unitId);
  enforce(mayRecordRefrigerant(user));
  if (!listRefrigerants().some((r) => r.id === input.refrigerant)) {
    throw badRequest(`Unknown refrigerant ${input.refrigerant}.`, {
      fields: [{ path: 'refrigerant', message: 'Choose a refrigerant from the list' }],
    });
  }
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    // One writer per unit at a time, so two saves cannot open two leak cases.
    await repo.lockUnit(tx, unit.id);

    if (input.id) {
      const existing = await repo.findRefrigerantEvent(tx, input.id);
      if (existing) {
        if (existing.unitId !== unit.id) throw conflict('id_taken', 'That refrigerant entry id belongs to another unit.');
        const open = await repo.standingLeakCase(tx, unit.id);
        return {
          event: refrigerantEventDto(existing),
          leakCheck: await leakCheck(tx, unit, existing.date),
          leakCase: open ? leakCaseDto(open) : null,
          leakCaseOpened: false,
          created: false,
        };
      }
    }

    if (input.visitId) {
      const v = await loadVisit(tx, input.visitId, { lock: true });
      assertVisitRecordable(user, v);
      const wo = await repo.workOrderPlace(tx, v.workOrderId);
      const us = await repo.unitsOfWorkOrder(tx, wo!);
      if (!us.some((u) => u.id === unit.id)) {
        throw badRequest('That unit is not on this visit.', {
          fields: [{ path: 'visitId', message: 'The visit does not cover this unit' }],
        });
      }
    }

    if (input.circuit != null) {
      const numbers = await repo.circuitNumbersOf(tx, unit.id);
      if (!numbers.includes(input.circuit)) {
        const has =
          numbers.length === 0
            ? 'no circuits on record'
            : numbers.length === 1
              ? `only circuit ${numbers[0]}`
              : `circuits ${andList(numbers)}`;
        throw badRequest(`This unit has no circuit ${input.circuit}: it has ${has}.`, {
          fields: [{ path: 'circuit', message: 'Choose one of the unit’s circuits' }],
        });
      }
    }

    const branch = await repo.branchTimeZone(tx, unit.branchId);
    if (!branch) throw notFound('branch');
    const today = format(new TZDate(ctx.clock.now().getTime(), branch.timeZone), 'yyyy-MM-dd');
    const date = input.date ?? today;
    if (date > today) {
      throw badRequest('The date is in the future.', { fields: [{ path: 'date', message: 'Use today or an earlier date' }] });
    }

    const event = await repo.insertRefrigerantEvent(tx, {
      ...(input.id ? { id: input.id } : {}),
      unitId: unit.id,
      visitId: input.visitId ?? null,
      date,
      refrigerant: input.refrigerant,
      poundsAdded: input.poundsAdded,
      poundsRecovered: input.poundsRecovered,
      reason: input.reason,
      circuit: input.circuit ?? null,
      cylinderLot: input.cylinderLot ?? null,
      techId: user.id,
    });

    const check = input.poundsAdded > 0 ? await leakCheck(tx, unit, date) : null;
    const open = await repo.standingLeakCase(tx, unit.id);
    if (check?.exceeds && check.rule && check.thresholdPercent !== null && check.repairDueDate && !open) {
      const created = await repo.insertLeakCase(tx, {
        branchId: unit.branchId,
        unitId: unit.id,
        triggeringEventId: event!.id,
        openedOn: date,
        rule: check.rule,
        method: check.method,
        thresholdPercent: check.thresholdPercent,
        leakRatePercent: check.leakRatePercent,
        repairDueDate: check.repairDueDate,
        chronic: check.chronic,
        status: 'open',
      });
      return { event: refrigerantEventDto(event!), leakCheck: check, leakCase: leakCaseDto(created!), leakCaseOpened: true, created: true };
    }
    return {
      event: refrigerantEventDto(event!),
      leakCheck: check,
      leakCase: open ? leakCaseDto(open) : null,
      leakCaseOpened: false,
      created: true,
    };
  });
}
