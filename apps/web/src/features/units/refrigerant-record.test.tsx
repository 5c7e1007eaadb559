/**
 * The Unit file's refrigerant record as it renders from an API answer (the numbers are the hand-worked
 * ones of the API's refrigerant-record test: 5 lb of a 100 lb charge 180 days after the last addition
 * is 10.14 %/yr, over the 10 % of 40 CFR 82.157(c)(2) [P]; 10 lb after 365 days is exactly 10 %, not over).
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import { leakObligationStateLabels, refrigerantRecordSchema, type RefrigerantRecord } from '@coilpath/contract';
import { RefrigerantRecordView, recordDownloadUrl } from './refrigerant-record';

const UNIT = '0e6f2f61-4f0b-4c38-8f5a-6c1b9d7a2e10';
const E1 = '5b0c7a52-8a1e-4a43-9a55-0f3c1d2e4b61';
const E2 = '9d3e1c7b-2a4f-4e58-b6c9-1f0a8e7d5c32';
const BR = '1d3e1c7b-2a4f-4e58-b6c9-1f0a8e7d5c33';
const blank = {
  poundsRecovered: 0,
  exempt: null,
  circuit: null,
  leakCaseId: null,
  cylinderLot: null,
  visitId: null,
  stage: null,
  passed: null,
  note: null,
  recordedAt: null,
};
const by = { name: 'Łukasz Żółć', epa608Type: 'universal', epa608Number: 'EPA-TEST-0042' };

const record: RefrigerantRecord = refrigerantRecordSchema.parse({
  asOf: '2026-07-01',
  generatedAt: '2026-07-01T17:00:00.000Z',
  appliance: {
    unitId: UNIT,
    tag: 'CH-1',
    kind: 'chiller',
    make: 'Testmake',
    model: 'TM-10',
    serial: 'RR-77',
    installDate: null,
    refrigerant: 'R-22',
    applianceCategory: 'comfort_cooling',
    fullChargeLb: 100,
    fullChargeBasis: 'As recorded on the unit.',
    circuits: [],
    site: { name: 'Site', address: '1 Test Street', city: '', region: '', customerName: 'Customer' },
    branch: { id: BR, name: 'Alpha', timeZone: 'America/Chicago' },
  },
  method: 'annualizing',
  industrialShutdown: false,
  inScope: true,
  rule: '40 CFR 82.157',
  thresholdPercent: 10,
  leakRatePercent: 10,
  chronicYears: [],
  events: [
    {
      ...blank,
      kind: 'addition',
      date: '2024-07-08',
      sourceId: E1,
      poundsAdded: 5,
      reason: 'leak_top_off',
      counted: true,
      by,
      opensObligation: true,
      rate: {
        leakRatePercent: (5 / 100) * (365 / 180) * 100,
        inScope: true,
        rule: '40 CFR 82.157',
        thresholdPercent: 10,
        overThreshold: true,
      },
    },
    {
      ...blank,
      kind: 'addition',
      date: '2025-07-08',
      sourceId: E2,
      poundsAdded: 10,
      reason: 'leak_top_off',
      counted: true,
      by,
      opensObligation: false,
      rate: { leakRatePercent: 10, inScope: true, rule: '40 CFR 82.157', thresholdPercent: 10, overThreshold: false },
    },
  ],
  obligations: [
    {
      triggeredOn: '2024-07-08',
      leakRatePercent: 10.1389,
      rule: '40 CFR 82.157',
      thresholdPercent: 10,
      repairDueDate: '2024-08-07',
      repairedOn: null,
      initialTestDue: '2024-08-07',
      followUpTestDue: null,
      state: 'overdue',
      leakCaseId: null,
      timeline: [],
    },
  ],
  openObligation: null,
  computeError: null,
  cautions: ['Defer to the manufacturer’s data, to local codes, and to licensed practice.'],
  sources: ['40 CFR 82 Subpart F, §82.157'],
});

describe('RefrigerantRecordView', () => {
  const html = renderToStaticMarkup(<RefrigerantRecordView record={record} />);
  it('shows each addition with the rate at that moment, over or not over the rule’s threshold', () => {
    expect(html).toContain('10.14 %/yr — over');
    expect(html).toContain('10.00 %/yr — not over');
    expect(html).toContain('40 CFR 82.157, 10 %');
    expect(html).toContain('Opened a repair obligation');
    expect(html).toContain('EPA 608 EPA-TEST-0042');
  });
  it('shows each obligation with its deadline and its state’s label from the vocabulary, and the caution', () => {
    expect(html).toContain(leakObligationStateLabels.overdue);
    expect(html).toContain('Repair due 7 Aug 2024');
    expect(html).toContain('role="note"');
    expect(html).toContain('local codes');
  });
  it('says so when there is nothing on record', () => {
    const empty = renderToStaticMarkup(<RefrigerantRecordView record={{ ...record, events: [], obligations: [] }} />);
    expect(empty).toContain('No refrigerant added or recovered');
    expect(empty).toContain('None: no counted addition put the leak rate over the threshold.');
  });
  it('links the CSV and PDF downloads to the record’s route', () => {
    expect(recordDownloadUrl(UNIT, 'pdf')).toBe(`/api/units/${UNIT}/refrigerant-record?format=pdf`);
  });
});
