/**
 * CSV imports send the file's bytes (base64) and let the server work out the encoding — a
 * spreadsheet's legacy Windows-1252 export included — because reading the file as text in the
 * browser would already have turned its accents into U+FFFD.
 */

/** Bytes as base64 (in slices, so a 6 MB file does not overflow the call stack). */
export function bytesToBase64(bytes: ArrayBuffer | Uint8Array): string {
  const u8 = bytes instanceof Uint8Array ? bytes : new Uint8Array(bytes);
  let binary = '';
  for (let i = 0; i < u8.length; i += 0x8000) binary += String.fromCharCode(...u8.subarray(i, i + 0x8000));
  return btoa(binary);
}

/** The file's text as the server read it (`encoding` from its answer), so the preview shows what is imported. */
export function decodeAs(bytes: ArrayBuffer | Uint8Array, encoding: string): string {
  return new TextDecoder(encoding).decode(bytes).normalize('NFC');
}

/** "windows-1252" → a phrase for the screen, when the file was converted. */
export function convertedNote(encoding: string): string | null {
  if (/^utf-8$/i.test(encoding)) return null;
  const name = /^windows-(\d+)$/i.exec(encoding);
  return `The file was saved in ${name ? `Windows-${name[1]}` : encoding.toUpperCase()}, an older spreadsheet encoding; Coilpath converted it to UTF-8. Check accented names in the preview.`;
}
