/**
 * The service summary a customer receives when a visit closes: plain text and a PDF copy. It speaks for the
 * contractor (the branch's trading name, address, phone, licence number and office e-mail; the technician's
 * name and EPA 608 certification number) and tells the customer only what is theirs: notes marked for the
 * customer, the findings in plain words, the readings, refrigerant added or recovered, and any open leak
 * case with its repair deadline. Internal notes (a visit's or finding's notes left `internal`, reading notes,
 * return-visit needs and their notes) never go into it.
 */
import {
  scheduleDay,
  causeCodeLabels,
  causeOriginLabels,
  refrigerantEventReasonLabels,
  visitOutcomeLabels,
  workOrderKindLabels,
  formatMeasure,
  type MeasureKind,
  type ReadingDto,
  type VisitDetail,
} from '@coilpath/contract';
import { createPdf, pdfSlate, type CoilpathPdf } from '../../lib/pdf';
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
  lines.push(
    `  Suction pressure ${p(r.suctionPressure)} (controller ${p(r.suctionPressureController)}), saturation ${t(r.suctionSaturationTemp)}`,
  );
  lines.push(`  Suction line ${t(r.suctionLineTemp)}, superheat ${d(r.superheat)}`);
  if (r.liquidPressure !== null || r.liquidPressureController !== null)
    lines.push(
      `  Liquid pressure ${p(r.liquidPressure)} (controller ${p(r.liquidPressureController)}), saturation ${t(r.liquidSaturationTemp)}`,
    );
  if (r.dischargePressure !== null || r.dischargePressureController !== null)
    lines.push(`  Discharge pressure ${p(r.dischargePressure)} (controller ${p(r.dischargePressureController)})`);
  lines.push(`  Liquid line ${t(r.liquidLineTemp)}, subcooling ${d(r.subcooling)}`);
  if (r.outdoorTemp !== null) lines.push(`  Outdoor air ${t(r.outdoorTemp)}`);
  // A reading's notes are the technician's working notes: internal.
  return lines;
}

/** Who the summary speaks for, and what the visit's units owe under the leak-repair rules. */
export interface SummaryContext {
  contractor: { tradingName: string; address: string; phone: string; licenceNumber: string; email: string };
  technician: { name: string; epa608Number: string | null };
  /** Open leak cases on the visit's units (repair still due). */
  openLeakCases: { unitTag: string; openedOn: string; leakRatePercent: number; thresholdPercent: number; repairDueDate: string }[];
  /** The customer's signature (PNG bytes, checked at close-out) when the visit's sign-off is `signed`. */
  signatureImage?: Buffer | null;
}

export interface SummarySections {
  title: string;
  /** The contractor's name and how to reach it (heads the summary). */
  contractor: string[];
  facts: [string, string][];
  readings: string[];
  findings: string[];
  refrigerant: string[];
  /** Open leak cases with their repair deadlines. */
  leaks: string[];
  outcome: string[];
  /** The customer's sign-off in words ("Signed by …, <time in the branch's zone>" or not available), and the image. */
  signOff: { lines: string[]; image: Buffer | null };
}

export function summarySections(v: VisitDetail, c: SummaryContext): SummarySections {
  const tz = v.branch.timeZone;
  const tagOf = new Map(v.units.map((u) => [u.id, `${u.tag} (${u.make} ${u.model}, serial ${u.serial})`]));
  const wo = `WO-${v.workOrder.number ?? '?'}`;
  const outcome = [`Outcome: ${v.outcome ? visitOutcomeLabels[v.outcome] : '-'}`];
  // What the return visit needs (parts, a second technician…) and its notes are the office's: internal.
  if (v.outcome === 'needs_return') outcome.push('A return visit is needed. We will contact you to book it.');
  if (v.notes && v.notesAudience === 'customer') outcome.push(`Technician's notes: ${v.notes}`);
  const name = c.contractor.tradingName.trim() || v.branch.name;
  const contractor = [
    name,
    c.contractor.address.trim(),
    [c.contractor.phone.trim() && `Phone ${c.contractor.phone.trim()}`, c.contractor.email.trim()].filter(Boolean).join(' · '),
    c.contractor.licenceNumber.trim() && `Licence ${c.contractor.licenceNumber.trim()}`,
  ].filter((l): l is string => !!l);
  const techLine = c.technician.epa608Number?.trim()
    ? `${c.technician.name} (EPA 608 certification ${c.technician.epa608Number.trim()})`
    : c.technician.name;
  return {
    title: `Service summary ${wo} - ${v.site.name}`,
    contractor,
    facts: [
      ['Work order', `${wo}, ${workOrderKindLabels[v.workOrder.kind]}`],
      ['Site', `${v.site.name}, ${v.site.address}${v.site.city ? `, ${v.site.city}` : ''}`],
      ['Reported problem', v.workOrder.complaint || '-'],
      ['Units', v.units.map((u) => tagOf.get(u.id)).join('; ') || '-'],
      ['Technician', techLine],
      ['Arrived', when(v.onSiteAt, tz)],
      ['Closed', when(v.closedAt, tz)],
    ],
    readings: v.readings.flatMap((r) => readingLines(r, v.units.find((u) => u.id === r.unitId)?.tag ?? 'Unit')),
    findings: v.findings.map((f) => {
      const parts = [`${causeCodeLabels[f.causeCode]} (origin: ${causeOriginLabels[f.origin]})`];
      if (f.alarmCode) parts.push(`alarm ${f.alarmCode}`);
      if (f.reportedCircuit !== null || f.actualCircuit !== null)
        parts.push(`reported on circuit ${f.reportedCircuit ?? '-'}, found on circuit ${f.actualCircuit ?? '-'}`);
      return `${parts.join('; ')}${f.notes && f.notesAudience === 'customer' ? `. ${f.notes}` : ''}`;
    }),
    refrigerant: v.refrigerantEvents.map(
      (e) =>
        `${scheduleDay(e.date)}: ${e.refrigerant}, added ${e.poundsAdded.toFixed(1)} lb, recovered ${e.poundsRecovered.toFixed(1)} lb (${refrigerantEventReasonLabels[e.reason]})${e.cylinderLot ? `, cylinder/lot ${e.cylinderLot}` : ''}`,
    ),
    leaks: c.openLeakCases.map(
      (l) =>
        `${l.unitTag}: a leak rate of ${l.leakRatePercent.toFixed(1)} % a year is above the ${l.thresholdPercent} % limit (found ${scheduleDay(l.openedOn)}). The repair is due by ${scheduleDay(l.repairDueDate)}.`,
    ),
    outcome,
    signOff: signOffOf(v, c.signatureImage ?? null),
  };
}

/** The sign-off section: who signed and when (in the branch's zone), or that no one was there to sign. */
function signOffOf(v: VisitDetail, image: Buffer | null): SummarySections['signOff'] {
  const sig = v.signature;
  if (sig?.kind === 'signed') return { lines: [`Signed by ${sig.signerName}`, `Signed ${when(sig.signedAt, v.branch.timeZone)}`], image };
  if (sig?.kind === 'customer_not_available') return { lines: ['Customer not available to sign'], image: null };
  return { lines: [], image: null };
}

/** The summary as e-mail blocks: the same sections as the PDF. */
export function summaryBlocks(s: SummarySections): MailBlock[] {
  const blocks: MailBlock[] = [...s.contractor.map((l, i) => mail.p(l, i > 0)), mail.facts(s.facts), mail.heading('Readings')];
  if (!s.readings.length) blocks.push(mail.p('No readings were recorded.'));
  // A reading's first line names the unit and circuit; the indented lines below are its values.
  for (const l of s.readings) blocks.push(mail.p(l.startsWith('  ') ? l.trim() : l));
  blocks.push(mail.heading('Findings'), s.findings.length ? mail.list(s.findings) : mail.p('No findings were recorded.'));
  if (s.refrigerant.length) blocks.push(mail.heading('Refrigerant'), mail.list(s.refrigerant));
  if (s.leaks.length) blocks.push(mail.heading('Leak repair due'), mail.list(s.leaks));
  blocks.push(mail.heading('Outcome'), ...s.outcome.map((l) => mail.p(l)));
  if (s.signOff.lines.length) blocks.push(mail.heading('Customer sign-off'), ...s.signOff.lines.map((l) => mail.p(l)));
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

/** Largest box the signature is drawn in, in points (1/72 in): about 3.3 × 1.1 in. */
const SIGNATURE_BOX = { width: 240, height: 80 };

/**
 * Draws the signature image (a PNG checked at close-out) as a tagged Figure whose alternate text names the
 * signer, scaled to fit `SIGNATURE_BOX` with its proportions, above a thin rule (an artifact).
 */
function signatureFigure(pdf: CoilpathPdf, png: Buffer, alt: string) {
  // PNG spec §11.2.2: width and height are the first 8 bytes of IHDR's data (offset 16).
  const w = png.readUInt32BE(16);
  const h = png.readUInt32BE(20);
  const scale = Math.min(SIGNATURE_BOX.width / w, SIGNATURE_BOX.height / h);
  const size = { width: w * scale, height: h * scale };
  pdf.ensureSpace(size.height + 30);
  const y = pdf.doc.y + 4;
  pdf.figure(alt, () => void pdf.doc.image(png, pdf.left, y, size));
  pdf.artifact(() => {
    pdf.doc
      .moveTo(pdf.left, y + size.height + 2)
      .lineTo(pdf.left + SIGNATURE_BOX.width, y + size.height + 2)
      .lineWidth(0.5)
      .strokeColor(pdfSlate)
      .stroke();
  });
  pdf.doc.x = pdf.left;
  pdf.doc.y = y + size.height + 6;
}

/** The same summary as a PDF, through the shared setup (Roboto Flex embedded, tagged for screen readers). */
export function summaryPdf(s: SummarySections, createdAt?: Date): Promise<Buffer> {
  const pdf = createPdf({ title: s.title, subject: 'Service summary', createdAt });
  pdf.heading(s.title, 1);
  s.contractor.forEach((l, i) => pdf.paragraph(l, i === 0 ? { strong: true } : { color: pdfSlate }));
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
  if (s.leaks.length) {
    pdf.heading('Leak repair due');
    pdf.list(s.leaks);
  }
  pdf.heading('Outcome');
  for (const l of s.outcome) pdf.paragraph(l);
  if (s.signOff.lines.length) {
    pdf.heading('Customer sign-off');
    if (s.signOff.image) signatureFigure(pdf, s.signOff.image, s.signOff.lines[0]!);
    for (const l of s.signOff.lines) pdf.paragraph(l);
  }
  pdf.doc.moveDown(1);
  pdf.paragraph(
    'Readings guide diagnosis alongside the equipment manufacturer’s data. Refrigerant work is done under EPA Section 608 certification.',
    { size: 8, color: pdfSlate },
  );
  return pdf.finish();
}
