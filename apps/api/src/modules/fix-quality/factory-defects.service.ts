/**
 * The factory-defect review (cases whose root cause is a factory defect, costed at the branch's rates, summed
 * per make and model) and the warranty claims recorded on its cases.
 */
import type { FactoryDefectCase, FactoryDefectReview, SessionUser, WarrantyClaim, WarrantyClaimUpdate } from '@coilpath/contract';
import type { Db, Tx } from '../../db/client';
import type { Clock } from '../../lib/clock';
import { notFound, unprocessable } from '../../lib/errors';
import { actAs } from '../events/actor';
import * as repo from './fix-quality.repo';
import { presentCase, presentClaim, presentDefectReview } from './fix-quality.present';
import type { Period } from './periods';

/**
 * The factory-defect cases (`factoryDefectCaseRows`): service calls, callbacks and return visits opened in the
 * period whose root cause is of origin `factory_defect`, or the one work order asked for, each costed.
 */
export async function factoryDefectCases(
  db: Tx,
  opts: { period?: Period; branchId?: string | undefined; workOrderId?: string },
): Promise<FactoryDefectCase[]> {
  return (await repo.factoryDefectCaseRows(db, opts)).map(presentCase);
}

export async function factoryDefectReview(db: Db, period: Period, branchId: string | undefined): Promise<FactoryDefectReview> {
  return presentDefectReview(period, branchId, await factoryDefectCases(db, { period, branchId }));
}

/** Records a warranty claim's status, amount and reference for one factory-defect case. */
export async function updateWarrantyClaim(
  db: Db,
  clock: Clock,
  user: SessionUser,
  workOrderId: string,
  body: WarrantyClaimUpdate,
): Promise<WarrantyClaim> {
  return db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const wo = await repo.findWorkOrder(tx, workOrderId);
    if (!wo || (user.role !== 'owner' && wo.branchId !== user.branchId)) throw notFound('work order');
    const [isCase] = await factoryDefectCases(tx, { workOrderId });
    if (!isCase) {
      throw unprocessable(
        'A warranty claim belongs to a service call, callback or return visit whose root cause is a factory defect; this work order has none.',
      );
    }
    const existing = await repo.findWarrantyClaim(tx, workOrderId);
    // The amount defaults to the job's computed cost once the claim is claimed or paid.
    const kept = body.amountCents !== undefined ? body.amountCents : (existing?.amountCents ?? null);
    const amountCents = kept === null && (body.status === 'claimed' || body.status === 'paid') ? isCase.costCents : kept;
    if ((body.status === 'claimed' || body.status === 'paid') && amountCents === null) {
      throw unprocessable('Enter the amount claimed from the manufacturer before marking the claim claimed or paid.', {
        fields: [{ path: 'amountCents', message: 'Enter the amount' }],
      });
    }
    const saved = await repo.saveWarrantyClaim(tx, workOrderId, {
      status: body.status,
      amountCents,
      reference: body.reference !== undefined ? body.reference || null : (existing?.reference ?? null),
      notes: body.notes !== undefined ? body.notes || null : (existing?.notes ?? null),
      updatedById: user.id,
      updatedAt: clock.now(),
    });
    await repo.audit(tx, {
      actorId: user.id,
      action: 'warranty_claim.updated',
      entity: 'work_order',
      entityId: workOrderId,
      details: { from: existing?.status ?? 'to_claim', to: body.status, amountCents },
    });
    return presentClaim(saved);
  });
}
