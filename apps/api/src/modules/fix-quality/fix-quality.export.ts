/** CSV (the shared `toCsv` writer) and PDF (the shared `createPdf` setup) exports of the Fix Quality report. */
import { csvTimestamp, toCsv } from '@coilpath/calc';
import { createPdf, pdfSlate } from '../../lib/pdf';
import {
  causeCodeLabels,
  warrantyClaimStatuses,
  workOrderKindLabels,
  type FactoryDefectReview,
  type FixQualityGroup,
  type FixQualityReport,
  type FixQualityTable,
  type ModelAlert,
} from '@coilpath/contract';

const rate = (r: number | null) => (r === null ? '' : (r * 100).toFixed(1));
const round = (n: number | null, d = 2) => (n === null ? '' : n.toFixed(d));
const money = (cents: number | null) => (cents === null ? '' : (cents / 100).toFixed(2));

/** `pending_in_callback_window`: calls whose callback window had not run out when the file was written (in no other column). */
const groupColumns = [
  'group',
  'service_calls_eligible',
  'first_time_fixed',
  'first_time_fix_rate_pct',
  'resolved_first_visits',
  'callbacks',
  'callback_rate_pct',
  'return_visits',
  'return_visits_per_service_call',
  'jobs_resolved',
  'avg_days_to_resolve',
  'pending_in_callback_window',
] as const;

const groupRow = (g: FixQualityGroup) => ({
  group: g.label,
  service_calls_eligible: g.eligible,
  first_time_fixed: g.firstTimeFixed,
  first_time_fix_rate_pct: rate(g.firstTimeFixRate),
  resolved_first_visits: g.resolvedFirstVisits,
  callbacks: g.callbacks,
  callback_rate_pct: rate(g.callbackRate),
  return_visits: g.returnVisits,
  return_visits_per_service_call: round(g.returnVisitsPerServiceCall),
  jobs_resolved: g.resolvedJobs,
  avg_days_to_resolve: round(g.avgDaysToResolve, 1),
  pending_in_callback_window: g.pending,
});

const caseColumns = [
  'work_order',
  'kind',
  'branch',
  'site',
  'unit',
  'make',
  'model',
  'causes',
  'opened_at',
  'visits',
  'labour_hours',
  'labour_cost',
  'refrigerant_lb',
  'refrigerant_cost',
  'cost',
  'currency',
  'claim_status',
  'claim_amount',
  'claim_difference',
  'claim_reference',
] as const;

const alertColumns = [
  'make',
  'model',
  'cause',
  'sites_with_defect',
  'branch',
  'site',
  'unit',
  'serial',
  'install_date',
  'warranty_end',
] as const;

export interface CsvSources {
  report?: FixQualityReport;
  defects?: FactoryDefectReview;
  alerts?: ModelAlert[];
}

/**
 * One table of the report as CSV: a header row and one row per group, case or unchecked unit. A case's
 * `opened_at` is written in its branch's time zone with the offset.
 */
export function tableCsv(table: FixQualityTable, src: CsvSources): string {
  if (table === 'factoryDefects') {
    const rows = (src.defects?.cases ?? []).map((c) => ({
      work_order: c.number === null ? c.workOrderId : `WO-${c.number}`,
      kind: workOrderKindLabels[c.kind],
      branch: c.branchName,
      site: c.siteName,
      unit: c.unitTag,
      make: c.make,
      model: c.model,
      causes: c.causeCodes.map((k) => causeCodeLabels[k]).join('; '),
      opened_at: csvTimestamp(c.openedAt, c.branchTimeZone),
      visits: c.visits,
      labour_hours: (c.labourMinutes / 60).toFixed(2),
      labour_cost: money(c.labourCostCents),
      refrigerant_lb: c.refrigerantLb.toFixed(2),
      refrigerant_cost: money(c.refrigerantCostCents),
      cost: money(c.costCents),
      currency: c.currency,
      claim_status: c.claim.status,
      claim_amount: money(c.claim.amountCents),
      /** The recorded claim amount minus the job's computed cost (empty while no amount is recorded). */
      claim_difference: money(c.amountDifferenceCents),
      claim_reference: c.claim.reference ?? '',
    }));
    return toCsv(caseColumns, rows);
  }
  if (table === 'modelAlerts') {
    const rows = (src.alerts ?? []).flatMap((a) =>
      a.unchecked.map((u) => ({
        make: a.make,
        model: a.model,
        cause: causeCodeLabels[a.causeCode],
        sites_with_defect: a.sites,
        branch: u.branchName,
        site: u.siteName,
        unit: u.tag,
        serial: u.serial,
        install_date: u.installDate ?? '',
        warranty_end: u.warrantyEnd ?? '',
      })),
    );
    return toCsv(alertColumns, rows);
  }
  const groups = src.report?.[table] ?? [];
  return toCsv(groupColumns, groups.map(groupRow));
}

// ---------------------------------------------------------------------------------------------
// PDF
// ---------------------------------------------------------------------------------------------

const pct = (r: number | null) => (r === null ? '—' : `${(r * 100).toFixed(1)} %`);
const pts = (d: number | null) => (d === null ? '—' : `${d >= 0 ? '+' : '−'}${Math.abs(d * 100).toFixed(1)} pts`);
const signed = (d: number | null, digits = 2) => (d === null ? '—' : `${d >= 0 ? '+' : '−'}${Math.abs(d).toFixed(digits)}`);
const usd = (cents: number, currency = 'USD') =>
  (cents / 100).toLocaleString('en-US', { style: 'currency', currency, maximumFractionDigits: 0 });

/** "98 calls still inside their 30-day window": the pending calls in words (PDF and screen say the same). */
export function pendingSentence(pending: number, windowDays: number[]): string {
  const w = windowDays.length ? windowDays.join(' or ') : '30';
  if (pending === 0) return `No call of this period is still inside its ${w}-day callback window: every call is counted.`;
  return `${pending} ${pending === 1 ? 'call is' : 'calls are'} still inside ${pending === 1 ? 'its' : 'their'} ${w}-day callback window and not counted in the rates yet.`;
}

interface PdfInput {
  report: FixQualityReport;
  defects: FactoryDefectReview;
  alerts: ModelAlert[];
  branchName: string;
  generatedAt: Date;
}

/** The whole period's report as a PDF, through the shared setup (Roboto Flex embedded, tagged). */
export function reportPdf({ report, defects, alerts, branchName, generatedAt }: PdfInput): Promise<Buffer> {
  const title = `Coilpath Fix Quality ${report.period.from} to ${report.period.to}`;
  const pdf = createPdf({ title, subject: `Fix Quality, ${branchName}`, createdAt: generatedAt, margin: 48 });

  pdf.heading('Fix Quality', 1, { size: 18 });
  pdf.paragraph(
    `${branchName} · ${report.period.from} to ${report.period.to} (UTC dates) · compared with ${report.previousPeriod.from} to ${report.previousPeriod.to}`,
    { color: pdfSlate },
  );
  pdf.paragraph(`Generated ${generatedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC by Coilpath`, { color: pdfSlate });
  pdf.doc.moveDown();

  pdf.heading('Headline');
  pdf.table(
    ['Figure', 'This period', 'Previous period', 'Change'],
    [3, 2, 2, 2],
    [
      ['First-time-fix rate', pct(report.firstTimeFixRate), pct(report.previous.firstTimeFixRate), pts(report.change.firstTimeFixRate)],
      ['Callback rate', pct(report.callbackRate), pct(report.previous.callbackRate), pts(report.change.callbackRate)],
      [
        'Return visits per service call',
        report.returnVisitsPerServiceCall?.toFixed(2) ?? '—',
        report.previous.returnVisitsPerServiceCall?.toFixed(2) ?? '—',
        signed(report.change.returnVisitsPerServiceCall),
      ],
      [
        'Average days to resolve',
        report.avgDaysToResolve?.toFixed(1) ?? '—',
        report.previous.avgDaysToResolve?.toFixed(1) ?? '—',
        signed(report.change.avgDaysToResolve, 1),
      ],
      ['Service calls counted', String(report.eligible), String(report.previous.eligible), signed(report.change.eligible, 0)],
      ['Calls still inside their callback window (not counted yet)', String(report.pending), String(report.previous.pending), ''],
    ],
  );
  pdf.doc.moveDown(0.4);
  pdf.paragraph(pendingSentence(report.pending, report.windowDays), { size: 9 });
  pdf.paragraph(
    `How these are counted: a service call counts when its first visit was not declined. It is fixed the first time when that visit ` +
      `resolved it and no return visit or callback was opened within the branch's callback window (${report.windowDays.join(' / ') || 30} days) ` +
      `after the visit closed. The callback rate divides the calls with a callback inside the window by the calls resolved on the first visit. ` +
      `Days to resolve run from the call being opened to the close of its last visit (including follow-ups), for calls that ended resolved. ` +
      `The period holds the calls whose first visit closed within it (UTC dates). A call counts only once its callback window has ` +
      `run out; until then it is shown as pending and left out of every rate.`,
    { size: 8.5, color: pdfSlate },
  );

  const groupTable = (title: string, groups: FixQualityGroup[], limit = 30) => {
    pdf.heading(title);
    pdf.table(
      ['', 'Calls', 'First-time fix', 'Callbacks', 'Callback rate', 'Return visits / call', 'Days to resolve'],
      [4, 1.2, 1.8, 1.4, 1.6, 1.8, 1.6],
      groups
        .slice(0, limit)
        .map((g) => [
          g.label,
          String(g.eligible),
          pct(g.firstTimeFixRate),
          String(g.callbacks),
          pct(g.callbackRate),
          g.returnVisitsPerServiceCall?.toFixed(2) ?? '—',
          g.avgDaysToResolve?.toFixed(1) ?? '—',
        ]),
      { empty: 'Nothing in this period.' },
    );
    if (groups.length > limit) pdf.paragraph(`… and ${groups.length - limit} more (see the CSV export).`, { size: 8, color: pdfSlate });
  };
  groupTable('By branch', report.byBranch);
  groupTable('By month (UTC)', report.byMonth);
  groupTable('By technician', report.byTechnician);
  groupTable('By make and model', report.byModel);
  groupTable('By cause', report.byCause);
  groupTable('By cause origin', report.byOrigin);

  pdf.heading('Factory-defect review');
  pdf.table(
    ['Make and model', 'Cases', 'Units', 'Sites', 'Labour h', 'Refrigerant lb', 'Cost', 'Paid'],
    [3.5, 1, 1, 1, 1.3, 1.6, 1.6, 1.6],
    defects.models.map((m) => [
      `${m.make} ${m.model}`,
      String(m.cases),
      String(m.unitsAffected),
      String(m.sitesAffected),
      m.labourHours.toFixed(1),
      m.refrigerantLb.toFixed(1),
      usd(m.costCents),
      usd(m.paidCents),
    ]),
    { empty: 'Nothing in this period.' },
  );
  const byStatus = Object.fromEntries(warrantyClaimStatuses.map((s) => [s, defects.cases.filter((c) => c.claim.status === s).length]));
  pdf.doc.moveDown(0.3);
  pdf.paragraph(
    `Warranty claims: ${byStatus.to_claim} to claim, ${byStatus.claimed} claimed, ${byStatus.paid} paid, ${byStatus.denied} denied.`,
    {
      size: 8.5,
      color: pdfSlate,
    },
  );

  pdf.heading('Model alerts');
  pdf.table(
    ['Make and model', 'Cause', 'Sites with defect', 'Units of model', 'Checked', 'Not yet checked'],
    [3, 2.2, 1.5, 1.5, 1.2, 1.5],
    alerts.map((a) => [
      `${a.make} ${a.model}`,
      causeCodeLabels[a.causeCode],
      String(a.sites),
      String(a.unitsOfModel),
      String(a.checkedUnits),
      String(a.unchecked.length),
    ]),
    { empty: 'Nothing in this period.' },
  );
  return pdf.finish();
}

export const csvFileName = (table: FixQualityTable, from: string, to: string) => `coilpath-fix-quality-${table}-${from}-to-${to}.csv`;
