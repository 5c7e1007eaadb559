/** The service summary a customer receives when a visit closes: plain text and a PDF copy. */
import {
  causeCodeLabels,
  causeOriginLabels,
  refrigerantEventReasonLabels,
  returnNeedLabels,
  visitOutcomeLabels,
  workOrderKindLabels,
  formatMeasure,
  type MeasureKind,
  type ReadingDto,
  type VisitDetail,
} from '@coilpath/contract';
import { createPdf, pdfSlate } from '../../lib/pdf';
import { composeMail, mail, mailTime, type MailBlock } from '../../mail/compose';

/** An instant in the branch's zone, with the zone's name: "Tue 10 Mar 2026, 09:00 CDT". */
const when = (iso: string | null, tz: string) => (iso ? mailTime(iso, tz) : '-');

/** A reading's lines, every value with its unit symbol (the reading states its units: the branch's system). */
function readingLines(r: ReadingDto, unitTag: string): string[] {
  const m = (n: number | null, kind: MeasureKind) => (n === null ? '-' : formatMeasure(n, kind, r.units));
  const p = (n: number | null) => m(n, 'pressure');
  const t = (n: number | null) => m(n, 'temperature');
  const d = (n: number | null) => m(n, 'temperatureDifference');
  const lines = [`${unitTag}, circuit ${r.circuitNumber} (${r.refrigerant})`];
  lines.push(`  Suction pressure ${p(r.suctionPressure)} (controller ${p(r.suctionPressureController)}), saturation ${t(r.suctionSaturationTemp)}`);
  lines.push(`  Suction line ${t(r.suctionLineTemp)}, superheat ${d(r.superheat)}`);
  if (r.liquidPressure !== null || r.liquidPressureController !== null)
    lines.push(`  Liquid pressure ${p(r.liquidPressure)} (controller ${p(r.liquidPressureController)}), saturation ${t(r.liquidSaturationTemp)}`);
  if (r.dischargePressure !== null || r.dischargePressureController !== null)
    lines.push(`  Discharge pressure ${p(r.dischargePressure)} (controller ${p(r.dischargePressureController)})`);
  lines.push(`  Liquid line ${t(r.liquidLineTemp)}, subcooling ${d(r.subcooling)}`);
  if (r.outdoorTemp !== null) lines.push(`  Outdoor air ${t(r.outdoorTemp)}`);
  if (r.notes) lines.push(`  Notes: ${r.notes}`);
  return lines;
}

export interface SummarySections {
  title: string;
  facts: [string, string][];
  readings: string[];
  findings: string[];
  refrigerant: string[];
  outcome: string[];
}

export function summarySections(v: VisitDetail): SummarySections {
  const tz = v.branch.timeZone;
  const tagOf = new Map(v.units.map((u) => [u.id, `${u.tag} (${u.make} ${u.model}, serial ${u.serial})`]));
  const wo = `WO-${v.workOrder.number ?? '?'}`;
  const outcome = [`Outcome: ${v.outcome ? visitOutcomeLabels[v.outcome] : '-'}`];
  if (v.outcome === 'needs_return') {
    outcome.push(`A return visit is needed for: ${v.returnNeeds.map((n) => returnNeedLabels[n]).join(', ') || '-'}. The branch will book it with you.`);
    if (v.returnNotes) outcome.push(`What is needed: ${v.returnNotes}`);
  }
  if (v.notes) outcome.push(`Technician's notes: ${v.notes}`);
  return {
    title: `Service summary ${wo} - ${v.site.name}`,
    facts: [
      ['Work order', `${wo}, ${workOrderKindLabels[v.workOrder.kind]}`],
      ['Site', `${v.site.name}, ${v.site.address}${v.site.city ? `, ${v.site.city}` : ''}`],
      ['Reported problem', v.workOrder.complaint || '-'],
      ['Units', v.units.map((u) => tagOf.get(u.id)).join('; ') || '-'],
      ['Technician', v.techName],
      ['Arrived', when(v.onSiteAt, tz)],
      ['Closed', when(v.closedAt, tz)],
      ['Branch', v.branch.name],
    ],
    readings: v.readings.flatMap((r) => readingLines(r, v.units.find((u) => u.id === r.unitId)?.tag ?? 'Unit')),
    findings: v.findings.map((f) => {
      const parts = [`${causeCodeLabels[f.causeCode]} (origin: ${causeOriginLabels[f.origin]})`];
      if (f.alarmCode) parts.push(`alarm ${f.alarmCode}`);
      if (f.reportedCircuit !== null || f.actualCircuit !== null)
        parts.push(`reported on circuit ${f.reportedCircuit ?? '-'}, found on circuit ${f.actualCircuit ?? '-'}`);
      return `${parts.join('; ')}${f.notes ? `. ${f.notes}` : ''}`;
    }),
    refrigerant: v.refrigerantEvents.map(
      (e) =>
        `${e.date}: ${e.refrigerant}, added ${e.poundsAdded.toFixed(1)} lb, recovered ${e.poundsRecovered.toFixed(1)} lb (${refrigerantEventReasonLabels[e.reason]})${e.cylinderLot ? `, cylinder/lot ${e.cylinderLot}` : ''}`,
    ),
    outcome,
  };
}

/** The summary as e-mail blocks: the same sections as the PDF. */
export function summaryBlocks(s: SummarySections): MailBlock[] {
  const blocks: MailBlock[] = [mail.facts(s.facts), mail.heading('Readings')];
  if (!s.readings.length) blocks.push(mail.p('No readings were recorded.'));
  // A reading's first line names the unit and circuit; the indented lines below are its values.
  for (const l of s.readings) blocks.push(mail.p(l.startsWith('  ') ? l.trim() : l));
  blocks.push(mail.heading('Findings'), s.findings.length ? mail.list(s.findings) : mail.p('No findings were recorded.'));
  if (s.refrigerant.length) blocks.push(mail.heading('Refrigerant'), mail.list(s.refrigerant));
  blocks.push(mail.heading('Outcome'), ...s.outcome.map((l) => mail.p(l)));
  blocks.push(mail.p('A PDF copy of this summary is attached.', true));
  return blocks;
}

/** The summary e-mail: plain text and HTML from the same blocks. */
export function summaryMail(s: SummarySections): { subject: string; text: string; html: string } {
  return composeMail(s.title, summaryBlocks(s));
}

/** The plain-text part (also what the PDF is checked against). */
export function summaryText(s: SummarySections): string {
  return summaryMail(s).text;
}

/** The same summary as a PDF, through the shared setup (Roboto Flex embedded, tagged for screen readers). */
export function summaryPdf(s: SummarySections, createdAt?: Date): Promise<Buffer> {
  const pdf = createPdf({ title: s.title, subject: 'Service summary', createdAt });
  pdf.heading(s.title, 1);
  for (const [k, val] of s.facts) pdf.paragraph(val, { lead: `${k}: ` });
  pdf.heading('Readings');
  if (!s.readings.length) pdf.paragraph('No readings were recorded.', { color: pdfSlate });
  for (const l of s.readings) pdf.paragraph(l.trim(), l.startsWith('  ') ? {} : { strong: true });
  pdf.heading('Findings');
  if (!s.findings.length) pdf.paragraph('No findings were recorded.', { color: pdfSlate });
  pdf.list(s.findings);
  if (s.refrigerant.length) {
    pdf.heading('Refrigerant');
    pdf.list(s.refrigerant);
  }
  pdf.heading('Outcome');
  for (const l of s.outcome) pdf.paragraph(l);
  pdf.doc.moveDown(1);
  pdf.paragraph(
    'Readings guide diagnosis alongside the equipment manufacturer’s data. Refrigerant work is done under EPA Section 608 certification.',
    { size: 8, color: pdfSlate },
  );
  return pdf.finish();
}
