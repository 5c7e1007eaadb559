/**
 * The technician's phone without signal (390×844): the build is an installable app (a manifest with the
 * product's name and icons, a service worker that controls the page); after the technician opened the
 * route online, the network is cut and the page reloaded: the app itself opens from the phone, shows the
 * kept route and a stop's unit briefing, and says it is offline; with the connection back the notice goes.
 * Reads only: the dispatcher journey still books the technician journey's return visit.
 */
import assert from 'node:assert/strict';
import type { Page } from 'playwright-core';
import type { JourneyContext } from '../harness';
import { phone } from '../harness';
import { addDays, dateInZone } from '../handoff';
import { signInThroughForm, keptKeys } from '../support';

export const title = 'Technician offline';

/** The demo technician works in the Chicago branch (apps/api/src/db/seed/catalogue.ts). */
const BRANCH_ZONE = 'America/Chicago';
const routeHeading = (page: Page) => page.getByRole('heading', { level: 1, name: /^(My Day|Route)$/ });

export async function run(ctx: JourneyContext): Promise<void> {
  const page = await ctx.launch(phone);
  // While the network is cut, the page's own refetches fail at the network layer: expected here.
  ctx.allowConsoleError(/ERR_INTERNET_DISCONNECTED|Failed to fetch|net::ERR_FAILED/);
  await signInThroughForm(ctx, page, 'technician');

  // The install manifest and the service worker.
  const manifestHref = await page.locator('link[rel="manifest"]').getAttribute('href');
  assert.ok(manifestHref, 'the page links a web app manifest');
  const manifest = (await (await page.request.get(new URL(manifestHref, ctx.base).toString())).json()) as {
    name: string;
    display: string;
    start_url: string;
    icons: { src: string; sizes: string; purpose?: string }[];
  };
  assert.equal(manifest.name, 'Coilpath');
  assert.equal(manifest.display, 'standalone');
  for (const size of ['192x192', '512x512'])
    assert.ok(
      manifest.icons.some((i) => i.sizes === size),
      `an icon of ${size}`,
    );
  for (const icon of manifest.icons) {
    const res = await page.request.get(new URL(icon.src, ctx.base).toString());
    assert.equal(res.status(), 200, `the icon ${icon.src} is served`);
  }
  await page.waitForFunction(
    () => navigator.serviceWorker?.controller !== null && navigator.serviceWorker?.controller !== undefined,
    undefined,
    { timeout: 30_000 },
  );
  ctx.step(`installable: manifest "${manifest.name}" with ${manifest.icons.length} icons; a service worker controls the page`);

  // The first day with stops from today (as the technician journey finds it), opened online.
  const today = dateInZone(ctx.now(), BRANCH_ZONE);
  let date = today;
  const stops = page.getByRole('list', { name: 'Stops in route order' });
  for (let i = 0; ; i++) {
    await page.goto(`${ctx.base}/day?date=${date}`);
    await routeHeading(page).waitFor();
    await page.waitForFunction(() => !document.querySelector('[aria-busy="true"]'));
    if ((await stops.count()) > 0) break;
    assert.ok(i < 14, 'the demo books the technician within two weeks');
    date = addDays(date, 1);
  }
  const firstSite = (await stops.locator(':scope > li').first().getByRole('heading', { level: 2 }).innerText())
    .replace(/^Stop 1:\s*/, '')
    .trim();
  // The phone writes what it keeps a moment after each answer (throttled): wait for the route and its briefings.
  const kept = (keys: string) => keys.includes(`["day","${date}"]`) && keys.includes('"unit-briefing"');
  for (let i = 0; !kept(await page.evaluate(keptKeys)); i++) {
    assert.ok(i < 60, `the phone keeps the route of ${date} and its briefings (IndexedDB)`);
    await page.waitForTimeout(250);
  }
  ctx.step(`route of ${date} kept on the phone (first stop ${firstSite})`);

  // No signal: the app opens from the phone and shows what it kept.
  await page.context().setOffline(true);
  await page.reload();
  await routeHeading(page).waitFor();
  await page.getByText('Offline.', { exact: false }).first().waitFor();
  await stops
    .getByRole('heading', { level: 2, name: new RegExp(firstSite.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')) })
    .first()
    .waitFor();
  const firstStop = stops.locator(':scope > li').first();
  const briefing = firstStop.locator('details').first();
  if ((await briefing.count()) > 0) {
    if ((await briefing.getAttribute('open')) === null) await briefing.locator('summary').click();
    await briefing.locator('div').first().waitFor();
    assert.doesNotMatch(await briefing.innerText(), /Failed to fetch|Could not load/i, 'the kept briefing shows, not an error');
  }
  assert.doesNotMatch(await page.locator('main').innerText(), /Failed to fetch dynamically imported module/);
  await ctx.screenshot(page, 'route-offline');
  await ctx.axe(page, 'route-offline');
  ctx.step('offline: reloaded, the route and the first stop’s briefing show from the phone, with the offline notice');

  // The connection is back: the notice goes.
  await page.context().setOffline(false);
  await page.getByText('Offline.', { exact: false }).first().waitFor({ state: 'detached' });
  ctx.step('back online: the offline notice is gone');
  ctx.expectNoConsoleErrors();
}
