import iconv from 'iconv-lite';
import { describe, expect, it } from 'vitest';
import { HttpError } from './errors';
import { decodeTextFile, importText, implausibility } from './text-file';

const csv = (cells: string) => `unit_serial,circuit,code,raised_at,notes\r\nSN-1,1,HP-1,2026-12-02 08:05,${cells}\r\n`;

describe('reading an uploaded CSV file’s bytes', () => {
  it.each([
    ['windows-1252', 'Café à côté — “entrée” 5 €'],
    ['windows-1252', 'Kältetechnik Süd, Dachfläche'],
    ['windows-1252', 'Café'],
    ['windows-1250', 'Łukasz Żółć, sprężarka północna'],
    ['windows-1250', 'Łódź'],
    // Windows-1258 writes tones as combining marks after the letter (ê + U+0303 for ễ).
    ['windows-1258', 'Nguyê\u0303n Thi\u0323 Hương'],
  ])('converts a %s export of "%s" back to the text as typed', (encoding, text) => {
    const read = decodeTextFile(iconv.encode(csv(text), encoding));
    expect(read.text).toBe(csv(text.normalize('NFC')));
    expect(read.text).not.toContain('\uFFFD');
    expect(read.encoding).not.toBe('UTF-8');
  });

  it('composes Vietnamese as typed: Nguyễn Thị Hương', () => {
    expect(decodeTextFile(iconv.encode(csv('Nguyê\u0303n Thi\u0323 Hương'), 'windows-1258')).text).toContain('Nguyễn Thị Hương');
  });

  it('reads UTF-8 (with or without a byte-order mark) and UTF-16 with a byte-order mark as they are', () => {
    const text = csv('Nguyễn Thị Hương; Łukasz Żółć');
    expect(decodeTextFile(Buffer.from(text))).toEqual({ text, encoding: 'UTF-8' });
    expect(decodeTextFile(Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(text)]))).toEqual({ text, encoding: 'UTF-8' });
    expect(decodeTextFile(Buffer.concat([Buffer.from([0xff, 0xfe]), iconv.encode(text, 'utf-16le')]))).toEqual({
      text,
      encoding: 'UTF-16LE',
    });
    expect(decodeTextFile(Buffer.from('a,b\r\n1,2\r\n'))).toEqual({ text: 'a,b\r\n1,2\r\n', encoding: 'UTF-8' });
  });

  it('refuses a file in another script, or one whose bytes contradict its byte-order mark, saying what to do', () => {
    const refusal = (bytes: Buffer) => {
      try {
        decodeTextFile(bytes);
      } catch (e) {
        expect(e).toBeInstanceOf(HttpError);
        return (e as HttpError).message;
      }
      throw new Error('not refused');
    };
    expect(refusal(iconv.encode(csv('東京の屋上ユニット、北側の機械室の隣'), 'shift_jis'))).toMatch(/Shift_JIS.*CSV UTF-8/);
    expect(refusal(Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), iconv.encode(csv('Łódź'), 'windows-1250')]))).toMatch(
      /byte-order mark.*CSV UTF-8/,
    );
    // A UTF-8 file that already carries replacement characters was mis-converted before.
    expect(refusal(Buffer.from(csv('Caf\uFFFD')))).toMatch(/could not be read/);
  });

  it('takes text a client decoded as it is, unless it shows a wrong decoding', () => {
    expect(importText({ csv: '\uFEFFa,b\n1,2' })).toEqual({ text: 'a,b\n1,2', encoding: 'UTF-8' });
    expect(() => importText({ csv: 'a,b\n\uFFFD,2' })).toThrow(/could not be read/);
    expect(importText({ file: Buffer.from('a,b\n1,2').toString('base64') })).toEqual({ text: 'a,b\n1,2', encoding: 'UTF-8' });
  });

  it('scores "£ód¼" (Łódź read in the wrong code page) as unlikely and real words as not', () => {
    expect(implausibility('£ód¼')).toBeGreaterThan(0);
    expect(implausibility('NguyêÞn')).toBeGreaterThan(0);
    expect(implausibility('Łódź, Café — “entrée” 5 €, Nguyễn Thị Hương, Ärger')).toBe(0);
  });
});
