/** CSV (papaparse) and PDF (pdfkit) exports of the Fix Quality report. */
import Papa from 'papaparse';
import PDFDocument from 'pdfkit';
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
  'opened_at_utc',
  'visits',
  'labour_hours',
  'labour_cost',
  'refrigerant_lb',
  'refrigerant_cost',
  'cost',
  'currency',
  'claim_status',
  'claim_amount',
  'claim_reference',
] as const;

const alertColumns = ['make', 'model', 'cause', 'sites_with_defect', 'branch', 'site', 'unit', 'serial', 'install_date', 'warranty_end'] as const;

export interface CsvSources {
  report?: FixQualityReport;
  defects?: FactoryDefectReview;
  alerts?: ModelAlert[];
}

/** One table of the report as CSV: a header row and one row per group, case or unchecked unit. */
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
      opened_at_utc: c.openedAt,
      visits: c.visits,
      labour_hours: (c.labourMinutes / 60).toFixed(2),
      labour_cost: money(c.labourCostCents),
      refrigerant_lb: c.refrigerantLb.toFixed(2),
      refrigerant_cost: money(c.refrigerantCostCents),
      cost: money(c.costCents),
      currency: c.currency,
      claim_status: c.claim.status,
      claim_amount: money(c.claim.amountCents),
      claim_reference: c.claim.reference ?? '',
    }));
    return Papa.unparse({ fields: [...caseColumns], data: rows.map((r) => caseColumns.map((k) => r[k])) });
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
    return Papa.unparse({ fields: [...alertColumns], data: rows.map((r) => alertColumns.map((k) => r[k])) });
  }
  const groups = src.report?.[table] ?? [];
  return Papa.unparse({ fields: [...groupColumns], data: groups.map(groupRow).map((r) => groupColumns.map((k) => r[k])) });
}

// ---------------------------------------------------------------------------------------------
// PDF
// ---------------------------------------------------------------------------------------------

const pct = (r: number | null) => (r === null ? '—' : `${(r * 100).toFixed(1)} %`);
const pts = (d: number | null) => (d === null ? '—' : `${d >= 0 ? '+' : '−'}${Math.abs(d * 100).toFixed(1)} pts`);
const signed = (d: number | null, digits = 2) => (d === null ? '—' : `${d >= 0 ? '+' : '−'}${Math.abs(d).toFixed(digits)}`);
const usd = (cents: number, currency = 'USD') =>
  (cents / 100).toLocaleString('en-US', { style: 'currency', currency, maximumFractionDigits: 0 });

interface PdfInput {
  report: FixQualityReport;
  defects: FactoryDefectReview;
  alerts: ModelAlert[];
  branchName: string;
  generatedAt: Date;
}

/** The whole period's report as a PDF (A4/Letter-neutral margins, Helvetica). */
export function reportPdf({ report, defects, alerts, branchName, generatedAt }: PdfInput): Promise<Buffer> {
  const doc = new PDFDocument({ size: 'LETTER', margin: 48, info: { Title: `Coilpath Fix Quality ${report.period.from} to ${report.period.to}`, Author: 'Coilpath' } });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const width = doc.page.width - 96;
  const ink = '#17212B';
  const slate = '#5B6B7A';

  doc.fillColor(ink).font('Helvetica-Bold').fontSize(18).text('Fix Quality');
  doc.font('Helvetica').fontSize(10).fillColor(slate)
    .text(`${branchName} · ${report.period.from} to ${report.period.to} (UTC dates) · compared with ${report.previousPeriod.from} to ${report.previousPeriod.to}`)
    .text(`Generated ${generatedAt.toISOString().slice(0, 16).replace('T', ' ')} UTC by Coilpath`);
  doc.moveDown();

  const heading = (t: string) => {
    if (doc.y > doc.page.height - 140) doc.addPage();
    doc.moveDown(0.6).fillColor(ink).font('Helvetica-Bold').fontSize(12).text(t).moveDown(0.3);
  };

  const table = (headers: string[], widths: number[], body: string[][]) => {
    const total = widths.reduce((a, b) => a + b, 0);
    const w = widths.map((x) => (x / total) * width);
    const drawRow = (cells: string[], bold: boolean) => {
      if (doc.y > doc.page.height - 64) doc.addPage();
      const y = doc.y;
      let x = 48;
      let h = 0;
      doc.font(bold ? 'Helvetica-Bold' : 'Helvetica').fontSize(8.5).fillColor(ink);
      cells.forEach((c, i) => {
        const cw = w[i]!;
        doc.text(c, x + 2, y, { width: cw - 4, align: i === 0 ? 'left' : 'right' });
        h = Math.max(h, doc.y - y);
        x += cw;
      });
      doc.y = y + h + 3;
      doc.x = 48;
      doc.moveTo(48, doc.y - 1.5).lineTo(48 + width, doc.y - 1.5).lineWidth(0.4).strokeColor('#D5DDE4').stroke();
    };
    drawRow(headers, true);
    for (const r of body) drawRow(r, false);
    if (body.length === 0) doc.font('Helvetica-Oblique').fontSize(9).fillColor(slate).text('Nothing in this period.', 48);
    doc.x = 48;
  };

  heading('Headline');
  table(
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
    ],
  );
  doc.moveDown(0.4).font('Helvetica').fontSize(8.5).fillColor(slate).text(
    `How these are counted: a service call counts when its first visit was not declined. It is fixed the first time when that visit ` +
      `resolved it and no return visit or callback was opened within the branch's callback window (${report.windowDays.join(' / ') || 30} days) ` +
      `after the visit closed. The callback rate divides the calls with a callback inside the window by the calls resolved on the first visit. ` +
      `Days to resolve run from the call being opened to the close of its last visit (including follow-ups), for calls that ended resolved. ` +
      `The period holds the calls whose first visit closed within it (UTC dates).`,
    { width },
  );

  const groupTable = (title: string, groups: FixQualityGroup[], limit = 30) => {
    heading(title);
    table(
      ['', 'Calls', 'First-time fix', 'Callbacks', 'Callback rate', 'Return visits / call', 'Days to resolve'],
      [4, 1.2, 1.8, 1.4, 1.6, 1.8, 1.6],
      groups.slice(0, limit).map((g) => [
        g.label,
        String(g.eligible),
        pct(g.firstTimeFixRate),
        String(g.callbacks),
        pct(g.callbackRate),
        g.returnVisitsPerServiceCall?.toFixed(2) ?? '—',
        g.avgDaysToResolve?.toFixed(1) ?? '—',
      ]),
    );
    if (groups.length > limit) doc.font('Helvetica-Oblique').fontSize(8).fillColor(slate).text(`… and ${groups.length - limit} more (see the CSV export).`, 48);
  };
  groupTable('By branch', report.byBranch);
  groupTable('By month (UTC)', report.byMonth);
  groupTable('By technician', report.byTechnician);
  groupTable('By make and model', report.byModel);
  groupTable('By cause', report.byCause);
  groupTable('By cause origin', report.byOrigin);

  heading('Factory-defect review');
  table(
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
  );
  const byStatus = Object.fromEntries(warrantyClaimStatuses.map((s) => [s, defects.cases.filter((c) => c.claim.status === s).length]));
  doc.moveDown(0.3).font('Helvetica').fontSize(8.5).fillColor(slate)
    .text(`Warranty claims: ${byStatus.to_claim} to claim, ${byStatus.claimed} claimed, ${byStatus.paid} paid, ${byStatus.denied} denied.`, 48);

  heading('Model alerts');
  table(
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
  );
  doc.end();
  return done;
}

export const csvFileName = (table: FixQualityTable, from: string, to: string) =>
  `coilpath-fix-quality-${table}-${from}-to-${to}.csv`;
