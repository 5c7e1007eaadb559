import ICAL from 'ical.js';
import { describe, expect, it } from 'vitest';
import { foldLine, writeCalendar } from './ical';

const encoder = new TextEncoder();

/** Every physical line of a calendar file: ended by CRLF, at most 75 octets before it. */
function physicalLines(ics: string): string[] {
  expect(ics.endsWith('\r\n')).toBe(true);
  const lines = ics.slice(0, -2).split('\r\n');
  for (const l of lines) {
    expect(l).not.toMatch(/[\r\n]/);
    expect(encoder.encode(l).length, l).toBeLessThanOrEqual(75);
  }
  return lines;
}

describe('iCalendar writer', () => {
  it('folds at 75 octets, not characters, and never inside a character', () => {
    // 2-, 3- and 4-octet characters, and a letter with a combining accent.
    const value = `DESCRIPTION:${'Żółć ệ € 🧊 e\u0301 '.repeat(40)}`;
    const folded = foldLine(value);
    const lines = folded.split('\r\n');
    expect(lines.length).toBeGreaterThan(5);
    for (const [i, l] of lines.entries()) {
      expect(encoder.encode(l).length).toBeLessThanOrEqual(75);
      if (i > 0) expect(l.startsWith(' ')).toBe(true);
      // No lone surrogate and no accent at the start of a piece: each piece is whole characters.
      expect(l).not.toMatch(/[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/);
      expect(i > 0 ? l.slice(1) : l).not.toMatch(/^\p{M}/u);
    }
    // Unfolding gives the line back.
    expect(folded.replace(/\r\n /g, '')).toBe(value);
    // Lines are filled: a fold happens only when the next character would not fit.
    for (const l of lines.slice(0, -1)) expect(encoder.encode(l).length).toBeGreaterThan(75 - 5);
    expect(foldLine('SUMMARY:short')).toBe('SUMMARY:short');
  });

  it('writes events a general-purpose parser reads back as written', () => {
    const description = `Łukasz Żółć; Nguyễn Thị Hương, ${'Mã lỗi E4 — máy nén quá nhiệt, kiểm tra quạt dàn ngưng. '.repeat(6)}\nAccess: roof hatch → key ≥ 2 copies`;
    const ics = writeCalendar({
      productId: '-//Coilpath//Route//EN',
      name: 'Coilpath: Nguyễn Thị Hương',
      stamp: new Date('2026-12-04T12:00:00Z'),
      events: [
        {
          uid: 'b1@coilpath',
          start: new Date('2026-12-04T15:15:00Z'),
          end: new Date('2026-12-04T16:45:00Z'),
          summary: 'WO-12 Repair: Żabka, Kraków',
          description,
          location: '12 Żurawia, Kraków',
          geo: { lat: 50.06, lon: 19.94 },
          url: 'http://coilpath.test/visits/v1',
          status: 'CONFIRMED',
          sequence: 3,
          lastModified: new Date('2026-12-01T08:00:00Z'),
        },
      ],
    });
    physicalLines(ics);
    const cal = new ICAL.Component(ICAL.parse(ics));
    expect(cal.getFirstPropertyValue('x-wr-calname')).toBe('Coilpath: Nguyễn Thị Hương');
    const vevent = cal.getFirstSubcomponent('vevent')!;
    const event = new ICAL.Event(vevent);
    expect(event.uid).toBe('b1@coilpath');
    expect(event.summary).toBe('WO-12 Repair: Żabka, Kraków');
    expect(event.description).toBe(description);
    expect(event.location).toBe('12 Żurawia, Kraków');
    expect(event.startDate.toJSDate().toISOString()).toBe('2026-12-04T15:15:00.000Z');
    expect(event.endDate.toJSDate().toISOString()).toBe('2026-12-04T16:45:00.000Z');
    expect(event.sequence).toBe(3);
    expect(vevent.getFirstPropertyValue('geo')).toEqual([50.06, 19.94]);
  });
});
