import type { CloseVisitResult, SessionUser, SummaryMailResult, WorkOrderState } from '@coilpath/contract';
import { closeVisitSchema, leakRepairCloseRefusal, returnNeedLabels, rootCauseChoice, signatureChoiceRefusal } from '@coilpath/contract';
import { requiredCertificationFor } from '@coilpath/calc';
import type { z } from 'zod';
import type { AppContext } from '../../context';
import { conflict, HttpError } from '../../lib/errors';
import { enforce, visitMayResendSummary } from '../../auth/policy';
import { findOpenReturn, joinOpenReturn, leakRepairLatestAt, withOneOpenReturn } from '../work-orders/open-return';
import { assertVisitReadable, assertVisitWritable, loadVisit } from './access';
import * as repo from './closeout.repo';
import { insertVisitEvent, updateVisit } from './visits.repo';
import { summaryMail, summaryPdf, summarySections, type SummaryContext } from './summary';
import { leakRepairOf, visitDetail } from './visits.service';
import { actAs, changeAs } from '../events/actor';
import { decodeSignaturePng, signatureImage, signedAtOf } from './signature';

type Input = z.output<typeof closeVisitSchema>;

/**
 * Closes a visit with its outcome. In one transaction: the visit, a `closed` visit event, the work
 * order (closed with the outcome) and, for `needs_return`, the unit's return visit: a new unplaced one, or —
 * when the unit already has an open return visit — that one, with the new needs added (one truck roll per
 * unit). An open leak case on the unit links to the return visit as its repair visit, whose latest booking
 * is then the case's repair deadline at the latest. After the commit the service summary is mailed; a mail
 * failure never undoes the close, it is reported in the answer.
 */
export async function closeVisit(ctx: AppContext, user: SessionUser, id: string, input: Input): Promise<CloseVisitResult> {
  const returnWorkOrder = await withOneOpenReturn(ctx.db, () =>
    ctx.db.transaction(async (tx) => {
      const v = await loadVisit(tx, id, { lock: true });
      assertVisitWritable(user, v);
      await actAs(tx, user.id);
      if (!v.onSiteAt) {
        throw conflict('not_on_site', 'Mark yourself on site before closing the visit, so its times are right.');
      }
      // The root cause: required among several findings, the only one by default (`rootCauseChoice`).
      const findingIds = await repo.findingIdsOf(tx, id);
      const rootCause = rootCauseChoice(findingIds, input.rootCauseFindingId);
      if (!rootCause.ok)
        throw new HttpError(422, rootCause.code, rootCause.message, {
          fields: [{ path: 'rootCauseFindingId', message: rootCause.message }],
        });
      // A leak repair closed as resolved with nothing to show for it needs the technician's confirmation.
      const woRow = await repo.workOrderLeakCase(tx, v.workOrderId);
      const unverified = leakRepairCloseRefusal({
        leakRepair: await leakRepairOf(tx, woRow!),
        outcome: input.outcome,
        refrigerantEntries: await repo.refrigerantEntryCount(tx, id),
        confirmed: input.confirmedWithoutVerification,
      });
      if (unverified)
        throw new HttpError(422, unverified.code, unverified.message, {
          fields: [{ path: 'confirmedWithoutVerification', message: unverified.message }],
        });
      // The customer's sign-off: signed (a whole PNG, decoded here) or not available; one of the two is required.
      const unsigned = signatureChoiceRefusal(input.signature);
      if (unsigned)
        throw new HttpError(422, unsigned.code, unsigned.message, { fields: [{ path: 'signature', message: unsigned.message }] });
      const signaturePng = input.signature?.kind === 'signed' ? decodeSignaturePng(input.signature.imagePng) : null;
      const now = ctx.clock.now();
      await updateVisit(tx, id, {
        closedAt: now,
        outcome: input.outcome,
        rootCauseFindingId: rootCause.findingId,
        notesAudience: input.notes !== undefined ? input.notesAudience : v.notesAudience,
        returnNeeds: input.outcome === 'needs_return' ? input.returnNeeds : [],
        returnNotes: input.outcome === 'needs_return' ? (input.returnNotes ?? null) : null,
        notes: input.notes ?? v.notes,
        labourMinutes: input.labourMinutes ?? null,
        version: v.version + 1,
        updatedAt: now,
      });
      await insertVisitEvent(tx, { visitId: id, state: 'closed', at: now, byUserId: user.id });
      await repo.insertSignature(
        tx,
        input.signature?.kind === 'signed'
          ? {
              visitId: id,
              signerName: input.signature.signerName,
              signedAt: signedAtOf(input.signature.signedAt, v.onSiteAt, now),
              imagePng: signaturePng!,
              recordedAt: now,
            }
          : { visitId: id, recordedAt: now },
      );
      const wo = await repo.updateWorkOrder(tx, v.workOrderId, {
        state: 'closed',
        outcome: input.outcome,
        closedAt: now,
        updatedAt: now,
        returnNeeds: input.outcome === 'needs_return' ? input.returnNeeds : [],
      });
      if (input.outcome !== 'needs_return') return null;

      const unit = wo!.unitId ? await repo.unitChargeAndZone(tx, wo!.unitId) : undefined;
      const openCase = wo!.unitId ? await repo.standingLeakCaseOf(tx, wo!.unitId) : undefined;
      // A case still waiting for its repair makes this return its repair visit: its deadline is the latest booking.
      const repairCase = openCase?.status === 'open' && unit ? openCase : undefined;
      const latestAt = repairCase ? leakRepairLatestAt(repairCase.repairDueDate, unit!.timeZone) : null;
      const requiredCertification =
        wo!.requiredCertification ?? (repairCase ? (requiredCertificationFor({ fullChargeLb: unit!.fullChargeLb }) ?? 'II') : null);
      const leakCaseId = openCase?.id ?? wo!.leakCaseId;
      const needs = input.returnNeeds.map((n) => returnNeedLabels[n].toLowerCase()).join(', ');
      const complaint = input.returnNotes?.trim() || `Return visit for WO-${wo!.number}: needs ${needs}.`;

      const open = wo!.unitId ? await findOpenReturn(tx, wo!.unitId, { lock: true }) : null;
      let ret: { id: string; number: number | null; state: WorkOrderState; joined: boolean };
      if (open) {
        await joinOpenReturn(
          tx,
          open,
          {
            needs: input.returnNeeds,
            latestAt,
            priority: wo!.priority,
            complaint: input.returnNotes?.trim() ? `From WO-${wo!.number}: ${complaint}` : complaint,
            estimatedMinutes: wo!.estimatedMinutes,
            requiredSkill: wo!.requiredSkill,
            requiredCertification,
            leakCaseId,
          },
          now,
        );
        ret = { id: open.id, number: open.number, state: open.state, joined: true };
      } else {
        const created = await repo.insertWorkOrder(tx, {
          branchId: wo!.branchId,
          siteId: wo!.siteId,
          unitId: wo!.unitId,
          kind: 'return_visit',
          state: 'unplaced',
          priority: wo!.priority,
          complaint,
          originWorkOrderId: wo!.id,
          requiredSkill: wo!.requiredSkill,
          requiredCertification,
          estimatedMinutes: wo!.estimatedMinutes,
          returnNeeds: input.returnNeeds,
          leakCaseId,
          latestAt,
          createdById: user.id,
        });
        ret = { ...created!, joined: false };
      }
      if (repairCase) {
        await repo.setRepairWorkOrder(tx, repairCase.id, ret.id, now);
      }
      return ret;
    }),
  );

  const summary = await sendSummary(ctx, user, id);
  return { visit: await visitDetail(ctx.db, user, id), returnWorkOrder, summary };
}

/** Where a visit's summary goes: the site's contact, else the customer's. */
async function summaryAddress(ctx: AppContext, visitId: string): Promise<string | null> {
  const row = await repo.summaryAddresses(ctx.db, visitId);
  return row?.site?.trim() || row?.customer?.trim() || null;
}

/** Who the summary speaks for (the branch's contractor details, the technician) and the units' open leak cases. */
async function summaryContext(ctx: AppContext, visitId: string, unitIds: string[]): Promise<SummaryContext> {
  const row = await repo.summarySpeaker(ctx.db, visitId);
  const b = row!.branch;
  const cases = unitIds.length ? await repo.openLeakCasesOf(ctx.db, unitIds) : [];
  return {
    contractor: {
      tradingName: b.tradingName,
      address: b.officeAddress,
      phone: b.officePhone,
      licenceNumber: b.licenceNumber,
      email: b.officeEmail,
    },
    technician: { name: row!.techName, epa608Number: row!.epa608Number },
    openLeakCases: cases,
  };
}

/**
 * Mails the service summary (text + PDF) of a closed visit and records `summarySentAt`. Never
 * throws for a mail failure: it answers `{ sent: false, error }` so the screen can say so.
 */
export async function sendSummary(ctx: AppContext, user: SessionUser, visitId: string): Promise<SummaryMailResult> {
  const to = await summaryAddress(ctx, visitId);
  if (!to)
    return { sent: false, to: null, error: 'Neither the site nor the customer has a contact e-mail address, so no summary was sent.' };
  try {
    const detail = await visitDetail(ctx.db, user, visitId);
    const c = await summaryContext(
      ctx,
      visitId,
      detail.units.map((u) => u.id),
    );
    const s = summarySections(detail, {
      ...c,
      signatureImage: detail.signature?.kind === 'signed' ? await signatureImage(ctx.db, visitId) : null,
    });
    const pdf = await summaryPdf(s, ctx.clock.now());
    await ctx.mailer.send({
      to,
      // Replies go to the branch's office, not to Coilpath's sending address.
      ...(c.contractor.email.trim() ? { replyTo: c.contractor.email.trim() } : {}),
      ...summaryMail(s),
      attachments: [
        { filename: `service-summary-WO-${detail.workOrder.number ?? 'visit'}.pdf`, content: pdf, contentType: 'application/pdf' },
      ],
    });
    // The "sent" mark is the sender's change: the live screens name them, as for every change a person makes.
    await changeAs(ctx.db, user.id, (tx) => updateVisit(tx, visitId, { summarySentAt: ctx.clock.now() }));
    return { sent: true, to, error: null };
  } catch (err) {
    ctx.logger?.error({ err, visitId }, 'service summary mail failed');
    return {
      sent: false,
      to,
      error: 'The mail server did not take the summary. The visit is closed; send the summary again from this screen.',
    };
  }
}

/** Sends a closed visit's summary again (the assigned technician, or the office in scope). */
export async function resendSummary(ctx: AppContext, user: SessionUser, visitId: string): Promise<SummaryMailResult> {
  const v = await loadVisit(ctx.db, visitId);
  assertVisitReadable(user, v);
  if (!v.closedAt) throw conflict('visit_open', 'The summary is sent when the visit closes. Close the visit first.');
  enforce(visitMayResendSummary(user, v));
  return sendSummary(ctx, user, visitId);
}
