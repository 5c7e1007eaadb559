/** Steps several journeys share. Assertions are `node:assert`; Playwright's waits are bounded by its timeouts. */
import assert from 'node:assert/strict';
import { deflateSync } from 'node:zlib';
import type { Page } from 'playwright-core';
import type { Role } from '@coilpath/contract';
import { homeFor, screensFor } from '../../apps/web/src/lib/screens';
import type { JourneyContext } from './harness';

export const DEMO_PASSWORD = process.env.COILPATH_PASSWORD ?? 'coilpath-demo';

/** The demo sign-ins (docs/DESIGN.md §8; printed by the server at start). */
export const demo: Record<Role, string> = {
  owner: 'owner@coilpath.example',
  branch_manager: 'manager@coilpath.example',
  dispatcher: 'dispatch@coilpath.example',
  technician: 'tech@coilpath.example',
};

/** Opens the app, checks the sign-in page (screenshot + axe), signs in through the form, lands on the role's home. */
export async function signInThroughForm(ctx: JourneyContext, page: Page, role: Role): Promise<void> {
  await page.goto(`${ctx.base}/`);
  await page.getByRole('heading', { name: 'Sign in' }).waitFor();
  assert.match(new URL(page.url()).pathname, /\/sign-in$/, 'an anonymous visitor is sent to the sign-in page');
  await ctx.screen(page, 'sign-in');
  await page.getByLabel('E-mail').fill(demo[role]);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => u.pathname === homeFor(role), { timeout: 15_000 });
  ctx.step(`signed in as ${demo[role]} → ${homeFor(role)}`);
}

/** The labels the visible "Screens" navigation shows, in order. */
export async function navigationLabels(page: Page): Promise<string[]> {
  const nav = page.getByRole('navigation', { name: 'Screens' });
  await nav.waitFor();
  return (await nav.getByRole('link').allInnerTexts()).map((t) => t.trim());
}

/**
 * The navigation a role should see (apps/web/src/lib/screens.ts): on a phone the technician's
 * bottom bar shows every screen of the role; office roles on a desktop see the rail without the
 * phone-only entries.
 */
export function expectedNavigation(role: Role, viewport: 'phone' | 'desktop'): string[] {
  const items = screensFor(role);
  return (viewport === 'phone' ? items : items.filter((s) => !('navOnly' in s))).map((s) => s.label);
}

/** Visits every other screen in the navigation (screenshot + axe each) by clicking its link. */
export async function visitEveryScreen(ctx: JourneyContext, page: Page, labels: string[]): Promise<void> {
  const nav = page.getByRole('navigation', { name: 'Screens' });
  const current = await nav.locator('a[aria-current="page"]').allInnerTexts();
  for (const label of labels) {
    if (current.map((c) => c.trim()).includes(label)) continue; // the screen the journey is on: already shown
    await nav.getByRole('link', { name: label, exact: true }).click();
    await page.waitForFunction((l) => document.querySelector('nav a[aria-current="page"]')?.textContent?.trim() === l, label);
    await page.getByRole('heading', { level: 1 }).first().waitFor();
    await ctx.screen(page, label.toLowerCase());
  }
}

/**
 * The keys of the answers the phone keeps in IndexedDB (apps/web/src/lib/query-persist.ts), as JSON text; '' before
 * any. Runs in the page: `page.evaluate(keptKeys)`.
 */
export const keptKeys = () =>
  new Promise<string>((resolve) => {
    const open = indexedDB.open('coilpath');
    open.onerror = () => resolve('');
    open.onsuccess = () => {
      const db = open.result;
      if (!db.objectStoreNames.contains('kept-answers')) {
        db.close();
        return resolve('');
      }
      const get = db.transaction('kept-answers').objectStore('kept-answers').get('coilpath.query-cache');
      get.onerror = () => resolve('');
      get.onsuccess = () => {
        db.close();
        resolve(typeof get.result === 'string' ? (get.result.match(/"queryKey":\[[^\]]*\]/g) ?? []).join(' ') : '');
      };
    };
  });

/** A small real PNG (16×16 RGB, a copper/frost checkerboard) built byte by byte. */
export function samplePng(): Buffer {
  const crcTable = Array.from({ length: 256 }, (_, n) => {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    return c >>> 0;
  });
  const crc32 = (buf: Buffer) => {
    let c = 0xffffffff;
    for (const b of buf) c = crcTable[(c ^ b) & 0xff]! ^ (c >>> 8);
    return (c ^ 0xffffffff) >>> 0;
  };
  const chunk = (type: string, data: Buffer) => {
    const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(crc32(body));
    return Buffer.concat([len, body, crc]);
  };
  const size = 16;
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(size, 0);
  ihdr.writeUInt32BE(size, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type: RGB
  const rows: number[] = [];
  for (let y = 0; y < size; y++) {
    rows.push(0); // filter: none
    for (let x = 0; x < size; x++) rows.push(...(((x >> 2) + (y >> 2)) % 2 ? [0xb8, 0x73, 0x33] : [0xe8, 0xf1, 0xf8]));
  }
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', deflateSync(Buffer.from(rows))),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}
