import { and, eq, inArray } from 'drizzle-orm';
import type { CloseVisitResult, SessionUser, SummaryMailResult } from '@coilpath/contract';
import { closeVisitSchema, returnNeedLabels } from '@coilpath/contract';
import type { z } from 'zod';
import type { AppContext } from '../../context';
import { customers, leakCases, sites, visitEvents, visits, workOrders } from '../../db/schema';
import { conflict, forbidden } from '../../lib/errors';
import { assertVisitReadable, assertVisitWritable, loadVisit } from './access';
import { OPEN_LEAK_CASE_STATUSES } from './refrigerant.service';
import { summaryMail, summaryPdf, summarySections } from './summary';
import { visitDetail } from './visits.service';

type Input = z.output<typeof closeVisitSchema>;

/**
 * Closes a visit with its outcome. In one transaction: the visit, a `closed` visit event, the work
 * order (closed with the outcome) and, for `needs_return`, a linked return-visit work order in the
 * unplaced queue. After the commit the service summary is mailed; a mail failure never undoes the
 * close, it is reported in the answer.
 */
export async function closeVisit(ctx: AppContext, user: SessionUser, id: string, input: Input): Promise<CloseVisitResult> {
  const returnWorkOrder = await ctx.db.transaction(async (tx) => {
    const v = await loadVisit(tx, id, { lock: true });
    assertVisitWritable(user, v);
    if (!v.onSiteAt) {
      throw conflict('not_on_site', 'Mark yourself on site before closing the visit, so its times are right.');
    }
    const now = ctx.clock.now();
    await tx
      .update(visits)
      .set({
        closedAt: now,
        outcome: input.outcome,
        returnNeeds: input.outcome === 'needs_return' ? input.returnNeeds : [],
        returnNotes: input.outcome === 'needs_return' ? (input.returnNotes ?? null) : null,
        notes: input.notes ?? v.notes,
        labourMinutes: input.labourMinutes ?? null,
        version: v.version + 1,
        updatedAt: now,
      })
      .where(eq(visits.id, id));
    await tx.insert(visitEvents).values({ visitId: id, state: 'closed', at: now, byUserId: user.id });
    const [wo] = await tx
      .update(workOrders)
      .set({
        state: 'closed',
        outcome: input.outcome,
        closedAt: now,
        updatedAt: now,
        returnNeeds: input.outcome === 'needs_return' ? input.returnNeeds : [],
      })
      .where(eq(workOrders.id, v.workOrderId))
      .returning();
    if (input.outcome !== 'needs_return') return null;

    const [openCase] = wo!.unitId
      ? await tx
          .select({ id: leakCases.id, repairDueDate: leakCases.repairDueDate })
          .from(leakCases)
          .where(and(eq(leakCases.unitId, wo!.unitId), inArray(leakCases.status, [...OPEN_LEAK_CASE_STATUSES])))
          .limit(1)
      : [];
    const needs = input.returnNeeds.map((n) => returnNeedLabels[n].toLowerCase()).join(', ');
    const complaint = input.returnNotes?.trim() || `Return visit for WO-${wo!.number}: needs ${needs}.`;
    const [ret] = await tx
      .insert(workOrders)
      .values({
        branchId: wo!.branchId,
        siteId: wo!.siteId,
        unitId: wo!.unitId,
        kind: 'return_visit',
        state: 'unplaced',
        priority: wo!.priority,
        complaint,
        originWorkOrderId: wo!.id,
        requiredSkill: wo!.requiredSkill,
        requiredCertification: wo!.requiredCertification,
        estimatedMinutes: wo!.estimatedMinutes,
        returnNeeds: input.returnNeeds,
        leakCaseId: openCase?.id ?? wo!.leakCaseId,
        // An open leak case's repair deadline is the latest the return visit may be booked.
        latestAt: openCase ? new Date(`${openCase.repairDueDate}T23:59:59Z`) : null,
        createdById: user.id,
      })
      .returning({ id: workOrders.id, number: workOrders.number, state: workOrders.state });
    return ret!;
  });

  const summary = await sendSummary(ctx, user, id);
  return { visit: await visitDetail(ctx.db, user, id), returnWorkOrder, summary };
}

/** Where a visit's summary goes: the site's contact, else the customer's. */
async function summaryAddress(ctx: AppContext, visitId: string): Promise<string | null> {
  const [row] = await ctx.db
    .select({ site: sites.contactEmail, customer: customers.contactEmail })
    .from(visits)
    .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .where(eq(visits.id, visitId))
    .limit(1);
  return row?.site?.trim() || row?.customer?.trim() || null;
}

/**
 * Mails the service summary (text + PDF) of a closed visit and records `summarySentAt`. Never
 * throws for a mail failure: it answers `{ sent: false, error }` so the screen can say so.
 */
export async function sendSummary(ctx: AppContext, user: SessionUser, visitId: string): Promise<SummaryMailResult> {
  const to = await summaryAddress(ctx, visitId);
  if (!to) return { sent: false, to: null, error: 'Neither the site nor the customer has a contact e-mail address, so no summary was sent.' };
  try {
    const detail = await visitDetail(ctx.db, user, visitId);
    const s = summarySections(detail);
    const pdf = await summaryPdf(s, ctx.clock.now());
    await ctx.mailer.send({
      to,
      ...summaryMail(s),
      attachments: [{ filename: `service-summary-WO-${detail.workOrder.number ?? 'visit'}.pdf`, content: pdf, contentType: 'application/pdf' }],
    });
    await ctx.db.update(visits).set({ summarySentAt: ctx.clock.now() }).where(eq(visits.id, visitId));
    return { sent: true, to, error: null };
  } catch (err) {
    console.error('[coilpath] service summary mail failed', err);
    return { sent: false, to, error: 'The mail server did not take the summary. The visit is closed; send the summary again from this screen.' };
  }
}

/** Sends a closed visit's summary again (the assigned technician, or the office in scope). */
export async function resendSummary(ctx: AppContext, user: SessionUser, visitId: string): Promise<SummaryMailResult> {
  const v = await loadVisit(ctx.db, visitId);
  assertVisitReadable(user, v);
  if (!v.closedAt) throw conflict('visit_open', 'The summary is sent when the visit closes. Close the visit first.');
  if (user.role === 'technician' && v.techId !== user.id) throw forbidden();
  return sendSummary(ctx, user, visitId);
}
