import type {
  CurrentVisitResult,
  FindingDto,
  FindingInput,
  ReadingDto,
  SaveReadings,
  SessionUser,
  VisitDetail,
  VisitStateChange,
  VisitUnitDto,
  UnitSystem,
} from '@coilpath/contract';
import { recordingRefusal } from '@coilpath/contract';
import type { AppContext } from '../../context';
import type { Tx } from '../../db/client';
import { badRequest, conflict } from '../../lib/errors';
import { modelAlertRef } from '@coilpath/contract';
import { assertVisitReadable, assertVisitRecordable, assertVisitWritable, loadVisit, visitStatus, type VisitRow } from './access';
import { attachmentDto, circuitDto, findingDto, unitSummaryDto, readingDto, refrigerantEventDto } from './visits.present';
import { computeReading, toStoredUnits } from './reading-calc';
import { actAs } from '../events/actor';
import { visitSignatureDto } from './signature';
import * as repo from './visits.repo';

/** The units a visit covers: the work order's unit, or every active unit at the site when it names none. */
export const unitsOfWorkOrder = repo.unitsOfWorkOrder;

async function unitsWithCircuits(db: Tx, wo: { unitId: string | null; siteId: string }, unitSystem: UnitSystem): Promise<VisitUnitDto[]> {
  const us = await unitsOfWorkOrder(db, wo);
  const cs = us.length
    ? await repo.circuitsOfUnits(
        db,
        us.map((u) => u.id),
      )
    : [];
  return us.map((u) => ({
    ...unitSummaryDto(u),
    circuits: cs.filter((c) => c.unitId === u.id).map((c) => circuitDto(c, unitSystem)),
  }));
}

/**
 * The open leak case this work order repairs (its repair visit, or the case it was made for), with the number
 * of verification tests recorded on it; null when the work order repairs none.
 */
export async function leakRepairOf(db: Tx, wo: { id: string; leakCaseId: string | null }) {
  const c = await repo.openLeakRepair(db, wo);
  return c ?? null;
}

/** Everything the Visit screen shows, one query per section. */
export async function visitDetail(db: Tx, user: SessionUser, id: string): Promise<VisitDetail> {
  const row = await repo.visitHead(db, id);
  assertVisitReadable(user, row?.visit);
  const { visit: v, wo, site, branch } = row!;
  const canWrite = user.role === 'technician' && v.techId === user.id && !v.closedAt;

  const [unitList, readingRows, findingRows, eventRows, attachmentRows, stateRows, leakRepair, signature] = await Promise.all([
    unitsWithCircuits(db, wo, branch.unitSystem),
    repo.visitReadings(db, id),
    repo.visitFindings(db, id),
    repo.visitRefrigerantEvents(db, id),
    repo.visitAttachments(db, id),
    repo.visitStateEvents(db, id),
    leakRepairOf(db, wo),
    visitSignatureDto(db, id),
  ]);

  return {
    id: v.id,
    branchId: v.branchId,
    status: visitStatus(v),
    techId: v.techId,
    techName: row!.techName,
    enRouteAt: v.enRouteAt?.toISOString() ?? null,
    onSiteAt: v.onSiteAt?.toISOString() ?? null,
    closedAt: v.closedAt?.toISOString() ?? null,
    outcome: v.outcome,
    returnNeeds: v.returnNeeds,
    returnNotes: v.returnNotes,
    notes: v.notes,
    notesAudience: v.notesAudience,
    rootCauseFindingId: v.rootCauseFindingId,
    leakRepair,
    summarySentAt: v.summarySentAt?.toISOString() ?? null,
    signature,
    version: v.version,
    booking: row!.booking
      ? { id: row!.booking.id, startAt: row!.booking.startAt.toISOString(), endAt: row!.booking.endAt.toISOString() }
      : null,
    workOrder: {
      id: wo.id,
      number: wo.number,
      kind: wo.kind,
      state: wo.state,
      priority: wo.priority,
      complaint: wo.complaint,
      requiredCertification: wo.requiredCertification,
      latestAt: wo.latestAt?.toISOString() ?? null,
      modelAlert: modelAlertRef(wo.purpose),
    },
    site: {
      id: site.id,
      name: site.name,
      address: site.address,
      city: site.city,
      accessNotes: site.accessNotes,
      contactName: site.contactName,
      contactPhone: site.contactPhone,
    },
    branch: {
      id: branch.id,
      name: branch.name,
      timeZone: branch.timeZone,
      unitSystem: branch.unitSystem,
      sensorTolerancePercent: branch.sensorTolerancePercent,
      sensorToleranceAbsolute: branch.sensorToleranceAbsolute,
      elevationMeters: branch.elevationMeters,
    },
    units: unitList,
    readings: readingRows.map((x) => readingDto(x.r, x.number, branch.unitSystem)),
    findings: findingRows.map(findingDto),
    refrigerantEvents: eventRows.map(refrigerantEventDto),
    attachments: attachmentRows.map(attachmentDto),
    events: stateRows.map((e) => ({ state: e.state, at: e.at.toISOString(), byUserId: e.byUserId })),
    canWrite,
    canRecord: canWrite && !recordingRefusal(visitStatus(v)),
    recordRefusal: canWrite ? (recordingRefusal(visitStatus(v))?.message ?? null) : null,
  };
}

/** The technician's current visit: on site, else en route, else the next booked one (today or later). */
export async function currentVisit(ctx: AppContext, user: SessionUser): Promise<CurrentVisitResult> {
  const open = await repo.openVisitsOf(ctx.db, user.id);
  const onSite = open.filter((v) => v.onSiteAt).sort((a, b) => b.onSiteAt!.getTime() - a.onSiteAt!.getTime())[0];
  if (onSite) return { visitId: onSite.id, reason: 'on_site' };
  const enRoute = open.filter((v) => v.enRouteAt).sort((a, b) => b.enRouteAt!.getTime() - a.enRouteAt!.getTime())[0];
  if (enRoute) return { visitId: enRoute.id, reason: 'en_route' };
  // The next booked visit: the first whose booking ended less than 12 hours ago or is still ahead
  // (a technician running late today still gets the stop they have not started).
  const since = ctx.clock.now().getTime() - 12 * 3600_000;
  const next = open.find((v) => v.endAt && v.endAt.getTime() >= since);
  return next ? { visitId: next.id, reason: 'next_booked' } : { visitId: null, reason: null };
}

/** En route → on site: timestamps on the visit, a visit event, and the work order's state. */
export async function changeState(ctx: AppContext, user: SessionUser, id: string, input: VisitStateChange): Promise<VisitDetail> {
  await ctx.db.transaction(async (tx) => {
    const v = await loadVisit(tx, id, { lock: true });
    assertVisitWritable(user, v);
    await actAs(tx, user.id);
    const now = ctx.clock.now();
    if (input.state === 'en_route') {
      if (v.onSiteAt) throw conflict('bad_state', 'You are already on site for this visit; it cannot go back to en route.');
      if (v.enRouteAt) return; // already en route: nothing to change (a retried tap)
      await repo.updateVisit(tx, id, { enRouteAt: now, version: v.version + 1, updatedAt: now });
    } else {
      if (v.onSiteAt) return;
      await repo.updateVisit(tx, id, { onSiteAt: now, version: v.version + 1, updatedAt: now });
    }
    await repo.insertVisitEvent(tx, { visitId: id, state: input.state, at: now, byUserId: user.id });
    await repo.setWorkOrderState(tx, v.workOrderId, { state: input.state, updatedAt: now });
  });
  return visitDetail(ctx.db, user, id);
}

async function visitUnitIds(tx: Tx, v: VisitRow): Promise<Map<string, { refrigerant: string }>> {
  const wo = await repo.workOrderPlace(tx, v.workOrderId);
  const us = await repo.unitsOfWorkOrder(tx, wo!);
  return new Map(us.map((u) => [u.id, { refrigerant: u.refrigerant }]));
}

/**
 * Saves one entry per circuit, replacing this visit's earlier entry for the same circuit (so a
 * retried save from a phone on a bad connection never doubles a reading). The values arrive in the
 * units the body states (psig/°F or kPa(g)/°C) and are stored in psig/°F; saturation temperatures,
 * superheat and subcooling are computed here with @coilpath/calc. The answer is in the branch's units.
 */
export async function saveReadings(
  ctx: AppContext,
  user: SessionUser,
  id: string,
  input: SaveReadings,
): Promise<{ readings: ReadingDto[] }> {
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const v = await loadVisit(tx, id, { lock: true });
    assertVisitRecordable(user, v);
    const unitMap = await visitUnitIds(tx, v);
    const circuitIds = input.readings.map((r) => r.circuitId);
    const [cs, branch] = await Promise.all([repo.circuitsById(tx, circuitIds), repo.branchUnits(tx, v.branchId)]);
    const byId = new Map(cs.map((c) => [c.id, c]));
    const bad = circuitIds.filter((c) => !byId.has(c) || !unitMap.has(byId.get(c)!.unitId));
    if (bad.length)
      throw badRequest('A circuit is not on this visit’s units.', {
        fields: [{ path: 'readings.circuitId', message: 'Not a circuit of this visit' }],
      });
    const now = ctx.clock.now();
    // Gauges read against the air where they are: the branch's elevation, stored with the readings it computed them at.
    const elevationMeters = branch?.elevationMeters ?? 0;
    const rows = await repo.replaceReadings(
      tx,
      id,
      circuitIds,
      input.readings.map((r) => {
        const c = byId.get(r.circuitId)!;
        const refrigerant = unitMap.get(c.unitId)!.refrigerant;
        const stored = toStoredUnits(r, input.units);
        return {
          visitId: id,
          unitId: c.unitId,
          circuitId: c.id,
          takenAt: now,
          refrigerant,
          ...stored,
          notes: r.notes ?? null,
          elevationMeters,
          ...computeReading(refrigerant, stored, { elevationMeters }),
        };
      }),
    );
    const system = branch?.unitSystem ?? 'imperial';
    return {
      readings: rows.map((r) => readingDto(r, byId.get(r.circuitId)!.number, system)).sort((a, b) => a.circuitNumber - b.circuitNumber),
    };
  });
}

/** Records a finding. A client-made `id` seen before answers the saved finding (a retried save). */
export async function addFinding(
  ctx: AppContext,
  user: SessionUser,
  id: string,
  input: FindingInput,
): Promise<{ finding: FindingDto; created: boolean }> {
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const v = await loadVisit(tx, id, { lock: true });
    if (input.id) {
      assertVisitReadable(user, v);
      const existing = await repo.findFinding(tx, input.id);
      if (existing) {
        if (existing.visitId !== id) throw conflict('id_taken', 'That finding id belongs to another visit.');
        return { finding: findingDto(existing), created: false };
      }
    }
    assertVisitRecordable(user, v);
    const unitMap = await visitUnitIds(tx, v);
    let unitId = input.unitId ?? null;
    if (unitId && !unitMap.has(unitId)) {
      throw badRequest('That unit is not on this visit.', { fields: [{ path: 'unitId', message: 'Not a unit of this visit' }] });
    }
    if (!unitId && unitMap.size === 1) unitId = [...unitMap.keys()][0]!;
    const f = await repo.insertFinding(tx, {
      ...(input.id ? { id: input.id } : {}),
      visitId: id,
      unitId,
      causeCode: input.causeCode,
      origin: input.origin,
      alarmCode: input.alarmCode ?? null,
      reportedCircuit: input.reportedCircuit ?? null,
      actualCircuit: input.actualCircuit ?? null,
      notes: input.notes ?? null,
      notesAudience: input.notesAudience,
    });
    return { finding: findingDto(f), created: true };
  });
}
