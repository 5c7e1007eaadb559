/**
 * Model alerts: a factory defect of one cause found on a make and model at two or more sites, every other
 * unit of that model with whether it has been checked for the cause, and the inspection work orders the
 * owner creates for the unchecked ones.
 */
import { addDays, zonedDate, zonedInstant } from '@coilpath/calc';
import {
  causeCodeLabels,
  modelAlertPurpose,
  type CauseCode,
  type CreateInspections,
  type CreateInspectionsResult,
  type ModelAlert,
  type SessionUser,
} from '@coilpath/contract';
import type { Db, Tx } from '../../db/client';
import type { Clock } from '../../lib/clock';
import { notFound, unprocessable } from '../../lib/errors';
import { actAs } from '../events/actor';
import * as repo from './fix-quality.repo';
import { iso, isChecked, presentModelAlert, type LoadedAlert } from './fix-quality.present';

/**
 * Model alerts: the same cause code with origin `factory_defect` on one make and model at two or more
 * sites (over all time and all branches), raised the moment a second site's factory-defect finding was
 * recorded (closing time of its visit). For each, every unit of the model (not archived) with whether it
 * has been checked for that cause (the rule is stated once, beside `modelAlertPurpose` in the contract):
 *   1. it is one of the units the defect was found on, or
 *   2. it has a finding with the alert's cause code (any origin) recorded at or after the alert was raised, or
 *   3. it has an inspection work order created from the alert (purpose `model-alert:<make>|<model>|<cause>`),
 *      not cancelled, open or closed.
 * A visit for other work after the alert does not check the unit: nobody looked for that cause.
 */
export async function loadModelAlerts(db: Tx, filter?: { make: string; model: string; causeCode: CauseCode }): Promise<LoadedAlert[]> {
  const alertRows = await repo.alertRows(db, filter);
  if (alertRows.length === 0) return [];
  const keys = alertRows.map((a) => ({
    make: a.make,
    model: a.model,
    causeCode: a.cause_code,
    purpose: modelAlertPurpose(a.make, a.model, a.cause_code),
    raisedAt: iso(a.raised_at),
  }));
  const unitRows = await repo.alertUnitRows(db, keys);
  const inspectionRows = await repo.alertInspectionRows(
    db,
    keys.map((k) => k.purpose),
  );
  return alertRows.map((a) => {
    const purpose = modelAlertPurpose(a.make, a.model, a.cause_code);
    const units = unitRows.filter((u) => u.make === a.make && u.model === a.model && u.cause_code === a.cause_code);
    return { alert: a, units, inspections: inspectionRows.filter((i) => i.purpose === purpose) };
  });
}

/** Alerts for the owner (every unit) or a manager (the unchecked units of the own branch). */
export async function modelAlerts(db: Db, user: SessionUser): Promise<ModelAlert[]> {
  return (await loadModelAlerts(db)).map((loaded) => presentModelAlert(loaded, user));
}

/**
 * Creates one planned inspection work order (kind planned_maintenance, unplaced) per unchecked unit of the
 * alert, each in the unit's own branch and site, so it lands in that branch's Roster queue. Units checked in
 * the meantime are skipped; the same call twice creates nothing the second time.
 */
export async function createInspections(
  db: Db,
  clock: Clock,
  user: SessionUser,
  body: CreateInspections,
): Promise<CreateInspectionsResult> {
  const purpose = modelAlertPurpose(body.make, body.model, body.causeCode);
  return db.transaction(async (tx) => {
    await actAs(tx, user.id);
    // One creator at a time per alert, so two clicks cannot double the work orders.
    await repo.lockAlert(tx, purpose);
    const [found] = await loadModelAlerts(tx, { make: body.make, model: body.model, causeCode: body.causeCode });
    if (!found) throw notFound('model alert (the cause must be a factory defect found at two or more sites)');
    const unchecked = found.units.filter((u) => !isChecked(u));
    let chosen = unchecked;
    if (body.unitIds) {
      const ids = new Set(unchecked.map((u) => u.unit_id));
      const bad = body.unitIds.filter((id) => !ids.has(id));
      if (bad.length) {
        throw unprocessable(
          `${bad.length} of the chosen units are not unchecked units of this alert (already checked, archived or another model). Reload the alerts and choose again.`,
          {
            unitIds: bad,
          },
        );
      }
      const want = new Set(body.unitIds);
      chosen = unchecked.filter((u) => want.has(u.unit_id));
    }
    if (chosen.length === 0) return { created: 0, workOrders: [], branches: [] };
    // Each inspection is due by the end of the day its branch's setting gives (default 30 days), in the branch's zone.
    const branchRows = await repo.inspectionDueSettings(tx, [...new Set(chosen.map((u) => u.branch_id))]);
    const now = clock.now();
    const dueAt = new Map(
      branchRows.map((b) => [b.id, new Date(zonedInstant(addDays(zonedDate(now, b.timeZone), b.dueDays), '23:59', b.timeZone))]),
    );
    const complaint = `Inspect for ${causeCodeLabels[body.causeCode].toLowerCase()}: a factory defect found on ${body.make} ${body.model} at ${found.alert.sites} sites. Check this unit and record a finding.`;
    const created = await repo.insertWorkOrders(
      tx,
      chosen.map((u) => ({
        branchId: u.branch_id,
        siteId: u.site_id,
        unitId: u.unit_id,
        kind: 'planned_maintenance' as const,
        state: 'unplaced' as const,
        priority: 'normal' as const,
        complaint,
        purpose,
        latestAt: dueAt.get(u.branch_id) ?? null,
        estimatedMinutes: 60,
        createdById: user.id,
      })),
    );
    await repo.audit(tx, {
      actorId: user.id,
      action: 'model_alert.inspections_created',
      entity: 'model_alert',
      details: { purpose, count: created.length },
    });
    const perBranch = new Map<string, { branchId: string; branchName: string; created: number }>();
    for (const u of chosen) {
      const e = perBranch.get(u.branch_id) ?? { branchId: u.branch_id, branchName: u.branch_name, created: 0 };
      e.created++;
      perBranch.set(u.branch_id, e);
    }
    return {
      created: created.length,
      workOrders: created.map((w) => ({ id: w.id, number: w.number, branchId: w.branchId, unitId: w.unitId! })),
      branches: [...perBranch.values()],
    };
  });
}
