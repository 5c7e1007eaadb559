/**
 * The one CSV writer of every Coilpath export, on the server and in the browser: UTF-8 with a
 * byte-order mark (so a spreadsheet opens "Łukasz Żółć" as written), CRLF line ends (RFC 4180),
 * and text cells a spreadsheet would run as a formula neutralised with a leading apostrophe.
 */
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';

export const CSV_BOM = '\uFEFF';
export const CSV_LINE_END = '\r\n';

/** A value of a CSV cell: numbers stay numbers; text is checked for formulae; null/undefined is empty. */
export type CsvValue = string | number | boolean | null | undefined;

/** First characters that make a spreadsheet read a cell as a formula (or hide one after a tab/CR). */
const FORMULA_START = /^[=+\-@\t\r]/;
/**
 * A number written as text (`(-0.02).toFixed(2)`, "-3", "1e-5") is a number, not a formula: a
 * spreadsheet reads it as the number it is, so it is written as it is.
 */
const PLAIN_NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/** The text a cell holds, before quoting: text beginning with = + - @ tab or CR gets an apostrophe in front. */
export function csvCellText(value: CsvValue): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  if (FORMULA_START.test(value) && !PLAIN_NUMBER.test(value)) return `'${value}`;
  return value;
}

/** RFC 4180 quoting: a cell with a comma, a quote, a line break or surrounding spaces is quoted, quotes doubled. */
function quote(text: string): string {
  return /[",\r\n]|^\s|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * A whole CSV file: BOM, the header row, then one line per row, each line ended by CRLF.
 * Rows are objects read in `columns` order (missing keys are empty cells).
 */
export function toCsv<C extends string>(columns: readonly C[], rows: readonly Partial<Record<C, CsvValue>>[]): string {
  const line = (cells: readonly CsvValue[]) => cells.map((c) => quote(csvCellText(c))).join(',') + CSV_LINE_END;
  return CSV_BOM + line(columns) + rows.map((r) => line(columns.map((c) => r[c]))).join('');
}

/**
 * An instant as ISO-8601 in a time zone, with that zone's offset at the instant
 * (`2026-12-04T09:15:00-06:00`; `Z` where the offset is zero). Empty for null.
 */
export function csvTimestamp(instant: string | Date | null | undefined, timeZone: string): string {
  if (instant === null || instant === undefined || instant === '') return '';
  const ms = new Date(instant).getTime();
  if (Number.isNaN(ms)) return '';
  return format(new TZDate(ms, timeZone), "yyyy-MM-dd'T'HH:mm:ssXXX");
}
