/** What the agreement routes answer: an agreement record turned into the contract's row. */
import { parseAgreementRrule, type AgreementRow } from '@coilpath/contract';
import type { AgreementRecord } from './agreements.repo';

/** The row of an agreement, with its covered units and its plan's count and next date already worked out. */
export function presentAgreementRow(
  a: AgreementRecord,
  siteName: string,
  customerName: string,
  plan: Pick<AgreementRow, 'units' | 'plannedCount' | 'nextPlannedDate'>,
): AgreementRow {
  return {
    id: a.id,
    branchId: a.branchId,
    siteId: a.siteId,
    siteName,
    customerName,
    name: a.name,
    rrule: a.rrule,
    recurrence: parseAgreementRrule(a.rrule),
    seasonNotes: a.seasonNotes,
    termStart: a.termStart,
    termEnd: a.termEnd,
    slaHours: a.slaHours,
    priceCents: a.priceCents,
    visitMinutes: a.visitMinutes,
    tasks: a.tasks,
    status: a.status,
    units: plan.units,
    plannedCount: plan.plannedCount,
    nextPlannedDate: plan.nextPlannedDate,
  };
}
