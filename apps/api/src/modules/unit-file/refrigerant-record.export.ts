/** The refrigerant record as CSV (the shared `toCsv`) and as PDF (the shared `createPdf`): the copy a manager hands an auditor. */
import { csvTimestamp, toCsv } from '@coilpath/calc';
import {
  recordDate,
  additionExemptionLabels,
  applianceCategoryLabels,
  epa608Labels,
  leakObligationStateLabels,
  leakRateMethodLabels,
  refrigerantEventReasonLabels,
  refrigerantRecordEntryText,
  refrigerantRecordEventKindLabels,
  unitKindLabels,
  type Epa608Type,
  type RefrigerantRecord,
  type RefrigerantRecordEvent,
} from '@coilpath/contract';
import { createPdf, pdfSlate } from '../../lib/pdf';

const pct = (n: number | null | undefined) => (n === null || n === undefined ? '' : n.toFixed(2));
const lb = (n: number | null) => (n === null ? '' : String(n));
const certText = (p: RefrigerantRecordEvent['by']) =>
  p ? `${epa608Labels[p.epa608Type as Epa608Type] ?? p.epa608Type}${p.epa608Number ? ` ${p.epa608Number}` : ''}` : '';

export const recordCsvColumns = [
  'record',
  'date',
  'entry',
  'pounds_added',
  'pounds_recovered',
  'reason',
  'circuit',
  'exempt',
  'counted',
  'leak_case',
  'technician',
  'epa608_certification',
  'leak_rate_pct_per_year',
  'rule',
  'threshold_pct',
  'over_threshold',
  'repair_due',
  'repaired_on',
  'initial_test_due',
  'follow_up_test_due',
  'state',
  'test_passed',
  'cylinder_lot',
  'recorded_at',
  'unit_tag',
  'serial',
  'refrigerant',
  'full_charge_lb',
] as const;

/**
 * One row per entry (`record` = event), then one per obligation (`record` = obligation), each with the
 * unit's tag, serial, refrigerant and full charge; `recorded_at` in the branch's zone with its offset.
 */
export function recordCsv(r: RefrigerantRecord): string {
  const unit = {
    unit_tag: r.appliance.tag,
    serial: r.appliance.serial,
    refrigerant: r.appliance.refrigerant,
    full_charge_lb: r.appliance.fullChargeLb,
  };
  const events = r.events.map((e) => ({
    record: 'event',
    date: e.date,
    entry:
      e.kind === 'verification' ? `${refrigerantRecordEventKindLabels[e.kind]} (${e.stage})` : refrigerantRecordEventKindLabels[e.kind],
    pounds_added: e.kind === 'addition' || e.kind === 'recovery' ? e.poundsAdded : null,
    pounds_recovered: e.kind === 'addition' || e.kind === 'recovery' ? e.poundsRecovered : null,
    reason: e.reason ? refrigerantEventReasonLabels[e.reason] : null,
    circuit: e.circuit,
    exempt: e.exempt ? additionExemptionLabels[e.exempt] : null,
    counted: e.kind === 'addition' ? e.counted : null,
    leak_case: e.leakCaseId,
    technician: e.by?.name ?? null,
    epa608_certification: certText(e.by) || null,
    leak_rate_pct_per_year: e.rate ? pct(e.rate.leakRatePercent) : null,
    rule: e.rate?.rule ?? null,
    threshold_pct: e.rate?.thresholdPercent ?? null,
    over_threshold: e.rate ? e.rate.overThreshold : null,
    test_passed: e.passed,
    cylinder_lot: e.cylinderLot,
    recorded_at: csvTimestamp(e.recordedAt, r.appliance.branch.timeZone),
    ...unit,
  }));
  const obligations = r.obligations.map((o) => ({
    record: 'obligation',
    date: o.triggeredOn,
    entry: 'Leak-repair obligation',
    leak_case: o.leakCaseId,
    leak_rate_pct_per_year: pct(o.leakRatePercent),
    rule: o.rule,
    threshold_pct: o.thresholdPercent,
    over_threshold: true,
    repair_due: o.repairDueDate,
    repaired_on: o.repairedOn,
    initial_test_due: o.initialTestDue,
    follow_up_test_due: o.followUpTestDue,
    state: leakObligationStateLabels[o.state],
    ...unit,
  }));
  return toCsv(recordCsvColumns, [...events, ...obligations]);
}

export function recordFileName(r: RefrigerantRecord, ext: 'csv' | 'pdf'): string {
  return `coilpath-refrigerant-record-${r.appliance.tag.replace(/[^\w.-]+/g, '_')}-${r.asOf}.${ext}`;
}

/** The auditor's PDF: identity, rule, every entry with its rate, the obligations, cautions and sources. */
export async function recordPdf(r: RefrigerantRecord, generatedAt: Date): Promise<Buffer> {
  const a = r.appliance;
  const pdf = createPdf({
    title: `Refrigerant record — ${a.tag}, ${a.site.name}`,
    subject: 'Refrigerant leak-repair record',
    createdAt: generatedAt,
  });
  pdf.heading(`Refrigerant record — ${a.tag}`, 1);
  pdf.paragraph(`As of ${r.asOf} (${a.branch.name}, ${a.branch.timeZone}); generated ${csvTimestamp(r.generatedAt, a.branch.timeZone)}.`, {
    size: 9,
    color: pdfSlate,
  });

  pdf.heading('Appliance');
  pdf.paragraph(`${a.site.name} — ${a.site.customerName}, ${[a.site.address, a.site.city, a.site.region].filter(Boolean).join(', ')}`, {
    lead: 'Site: ',
  });
  pdf.paragraph(
    `${a.tag}, ${unitKindLabels[a.kind]}: ${a.make} ${a.model}, serial ${a.serial}${a.installDate ? `, installed ${recordDate(a.installDate)}` : ''}`,
    { lead: 'Unit: ' },
  );
  pdf.paragraph(`${a.refrigerant}; ${applianceCategoryLabels[a.applianceCategory]}`, { lead: 'Refrigerant and category: ' });
  pdf.paragraph(`${a.fullChargeLb} lb. ${a.fullChargeBasis}`, { lead: 'Full charge: ' });
  if (a.circuits.length > 1) {
    pdf.paragraph(
      `${a.circuits.map((c) => `circuit ${c.number}${c.chargeLb !== null ? ` ${c.chargeLb} lb` : ''}`).join(', ')}. The leak rate is the appliance's, against its full charge (40 CFR 82.152 "leak rate").`,
      { lead: 'Circuits: ' },
    );
  }

  pdf.heading('Rule and leak rate');
  if (r.computeError) pdf.paragraph(r.computeError);
  else if (r.inScope)
    pdf.paragraph(`${r.rule}, threshold ${r.thresholdPercent} % per year (repair owed when the rate is over it).`, {
      lead: 'Rule in force: ',
    });
  else pdf.paragraph('No leak-repair rule applies to this refrigerant and full charge on this date.', { lead: 'Rule in force: ' });
  pdf.paragraph(`${pct(r.leakRatePercent)} % per year at the latest counted addition (${leakRateMethodLabels[r.method]}).`, {
    lead: 'Leak rate: ',
  });
  pdf.paragraph(
    r.industrialShutdown ? 'Industrial-process shutdown claimed (120 days).' : 'No industrial-process shutdown claimed: 30 days to repair.',
    { lead: 'Repair window: ' },
  );
  if (r.chronicYears.length)
    pdf.paragraph(`${r.chronicYears.join(', ')}: 125 % or more of full charge added; report to EPA by 1 March of the next year.`, {
      lead: 'Chronic leaker: ',
    });

  pdf.heading('Refrigerant events, repairs and tests');
  pdf.table(
    ['Date', 'Entry', 'lb', 'Counted', 'Rate %/yr', 'Rule, threshold', 'By, EPA 608'],
    [11, 24, 7, 13, 9, 17, 19],
    r.events.map((e) => [
      e.date,
      `${refrigerantRecordEntryText(e)}${e.opensObligation ? ' — opened a repair obligation' : ''}`,
      e.kind === 'addition' ? lb(e.poundsAdded) : e.kind === 'recovery' ? `−${lb(e.poundsRecovered)}` : '',
      e.kind === 'addition' ? (e.exempt ? additionExemptionLabels[e.exempt] : 'Yes') : '',
      e.rate ? pct(e.rate.leakRatePercent) : '',
      e.rate
        ? e.rate.inScope
          ? `${e.rate.rule}, ${e.rate.thresholdPercent} %${e.rate.overThreshold ? ' (over)' : ''}`
          : 'No rule applies'
        : '',
      e.by ? `${e.by.name}${certText(e.by) ? `, ${certText(e.by)}` : ''}` : '',
    ]),
    { align: ['left', 'left', 'right', 'left', 'right', 'left', 'left'], empty: 'No refrigerant events are recorded for this unit.' },
  );

  pdf.heading('Repair obligations');
  pdf.table(
    ['Triggered', 'Rate %/yr', 'Rule, threshold', 'Repair due', 'Repaired', 'Initial test due', 'Follow-up due', 'State'],
    [11, 9, 16, 11, 11, 12, 12, 18],
    r.obligations.map((o) => [
      o.triggeredOn,
      pct(o.leakRatePercent),
      `${o.rule ?? ''}, ${o.thresholdPercent ?? ''} %`,
      o.repairDueDate,
      o.repairedOn ?? '',
      o.initialTestDue,
      o.followUpTestDue ?? '',
      leakObligationStateLabels[o.state],
    ]),
    {
      align: ['left', 'right', 'left', 'left', 'left', 'left', 'left', 'left'],
      empty: 'No repair obligation: no counted addition put the leak rate over the threshold.',
    },
  );

  pdf.heading('Cautions');
  pdf.list(r.cautions);
  pdf.heading('Sources');
  pdf.list(r.sources, { size: 8.5 });
  return pdf.finish();
}
