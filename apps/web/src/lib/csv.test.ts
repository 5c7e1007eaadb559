import Papa from 'papaparse';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { csvTimestamp, downloadCsv } from './csv';

/** Catches the file the browser would save: the Blob handed to URL.createObjectURL and the link's name. */
function catchDownload() {
  const caught: { blob?: Blob; name?: string; clicked: boolean } = { clicked: false };
  const link = { href: '', download: '', click: () => (caught.clicked = true), remove: () => undefined };
  vi.stubGlobal('document', { createElement: () => link, body: { appendChild: () => undefined } });
  vi.spyOn(URL, 'createObjectURL').mockImplementation((b) => {
    caught.blob = b as Blob;
    return 'blob:coilpath-test';
  });
  vi.spyOn(URL, 'revokeObjectURL').mockImplementation(() => undefined);
  return { caught, link };
}

afterEach(() => {
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
});

describe('browser CSV export', () => {
  it('saves UTF-8 with a BOM and CRLF, formulae neutralised, numbers and instants as written', async () => {
    const { caught, link } = catchDownload();
    downloadCsv('return-visits-to-book', [
      {
        site: 'Łukasz Żółć Bakery',
        notes: '=HYPERLINK("http://x.example")',
        change: -0.02,
        closed_at: csvTimestamp('2026-12-04T15:15:00Z', 'America/Chicago'),
      },
      { site: 'Nguyễn Thị Hương', notes: '@SUM(A1)', change: '-0.02', closed_at: csvTimestamp(null, 'America/Chicago') },
    ]);
    expect(caught.clicked).toBe(true);
    expect(link.download).toBe('return-visits-to-book.csv');
    expect(caught.blob!.type).toBe('text/csv;charset=utf-8');
    const bytes = new Uint8Array(await caught.blob!.arrayBuffer());
    expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const text = new TextDecoder('utf-8', { fatal: true }).decode(bytes); // drops the BOM
    expect(text.split('\r\n')).toHaveLength(4); // header, two rows, nothing after the last CRLF
    expect(text.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/);
    const rows = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true }).data;
    expect(rows).toEqual([
      { site: 'Łukasz Żółć Bakery', notes: `'=HYPERLINK("http://x.example")`, change: '-0.02', closed_at: '2026-12-04T09:15:00-06:00' },
      { site: 'Nguyễn Thị Hương', notes: "'@SUM(A1)", change: '-0.02', closed_at: '' },
    ]);
  });
});
