import { z } from 'zod';

/** Shared limits, used by forms and routes alike. */
export const limits = {
  name: 120,
  email: 254,
  shortText: 200,
  longText: 4000,
  password: { min: 10, max: 200 },
} as const;

/** Control characters — C0 (NUL, TAB, LF, CR…), DEL and C1 — refused in one-line fields. */
export const controlCharacter = /\p{Cc}/u;
export const oneLineMessage = 'Use a single line: no line breaks, tabs or other control characters';

/**
 * A one-line text field (names, codes, phone numbers, addresses on one line): trimmed, at most `max`
 * characters, and no control characters (CR and LF would split a mail header or a CSV row; NUL cannot be
 * stored). `required` is the message for an empty value; without it the field may be empty.
 */
export function oneLine(max: number, required?: string) {
  const s = z.string().trim();
  return (required ? s.min(1, required) : s).max(max, `At most ${max} characters`).regex(/^\P{Cc}*$/u, oneLineMessage);
}

/** An optional one-line field: blank becomes `null`. */
export const optionalOneLine = (max: number) =>
  oneLine(max)
    .nullish()
    .transform((v) => (v ? v : null));

export const idSchema = z.uuid({ message: 'Must be an id' });
/** Items in words: "a", "a and b", "a, b and c". */
export const andList = (items: readonly (string | number)[]): string =>
  items.length <= 1 ? items.join('') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;

/** An id a person picks from a list: an empty or unknown pick says what to choose ("Choose a site"), never "Must be an id". */
export const pickedIdSchema = (what: string) => z.uuid({ message: `Choose ${what}` });

/** A calendar date `YYYY-MM-DD` that really exists (2026-02-30 is refused). */
export const isoDateSchema = z.iso.date({ message: 'Use a real date as YYYY-MM-DD' });

/** An ISO-8601 instant with an offset or `Z`. */
export const instantSchema = z.iso.datetime({ offset: true, message: 'Use an ISO-8601 instant such as 2026-12-02T14:00:00Z' });

export const latitudeSchema = z.number().min(-90).max(90);
export const longitudeSchema = z.number().min(-180).max(180);

export const emailSchema = z
  .email({ message: 'Enter a valid e-mail address' })
  .max(limits.email)
  .transform((e) => e.trim().toLowerCase());

/** The JSON error every API failure answers with. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.unknown().optional(),
    /** The request's id (also `X-Request-Id`, and in the server's log line): quoted to an administrator. */
    requestId: z.string().optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>;

/** A page of rows for server-side paged tables. */
export interface Page<T> {
  rows: T[];
  total: number;
  page: number;
  pageSize: number;
}

export const pageQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
  sort: z.string().max(60).optional(),
  dir: z.enum(['asc', 'desc']).default('asc'),
  q: z.string().max(limits.shortText).optional(),
});

// ---------------------------------------------------------------------------------------------
// CSV imports
// ---------------------------------------------------------------------------------------------

/** Base64 of a file of at most `bytes` bytes: the server reads its encoding from the bytes. */
export const base64FileSchema = (bytes: number, tooLarge: string) =>
  z
    .base64('Send the file as base64')
    .min(1, 'The file is empty')
    .max(Math.ceil(bytes / 3) * 4, tooLarge);

/**
 * A CSV import sends either `file`, the file's bytes in base64 (what the screens send: the server
 * detects UTF-8 or a spreadsheet's legacy Windows encoding and converts it, or refuses the file), or
 * `csv`, text already decoded (refused if it shows a wrong decoding, U+FFFD).
 */
export const oneOfCsvOrFile = (b: { csv?: string | undefined; file?: string | undefined }) =>
  (b.csv === undefined) !== (b.file === undefined);
export const oneOfCsvOrFileMessage = {
  message: 'Send the file either as text (csv) or as base64 bytes (file), one of the two',
  path: ['file'],
};
