import { describe, expect, it } from 'vitest';
import { summaryPdf, summaryText, type SummarySections } from '../modules/visits/summary';
import { pdfFontNames, readPdf } from '../testing/pdf-text';
import { createPdf } from './pdf';

const polish = 'Łukasz Żółć';
const vietnamese = 'Nguyễn Thị Hương';

const sections: SummarySections = {
  title: `Service summary WO-1042 - Hội An Clinic`,
  contractor: ['Żółć & Nguyễn Cooling', '12 Żurawia, Kraków'],
  facts: [
    ['Work order', 'WO-1042, Repair'],
    ['Site', 'Hội An Clinic, 12 Żurawia, Kraków'],
    ['Technician', polish],
    ['Arrived', 'Fri 4 Dec 2026, 09:15 CST'],
  ],
  readings: [
    'RTU-1, circuit 1 (R-410A)',
    '  Suction pressure 118.0 psig (controller 120.0 psig), saturation 39.8 °F',
    '  Superheat 11.8 °F (line 51.6 °F − dew 39.8 °F)',
  ],
  findings: [`Refrigerant leak (origin: wear). Reported by ${vietnamese}: charge ≥ 2 lb short → leak search`],
  refrigerant: ['2026-12-04: R-410A, added 2.0 lb, recovered 0.0 lb (Leak repair)'],
  leaks: [],
  outcome: ['Outcome: Resolved', `Technician's notes: change of −0.02 in the trend; ${vietnamese} confirmed`],
  signOff: { lines: [`Signed by ${vietnamese}`, 'Signed Fri 4 Dec 2026, 11:40 CST'], image: null },
};

describe('the shared PDF setup', () => {
  it('prints names and signs as written, in Roboto Flex, with no standard font', async () => {
    const pdf = await summaryPdf(sections, new Date('2026-12-04T15:30:00Z'));
    const read = await readPdf(pdf);
    // Every line of the e-mail's text that is content (not the e-mail's own notes) is in the PDF, as written.
    const expected = summaryText(sections)
      .split('\n')
      .map((l) => l.replace(/^- /, '').trim())
      .filter((l) => l && !l.startsWith('A PDF copy') && l !== 'Coilpath');
    for (const line of expected) expect(read.flat, line).toContain(line.replace(/\s+/g, ' '));
    for (const s of [polish, vietnamese, '−', '→', '≥', '°F', 'Kraków', 'manufacturer’s']) expect(read.flat).toContain(s);
    expect(read.flat).not.toContain('\uFFFD');
    const fonts = pdfFontNames(pdf);
    expect(fonts.length).toBeGreaterThan(0);
    for (const f of fonts) expect(f).toMatch(/^[A-Z]{6}\+RobotoFlex-Regular$/); // a subset of Roboto Flex, nothing else
    expect(pdf.toString('latin1')).toContain('/FontFile2');
  });

  it('is tagged: language, title shown by the viewer, marked content and a structure in reading order', async () => {
    const read = await readPdf(await summaryPdf(sections));
    expect(read.title).toBe(sections.title);
    expect(read.displayDocTitle).toBe(true);
    expect(read.language).toBe('en-US');
    expect(read.marked).toBe(true);
    expect(read.roles[0]).toBe('Root');
    expect(read.roles[1]).toBe('Document');
    expect(read.roles.filter((r) => r === 'H1')).toHaveLength(1);
    expect(read.roles.filter((r) => r === 'H2')).toEqual(['H2', 'H2', 'H2', 'H2', 'H2']); // Readings, Findings, Refrigerant, Outcome, Customer sign-off
    expect(read.roles).toEqual(expect.arrayContaining(['P', 'L', 'LI', 'Lbl', 'LBody']));
  });

  it('tags tables (TH/TD) across pages and repeats the header row on each page without repeating it to a screen reader', async () => {
    const pdf = createPdf({ title: 'Table test', createdAt: new Date('2026-12-04T00:00:00Z') });
    pdf.heading('People', 1);
    const rows = Array.from({ length: 120 }, (_, i) => [i % 2 ? polish : vietnamese, String(i), `−${i}.5`]);
    pdf.table(['Name', 'Row', 'Change'], [3, 1, 1], rows);
    const read = await readPdf(await pdf.finish());
    expect(read.pages).toBeGreaterThan(1);
    // Header drawn on every page…
    expect(read.text.match(/NameRowChange|Name\s*Row\s*Change/g)?.length).toBe(read.pages);
    // …but one header row in the structure, and one TR per data row.
    expect(read.roles.filter((r) => r === 'TH')).toHaveLength(3);
    expect(read.contentRoles.filter((r) => r === 'TH')).toHaveLength(3);
    expect(read.contentRoles.filter((r) => r === 'TD')).toHaveLength(360);
    expect(read.roles.filter((r) => r === 'TR')).toHaveLength(121);
    expect(read.roles.filter((r) => r === 'TD')).toHaveLength(360);
    for (let i = 0; i < rows.length; i += 17) expect(read.flat).toContain(`${rows[i]![0]} ${i} −${i}.5`);
  });
});
