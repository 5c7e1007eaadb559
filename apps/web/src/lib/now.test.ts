import { afterEach, describe, expect, it } from 'vitest';
import { appNow, noteServerNow } from './now';

describe('appNow', () => {
  afterEach(() => noteServerNow(new Date().toISOString()));

  it('follows the server clock named in X-Coilpath-Now', () => {
    const browser = Date.UTC(2026, 11, 4, 17, 0);
    noteServerNow('2027-03-15T11:00:00.000Z', browser);
    const shift = Date.UTC(2027, 2, 15, 11, 0) - browser;
    const seen = appNow().getTime() - Date.now();
    // The offset is exactly the difference between the two clocks (give or take the test's own run time).
    expect(Math.abs(seen - shift)).toBeLessThan(60_000);
  });

  it('ignores a missing or unreadable header', () => {
    noteServerNow('2027-03-15T11:00:00.000Z', Date.UTC(2026, 11, 4, 17, 0));
    const before = appNow().getTime() - Date.now();
    noteServerNow(null);
    noteServerNow('not a date');
    expect(Math.abs(appNow().getTime() - Date.now() - before)).toBeLessThan(60_000);
  });
});
