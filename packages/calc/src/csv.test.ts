import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { CSV_BOM, csvCellText, csvTimestamp, toCsv } from './csv';

/** Reads the file back as a spreadsheet import would: bytes decoded as UTF-8, then papaparse. */
function readBack(csv: string) {
  const bytes = new TextEncoder().encode(csv);
  const text = new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes);
  return { bytes, text, rows: Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { skipEmptyLines: true }).data };
}

describe('CSV writer', () => {
  it('writes UTF-8 with a byte-order mark and CRLF after every line, header included', () => {
    const csv = toCsv(
      ['name', 'note'],
      [
        { name: 'Łukasz Żółć', note: 'line one\nline two' },
        { name: 'Nguyễn Thị Hương', note: 'a, "quoted" b' },
      ],
    );
    const { bytes, text, rows } = readBack(csv);
    expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    expect(text.startsWith(CSV_BOM)).toBe(true);
    // Every line end outside a quoted cell is CRLF; the file ends with one.
    expect(csv.endsWith('\r\n')).toBe(true);
    expect(csv.replace(/"[^"]*(""[^"]*)*"/g, '').match(/\n/g)).toHaveLength(3);
    expect(csv.replace(/"[^"]*(""[^"]*)*"/g, '').match(/(?<!\r)\n/g)).toBeNull();
    expect(rows).toEqual([
      ['name', 'note'],
      ['Łukasz Żółć', 'line one\nline two'],
      ['Nguyễn Thị Hương', 'a, "quoted" b'],
    ]);
  });

  it('neutralises text that a spreadsheet would run as a formula, and only that', () => {
    const nasty = ['=HYPERLINK("http://x.example","y")', '+1+2', '-2+3+cmd', '@SUM(A1)', '\t=1', '\r=1'];
    const csv = toCsv(
      ['v'],
      nasty.map((v) => ({ v })),
    );
    const { rows } = readBack(csv);
    expect(rows.slice(1).map((r) => r[0])).toEqual(nasty.map((v) => `'${v}`));
    for (const r of rows.slice(1)) expect(r[0]).toMatch(/^'/);
  });

  it('keeps numbers numbers: a negative change still reads -0.02', () => {
    const csv = toCsv(
      ['change', 'count', 'text_number', 'sci', 'flag', 'empty'],
      [{ change: -0.02, count: 3, text_number: (-0.02).toFixed(2), sci: '-1e-5', flag: true, empty: null }],
    );
    const { rows } = readBack(csv);
    expect(rows[1]).toEqual(['-0.02', '3', '-0.02', '-1e-5', 'true', '']);
    expect(csvCellText(Number.NaN)).toBe('');
    expect(csvCellText('-')).toBe("'-");
    expect(csvCellText('- 3')).toBe("'- 3");
  });

  it('writes instants in the branch zone with its offset, across a daylight-saving change', () => {
    expect(csvTimestamp('2026-12-04T15:15:00Z', 'America/Chicago')).toBe('2026-12-04T09:15:00-06:00');
    expect(csvTimestamp('2027-03-15T11:00:00Z', 'America/Chicago')).toBe('2027-03-15T06:00:00-05:00');
    expect(csvTimestamp(new Date('2026-07-01T10:00:00Z'), 'Europe/Warsaw')).toBe('2026-07-01T12:00:00+02:00');
    expect(csvTimestamp('2026-07-01T10:00:00Z', 'UTC')).toBe('2026-07-01T10:00:00Z');
    expect(csvTimestamp(null, 'UTC')).toBe('');
    // What the text says is the same instant.
    expect(new Date(csvTimestamp('2026-12-04T15:15:00Z', 'America/Chicago')).toISOString()).toBe('2026-12-04T15:15:00.000Z');
  });
});
