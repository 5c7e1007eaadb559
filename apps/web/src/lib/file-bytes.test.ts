import { describe, expect, it } from 'vitest';
import { bytesToBase64, convertedNote, decodeAs } from './file-bytes';

describe('import file bytes', () => {
  it('sends the bytes unchanged as base64, however large', () => {
    const bytes = new Uint8Array(100_000).map((_, i) => (i * 7) % 256);
    expect(Buffer.from(bytesToBase64(bytes), 'base64').equals(Buffer.from(bytes))).toBe(true);
    expect(bytesToBase64(new Uint8Array(0))).toBe('');
  });

  it('decodes the preview as the server read it: Windows-1252 and Windows-1250 bytes as typed', () => {
    // "Café, Süd" in Windows-1252, "Łódź" in Windows-1250. (Node 20's TextDecoder reads windows-1252's
    // 0x80–0x9F as Latin-1 controls, unlike browsers, which follow the WHATWG table: "—" and "€" are
    // checked on the server side, where the import is decided.)
    expect(decodeAs(new Uint8Array([0x43, 0x61, 0x66, 0xe9, 0x2c, 0x20, 0x53, 0xfc, 0x64]), 'windows-1252')).toBe('Café, Süd');
    expect(decodeAs(new Uint8Array([0xa3, 0xf3, 0x64, 0x9f]), 'windows-1250')).toBe('Łódź');
    expect(decodeAs(new Uint8Array([0xef, 0xbb, 0xbf, 0x61]), 'UTF-8')).toBe('a');
    expect(convertedNote('UTF-8')).toBeNull();
    expect(convertedNote('windows-1252')).toContain('Windows-1252');
  });
});
