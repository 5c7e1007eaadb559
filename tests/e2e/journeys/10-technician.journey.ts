/**
 * Technician, on a phone (390×844): signs in through the form, sees the technician's navigation,
 * opens Route and the first stop, goes en route and on site, records circuit 1's readings and
 * checks the superheat and subcooling the screen computes, attaches a photo, adds a finding and
 * closes the visit as needing a return (parts), with the
 * customer's contact signing on the pad (drawn with the mouse). The return visit's number is handed to the
 * dispatcher journey, which books it. Then every screen in the navigation.
 */
import assert from 'node:assert/strict';
import type { Locator, Page } from 'playwright-core';
import type { JourneyContext } from '../harness';
import { phone } from '../harness';
import { addDays, dateInZone, writeHandoff } from '../handoff';
import { expectedNavigation, navigationLabels, samplePng, signInThroughForm, visitEveryScreen } from '../support';

export const title = 'Technician on a phone';

/** The demo technician works in the Chicago branch (apps/api/src/db/seed/catalogue.ts). */
const BRANCH_ZONE = 'America/Chicago';

/**
 * Check values: CoolProp 8.0.0 reference points for R-410A in tests/reference/data/refrigerant-saturation.json
 * (the file tests/reference/refrigerant-saturation.test.ts checks Coilpath's tables against):
 *   111.5 psig → dew 36.93 °F;  289.2 psig → bubble 93.33 °F.
 * Superheat = suction line − dew = 48 − 36.93 = 11.07 °F; subcooling = bubble − liquid line = 93.33 − 83 = 10.33 °F.
 * The reference file's own accuracy bar for Coilpath's tables is ±0.3 °F; the screen rounds to 0.1 °F.
 */
/** The customer's on-site contact who signs the close-out (invented for the journey). */
const SIGNER = 'Marisol Okafor';

const READINGS = { suctionPsig: 111.5, suctionLineF: 48, liquidPsig: 289.2, liquidLineF: 83 };
const EXPECTED_SUPERHEAT_F = 48 - 36.93;
const EXPECTED_SUBCOOLING_F = 93.33 - 83;
const TOLERANCE_F = 0.3 + 0.05;

/** "Wednesday 2 December 2026", as Route's subtitle names the day it shows. */
const dayLabel = (date: string) => {
  const d = new Date(`${date}T12:00:00Z`);
  const part = (o: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat('en-GB', { ...o, timeZone: 'UTC' }).format(d);
  return `${part({ weekday: 'long' })} ${part({ day: 'numeric' })} ${part({ month: 'long' })} ${part({ year: 'numeric' })}`;
};

/** The number in an `<output>` such as "Superheat 11.1 °F". */
async function degrees(output: Locator): Promise<number> {
  const text = (await output.innerText()).trim();
  const m = /(-?\d+(?:\.\d+)?) °F$/.exec(text);
  assert.ok(m, `a temperature in "${text}"`);
  return Number(m[1]);
}

/** A "what happened" notice (role status/alert) with this text. */
const notice = (page: Page, text: string | RegExp) => page.locator('[aria-live="polite"] > [role]').filter({ hasText: text });

/**
 * Route for the first date from `start` with stops, going forward with "Next day" (the demo puts
 * a weekend's stops on the coming week). Returns the date shown and the list of stops.
 */
async function dayWithStops(page: Page, start: string): Promise<{ date: string; stops: Locator }> {
  const stops = page.getByRole('list', { name: 'Stops in route order' });
  const empty = page.getByText('No stops booked for this day');
  let date = start;
  for (let i = 0; i < 7; i++) {
    await page.getByText(dayLabel(date)).first().waitFor();
    await stops.or(empty).first().waitFor();
    if (await stops.isVisible()) return { date, stops };
    await page.getByRole('button', { name: 'Next day' }).click();
    date = addDays(date, 1);
  }
  throw new Error(`no stops on Route from ${start} to ${date}`);
}

export async function run(ctx: JourneyContext) {
  const page = await ctx.launch(phone);
  await signInThroughForm(ctx, page, 'technician');
  const labels = await navigationLabels(page);
  assert.deepEqual(labels, expectedNavigation('technician', 'phone'), 'the technician sees Route, Visit and Unit file');
  await page.getByRole('heading', { level: 1, name: 'Route' }).waitFor();
  await ctx.screen(page, 'route');

  // ── Route: the first stop ──
  const today = dateInZone(ctx.now(), BRANCH_ZONE);
  const { date, stops } = await dayWithStops(page, today);
  ctx.step(
    `Route ${date}${date === today ? ' (today)' : ` (first day with stops after ${today})`}: ${await stops.locator(':scope > li').count()} stop(s)`,
  );
  if (date !== today) await ctx.screen(page, 'route-with-stops');
  const first = stops.locator(':scope > li').first();
  const siteName = (await first.getByRole('heading', { level: 2 }).innerText()).replace(/^Stop \d+:\s*/, '').trim();
  const firstText = await first.innerText();
  const wo = /WO-(\d+) Service call/.exec(firstText);
  assert.ok(wo, `the first stop is a service call (demo data): ${firstText.slice(0, 200)}`);
  const originNumber = Number(wo[1]);
  assert.match(firstText, /R-410A/, 'the first stop is on an R-410A unit');
  assert.match(firstText, /\bBooked\b/, 'the first stop is booked, not started');

  await first.getByRole('link', { name: 'Open visit' }).click();
  await page.waitForURL((u) => /^\/visits\/[\w-]+$/.test(u.pathname));
  await page.getByRole('heading', { level: 1, name: new RegExp(`^Visit · WO-${originNumber} Service call`) }).waitFor();
  assert.match(
    await page.locator('main').innerText(),
    new RegExp(siteName.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')),
    'the visit names the stop’s site',
  );
  ctx.step(`opened WO-${originNumber} at ${siteName}`);
  await ctx.screen(page, 'visit-booked');

  // ── State: en route, then on site ──
  await page.getByRole('button', { name: 'En route' }).click();
  await notice(page, 'Marked en route.').waitFor();
  await page.getByRole('button', { name: 'On site' }).click();
  await notice(page, 'Marked on site.').waitFor();
  await page.getByRole('button', { name: 'Go to close-out' }).waitFor();
  // The timeline lists each state change with its time.
  const timeline = page.locator('section').filter({ has: page.getByRole('heading', { name: 'Timeline', exact: true }) });
  // A time alone, or dated ("Sat 5 Dec, 07:24") when the timeline's events fall on more than one day.
  await timeline.getByText(/^(?:[A-Z][a-z]{2} \d{1,2} [A-Z][a-z]{2}, )?\d\d:\d\d · On site$/).waitFor();
  assert.match(await timeline.innerText(), /\d\d:\d\d · En route/, 'the timeline records en route');
  ctx.step('marked en route, then on site');

  // ── Readings, circuit 1 ──
  const circuit = 'circuit 1';
  const field = (label: string, unit: 'psig' | '°F') => page.getByLabel(`${label}, ${circuit} (${unit})`, { exact: true });
  await field('Suction pressure', 'psig').fill(String(READINGS.suctionPsig));
  await field('Suction line temperature', '°F').fill(String(READINGS.suctionLineF));
  await field('Liquid pressure', 'psig').fill(String(READINGS.liquidPsig));
  await field('Liquid line temperature', '°F').fill(String(READINGS.liquidLineF));
  const superheatOut = page.getByRole('status', { name: `Superheat, ${circuit}` });
  const subcoolingOut = page.getByRole('status', { name: `Subcooling, ${circuit}` });
  const checkComputed = async (when: string) => {
    const sh = await degrees(superheatOut);
    const sc = await degrees(subcoolingOut);
    assert.ok(
      Math.abs(sh - EXPECTED_SUPERHEAT_F) <= TOLERANCE_F,
      `superheat ${when}: screen ${sh} °F, reference ${EXPECTED_SUPERHEAT_F.toFixed(2)} °F`,
    );
    assert.ok(
      Math.abs(sc - EXPECTED_SUBCOOLING_F) <= TOLERANCE_F,
      `subcooling ${when}: screen ${sc} °F, reference ${EXPECTED_SUBCOOLING_F.toFixed(2)} °F`,
    );
    return { sh, sc };
  };
  const typed = await checkComputed('as typed');
  // "Enter" moves to the next reading (the phone's keypad says "next"); the figures stay in the circuit's sticky bar.
  const liquidLine = field('Liquid line temperature', '°F');
  assert.equal(await liquidLine.getAttribute('inputmode'), 'decimal', 'readings use the numeric keypad');
  assert.equal(await liquidLine.getAttribute('enterkeyhint'), 'next', 'the keypad’s Enter key says next');
  await liquidLine.press('Enter');
  assert.ok(
    await field('Discharge pressure', 'psig').evaluate((el) => el === document.activeElement),
    'Enter moved to the discharge pressure',
  );
  const bar = page.getByRole('group', { name: `Computed values, ${circuit}` });
  await page.evaluate(() => window.scrollBy(0, 400));
  const barBox = await bar.boundingBox();
  assert.ok(barBox && barBox.y >= 0 && barBox.y < 120, `the computed values stay at the top while the fields scroll (bar at ${barBox?.y})`);
  await page.getByRole('button', { name: 'Save readings' }).click();
  await notice(page, 'Readings saved for 1 circuit.').waitFor();
  // The notice covers no input or button: on a phone it takes the screen bar's place at the bottom.
  const covered = await page.evaluate(() => {
    const notes = Array.from(document.querySelectorAll('[aria-live="polite"] > [role]'))
      .map((n) => n.getBoundingClientRect())
      .filter((r) => r.height > 0);
    const nav = document.querySelector('nav[aria-label="Screens"].fixed')?.getBoundingClientRect();
    const hits: string[] = [];
    for (const el of Array.from(
      document.querySelectorAll<HTMLElement>('main button, main input, main select, main textarea, main a[href], main summary'),
    )) {
      const r = el.getBoundingClientRect();
      if (!r.width || !r.height || el.classList.contains('sr-only')) continue;
      const bottom = nav ? Math.min(r.bottom, nav.top) : r.bottom; // under the screen bar it is hidden anyway
      if (notes.some((n) => r.left < n.right && r.right > n.left && r.top < n.bottom && bottom > n.top))
        hits.push(el.getAttribute('aria-label') ?? el.textContent?.trim() ?? el.tagName);
    }
    return hits;
  });
  assert.deepEqual(covered, [], 'the notice covers no input or button');
  // After the save the inputs show the server's values; the computation still agrees.
  await page.getByRole('button', { name: 'Save readings' }).waitFor();
  assert.equal(await field('Suction pressure', 'psig').inputValue(), String(READINGS.suctionPsig), 'the saved suction pressure is shown');
  await checkComputed('after saving');
  ctx.step(
    `readings saved: superheat ${typed.sh} °F (reference ${EXPECTED_SUPERHEAT_F.toFixed(2)}), subcooling ${typed.sc} °F (reference ${EXPECTED_SUBCOOLING_F.toFixed(2)})`,
  );
  await ctx.screen(page, 'visit-readings');

  // ── A photo ──
  const photoName = 'condenser-wiring.png';
  await page.getByLabel('Photo or PDF file').setInputFiles({ name: photoName, mimeType: 'image/png', buffer: samplePng() });
  await notice(page, /^Attached .+\.$/).waitFor();
  const thumb = page.getByRole('img', { name: /^Photo: / });
  await thumb.waitFor();
  await thumb.scrollIntoViewIfNeeded();
  const loaded = await thumb.evaluate(async (img: HTMLImageElement) => {
    if (!img.complete) await new Promise((r) => img.addEventListener('load', r, { once: true }));
    return img.naturalWidth;
  });
  assert.equal(loaded, 16, 'the thumbnail shows the uploaded 16×16 PNG');
  ctx.step(`photo attached: ${await thumb.getAttribute('alt')}`);

  // ── A finding ──
  await page.getByLabel('Cause code').selectOption({ label: 'Component failure' });
  await page.getByLabel('Origin').selectOption({ label: 'Wear' });
  await page
    .getByLabel('Notes', { exact: true })
    .fill('Condenser fan motor bearings worn; motor draws high amps. Replacement motor to order.');
  await page.getByRole('button', { name: 'Add finding' }).click();
  await notice(page, 'Finding saved: Component failure.').waitFor();
  const finding = page.getByRole('listitem').filter({ hasText: 'Component failure' }).filter({ hasText: 'Wear' });
  await finding.waitFor();
  assert.doesNotMatch(await finding.innerText(), /Not saved yet/, 'the finding is saved, not queued');
  await ctx.screen(page, 'visit-photo-finding');

  // ── Close as needing a return (parts) ──
  await page.getByRole('radio', { name: /^Needs return/ }).check();
  await page.getByRole('checkbox', { name: 'Parts', exact: true }).check();
  await page.getByLabel('Return visit notes (parts, who to bring)').fill('Condenser fan motor, 1/3 hp, 1075 rpm; bring the capacitor too.');
  // One finding: it is the call's root cause, already chosen.
  assert.ok(
    await page
      .getByRole('group', { name: 'Root cause' })
      .getByRole('radio', { name: /Component failure/ })
      .isChecked(),
    'the one finding is the root cause',
  );
  await page
    .getByLabel('Visit notes', { exact: true })
    .fill('Unit running on one condenser fan; return visit booked to replace the motor.');
  await page.getByRole('radio', { name: 'For the customer' }).check();
  // The customer's on-site contact signs on the phone: printed name, then a stroke drawn on the pad with the mouse.
  await page.getByRole('radio', { name: 'Customer signs' }).check();
  await page.getByLabel('Signer’s printed name').fill(SIGNER);
  const pad = page.getByRole('img', { name: 'Signature', exact: true });
  await pad.scrollIntoViewIfNeeded();
  const padStatus = page.getByRole('status').filter({ hasText: /^The pad is empty\.$|^Signature drawn\.$/ });
  assert.equal(await padStatus.innerText(), 'The pad is empty.', 'the pad starts empty');
  const drawStroke = async () => {
    // Where the pad is now (clicking Clear may have scrolled the page).
    await pad.scrollIntoViewIfNeeded();
    const box = await pad.boundingBox();
    assert.ok(box && box.width > 300, `the pad spans the phone's width (${box?.width} px)`);
    await page.mouse.move(box.x + 20, box.y + box.height * 0.6);
    await page.mouse.down();
    for (let i = 1; i <= 24; i++) {
      await page.mouse.move(box.x + 20 + i * ((box.width - 40) / 24), box.y + box.height * (0.5 + 0.3 * Math.sin(i / 2)), { steps: 2 });
    }
    await page.mouse.up();
  };
  await drawStroke();
  await padStatus.filter({ hasText: 'Signature drawn.' }).waitFor();
  // Clear empties the pad; the signature is drawn again.
  await page.getByRole('button', { name: 'Clear' }).click();
  await padStatus.filter({ hasText: 'The pad is empty.' }).waitFor();
  await drawStroke();
  await padStatus.filter({ hasText: 'Signature drawn.' }).waitFor();
  await ctx.screen(page, 'visit-signature');
  await page.getByRole('button', { name: 'Close visit' }).click();
  const created = page.getByText(/Return visit WO-\d+ is in the unplaced queue for the office to book\./);
  await created.waitFor();
  const returnNumber = Number(/WO-(\d+)/.exec(await created.innerText())![1]);
  assert.notEqual(returnNumber, originNumber, 'the return visit is a new work order');
  await notice(
    page,
    new RegExp(`^Visit closed as needs return\\. Return visit WO-${returnNumber} created\\. Summary sent to .+\\.$`),
  ).waitFor();
  const closeOut = await page.locator('#close-out').innerText();
  assert.match(closeOut, /Closed .* as Needs return — needs parts\./, 'the close-out says how the visit closed');
  assert.match(closeOut, /Service summary \(with PDF\) sent to \S+@\S+\./, 'the service summary was sent to the site contact');
  assert.equal(await page.getByRole('button', { name: 'Close visit' }).count(), 0, 'a closed visit cannot be closed again');
  // The closed visit shows the sign-off: the signature as the server keeps it, and the signer's name.
  assert.match(closeOut, new RegExp(`Signed by ${SIGNER}, `), 'the close-out names the signer');
  const signature = page.getByRole('img', { name: `Signature of ${SIGNER}` });
  await signature.scrollIntoViewIfNeeded();
  assert.match((await signature.getAttribute('src')) ?? '', /^\/api\/visits\/[\w-]+\/signature$/, 'the signature is served by the API');
  const signatureWidth = await signature.evaluate(async (img: HTMLImageElement) => {
    if (!img.complete) await new Promise((r) => img.addEventListener('load', r, { once: true }));
    return img.naturalWidth;
  });
  assert.ok(signatureWidth > 0, 'the stored signature loads as an image');
  writeHandoff({
    returnVisit: { number: returnNumber, siteName, originNumber },
    signedSummary: { workOrderNumber: originNumber, signerName: SIGNER },
  });
  ctx.step(`closed WO-${originNumber} as needs return (parts): return visit WO-${returnNumber} created, summary sent`);
  await ctx.screen(page, 'visit-closed');

  // ── Back on Route, the stop shows closed ──
  await page.getByRole('link', { name: 'Back to Route' }).click();
  await page.getByRole('heading', { level: 1, name: 'Route' }).waitFor();
  if (date !== today) await dayWithStops(page, today);
  const again = page
    .getByRole('list', { name: 'Stops in route order' })
    .locator(':scope > li')
    .filter({ hasText: `WO-${originNumber}` });
  await again.getByText('Closed: Needs return').waitFor();
  ctx.step('Route shows the stop closed: needs return');

  await visitEveryScreen(ctx, page, labels);
}
