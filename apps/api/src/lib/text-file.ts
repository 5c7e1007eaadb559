/**
 * Reading an uploaded text file (CSV imports) from its bytes: UTF-8 (with or without a byte-order
 * mark) as it is; a spreadsheet's legacy "CSV" export in a Windows or ISO Latin code page
 * (Windows-1252 and the like) detected with chardet and converted with iconv-lite; anything else
 * refused with the way forward. Nothing read here ever holds U+FFFD replacement characters.
 */
import chardet from 'chardet';
import iconv from 'iconv-lite';
import { HttpError } from './errors';

export interface DecodedText {
  text: string;
  /** What the bytes were read as: `UTF-8`, `UTF-16LE`, `windows-1252`… */
  encoding: string;
}

/** The Latin-script single-byte code pages spreadsheets write "CSV" in, as chardet names them → how to decode. */
const legacyLatin: Record<string, string> = {
  'windows-1252': 'windows-1252',
  // Windows-1252 is ISO-8859-1 plus printable characters in 0x80–0x9F (€ ‘ ’ “ ” – …), where a
  // spreadsheet puts them; chardet names the file ISO-8859-1 when those bytes are absent.
  'ISO-8859-1': 'windows-1252',
  'windows-1250': 'windows-1250',
  'ISO-8859-2': 'iso-8859-2',
  'windows-1257': 'windows-1257',
  'windows-1258': 'windows-1258',
};

const SAVE_AS_UTF8 = 'In your spreadsheet, save it as "CSV UTF-8 (comma delimited)" and choose it again.';

function refuse(message: string): HttpError {
  return new HttpError(400, 'not_utf8', message);
}

/**
 * Text that still carries a replacement character (U+FFFD) was read with the wrong encoding; after a
 * legacy code page, so does text with C1 controls (bytes that code page leaves undefined).
 */
function assertClean(text: string, legacy: boolean) {
  if (text.includes('\uFFFD')) {
    throw refuse(
      `The file contains characters that could not be read (shown as "\uFFFD"): it was not read as the encoding it was saved in. ${SAVE_AS_UTF8}`,
    );
  }
  if (legacy && /[\u0080-\u009F]/.test(text))
    throw refuse(`The file contains bytes that are not text in any encoding Coilpath could work out. ${SAVE_AS_UTF8}`);
}

/** Decodes a text file's bytes, or refuses it (400 `not_utf8`) with a message that says what to do. */
export function decodeTextFile(bytes: Uint8Array): DecodedText {
  const buf = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (buf[0] === 0xff && buf[1] === 0xfe) return checked(iconv.decode(buf.subarray(2), 'utf-16le'), 'UTF-16LE');
  if (buf[0] === 0xfe && buf[1] === 0xff) return checked(iconv.decode(buf.subarray(2), 'utf-16be'), 'UTF-16BE');
  const body = buf[0] === 0xef && buf[1] === 0xbb && buf[2] === 0xbf ? buf.subarray(3) : buf;
  try {
    return checked(new TextDecoder('utf-8', { fatal: true }).decode(body), 'UTF-8');
  } catch (e) {
    if (e instanceof HttpError) throw e;
    // Not UTF-8: a legacy export. chardet ranks candidates by the byte statistics of languages.
  }
  if (body !== buf)
    throw refuse(`The file says it is UTF-8 (it starts with a byte-order mark) but holds bytes that are not UTF-8. ${SAVE_AS_UTF8}`);
  const decoded = decodeLegacy(body);
  return checked(decoded.text, decoded.encoding, true);
}

/** Non-ASCII characters that are neither letters nor the punctuation and signs spreadsheets hold. */
const ODD =
  /[^\p{L}\p{M}\u00A0\u00A7\u00A9\u00AB\u00AE\u00B0\u00B1\u00B5\u00B7\u00BB\u00D7\u00F7\u2013\u2014\u2018\u2019\u201A\u201C\u201D\u201E\u2022\u2026\u20AC\u2122\u00A1\u00BF]/u;

/**
 * How unlikely a decoding is: the non-ASCII characters that are not letters (or usual signs), those
 * sitting inside a word, and capitals after a small letter. "Łódź" read in Windows-1252 is "£ód¼",
 * "Nguyễn" read so is "NguyêÞn"; read in their own code pages, none.
 */
export function implausibility(text: string): number {
  let n = 0;
  const chars = Array.from(text);
  for (let i = 0; i < chars.length; i++) {
    const c = chars[i]!;
    if (c.charCodeAt(0) < 0x80) continue;
    if (/\p{Lu}/u.test(c) && /\p{Ll}/u.test(chars[i - 1] ?? '')) n += 1;
    if (/\p{L}|\p{M}/u.test(c)) continue;
    if (ODD.test(c)) n += 2;
    else if (/\p{L}/u.test(chars[i - 1] ?? '') && /\p{L}/u.test(chars[i + 1] ?? '')) n += 1;
  }
  return n;
}

/**
 * A legacy export's encoding: chardet's candidates among the Latin code pages, the one whose reading
 * has the fewest unlikely characters (chardet's own order breaks ties). A file chardet is sure is in
 * another script (Shift_JIS, Big5…) is refused.
 */
function decodeLegacy(body: Buffer): DecodedText {
  const ranked = chardet.analyse(body);
  const top = ranked[0];
  const candidates = [...new Set(ranked.flatMap((r) => (legacyLatin[r.name] ? [legacyLatin[r.name]!] : [])))].slice(0, 4);
  if (!top || candidates.length === 0 || (!legacyLatin[top.name] && top.confidence >= 50)) {
    throw refuse(
      `The file is not UTF-8 text${top ? ` (it looks like ${top.name})` : ''}, and Coilpath reads only UTF-8 or a Latin-alphabet Windows encoding (Western or Central European, Baltic, Vietnamese). ${SAVE_AS_UTF8}`,
    );
  }
  let best: { text: string; encoding: string; score: number } | null = null;
  for (const encoding of candidates) {
    // Vietnamese code pages write some accents as separate marks: compose them as UTF-8 has them typed.
    const text = iconv.decode(body, encoding).normalize('NFC');
    const score = implausibility(text) + (text.includes('\uFFFD') ? 1000 : 0);
    if (!best || score < best.score) best = { text, encoding, score };
  }
  return { text: best!.text, encoding: best!.encoding };
}

function checked(text: string, encoding: string, legacy = false): DecodedText {
  assertClean(text, legacy);
  return { text, encoding };
}

/**
 * An import's text, from `file` (base64 of the file's bytes: decoded here, where the bytes are) or
 * `csv` (text a client already decoded: taken as it is unless it shows a wrong decoding).
 */
export function importText(input: { csv?: string | undefined; file?: string | undefined }): DecodedText {
  if (input.file !== undefined) return decodeTextFile(Buffer.from(input.file, 'base64'));
  const text = (input.csv ?? '').replace(/^\uFEFF/, '');
  if (text.includes('\uFFFD')) {
    throw refuse(
      `The text contains characters that could not be read (shown as "\uFFFD"): the file was read with the wrong encoding before it was sent. Send the file's bytes instead (base64 in "file"), or save it from the spreadsheet as "CSV UTF-8 (comma delimited)".`,
    );
  }
  return { text, encoding: 'UTF-8' };
}
