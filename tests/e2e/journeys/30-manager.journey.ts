/**
 * Branch manager, on a desktop (1440×900): signs in through the form, sees the manager's
 * navigation, then:
 *  - on the Watchlist, finds the leak case whose repair is due within a week (demo: CH-1 chiller at
 *    Marlow Tower) and books its repair visit; the screen names the new work order;
 *  - on the Roster, finds that work order waiting in the unplaced queue;
 *  - on Agreements, builds a quarterly agreement through the form, previews and applies its visit
 *    plan, and sees the planned visits on the month calendar;
 * and finally visits every screen in the navigation.
 */
import assert from 'node:assert/strict';
import { format } from 'date-fns';
import type { Locator, Page } from 'playwright-core';
import type { JourneyContext } from '../harness';
import { desktop } from '../harness';
import { expectedNavigation, navigationLabels, signInThroughForm, visitEveryScreen } from '../support';

export const title = 'Branch manager on a desktop';

/** The demo site of the manager's branch (Chicago) that has no maintenance agreement yet. */
const AGREEMENT_SITE = 'Kettleby Fresh — Southmere';
const AGREEMENT_NAME = 'Quarterly rooftop maintenance — Southmere';

/** `YYYY-MM-DD` plus whole years and days (UTC arithmetic on a calendar date). */
function shiftDate(iso: string, years: number, days: number): string {
  const d = new Date(`${iso}T00:00:00Z`);
  d.setUTCFullYear(d.getUTCFullYear() + years);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

/** The text of the first "what happened" notice matching `pattern` (notices live in a polite live region). */
async function noticeText(page: Page, pattern: RegExp): Promise<string> {
  const notice = page.locator('[aria-live="polite"] [role="status"]').filter({ hasText: pattern }).first();
  await notice.waitFor();
  return (await notice.innerText()).trim();
}

async function bookTheLeakRepair(ctx: JourneyContext, page: Page): Promise<number> {
  const card = page.getByRole('listitem').filter({ has: page.getByRole('heading', { level: 3, name: /^CH-1\b.*Marlow Tower/ }) });
  await card.first().waitFor();
  assert.equal(await card.count(), 1, 'one open leak case on CH-1 at Marlow Tower');

  // Its next deadline is the repair, due within 7 days (the demo opens it 24 days before the day it is loaded).
  const badge = card.getByText(/\b(Due in \d+ days?|Due today)\b/).first();
  await badge.waitFor();
  const badgeText = (await badge.innerText()).trim();
  assert.match(badgeText, /^(Due in \d+ days?|Due today)$/);
  const daysLeft = badgeText === 'Due today' ? 0 : Number(/\d+/.exec(badgeText)![0]);
  assert.ok(daysLeft >= 0 && daysLeft <= 7, `the repair is due within 7 days (badge: "${badgeText}")`);
  assert.match(await card.innerText(), /Leak rate [\d.]+ %\/yr/, 'the card shows the leak rate');
  ctx.step(`leak case CH-1 at Marlow Tower: "${badgeText}"`);

  const book = card.getByRole('button', { name: 'Book repair visit' });
  assert.match(await card.innerText(), /Creates a return visit in the Roster queue/, 'the card says what booking does');
  await book.click();

  const said = await noticeText(page, /Repair visit WO-\d+ is in the Roster queue/);
  const number = Number(/WO-(\d+)/.exec(said)![1]);
  assert.ok(number > 0, `the notice names the work order (${said})`);
  assert.match(
    said,
    /to be booked by \d{1,2} [A-Z][a-z]{2} \d{4} with an EPA 608 .+ technician\./,
    'the notice gives the deadline and the certification',
  );
  // The card now names the repair visit instead of offering to book it again.
  await card.getByText(`Repair visit WO-${number}: in the Roster queue, not booked yet`).waitFor();
  assert.equal(await book.count(), 0, 'the case cannot be booked twice');
  ctx.step(`booked the repair: WO-${number} waits in the Roster queue`);
  await ctx.screen(page, 'watchlist-repair-booked');
  return number;
}

/**
 * The unit already has its open return visit (the repair just booked): booking again from the stale window creates
 * nothing, says why, and offers to open the visit that is there — one truck roll per need.
 */
async function bookAgainFromTheStaleWindow(ctx: JourneyContext, page: Page, card: Locator, number: number) {
  ctx.allowConsoleError(/status of 409 \(Conflict\).*\/api\/leak-cases\/[^/]+\/repair-visit/);
  await card.getByRole('button', { name: 'Book repair visit' }).click();
  const offer = card.getByRole('alert').filter({ hasText: 'No second visit was created' });
  await offer.waitFor();
  const link = offer.getByRole('link', { name: new RegExp(`^Open WO-${number}\\b`) });
  assert.equal(await link.count(), 1, `the refusal offers to open WO-${number}, the return visit already open`);
  ctx.step(`booking again from a second window: "${(await offer.innerText()).trim().replace(/\s+/g, ' ')}"`);
  await link.click();
  await page.waitForURL(/\/(units|visits)\//);
  await page.getByText(`WO-${number}`).first().waitFor();
  ctx.step(`taken to WO-${number} (${new URL(page.url()).pathname.split('/')[1]})`);
  await ctx.screen(page, 'open-return-offered');
}

async function findInRosterQueue(ctx: JourneyContext, page: Page, number: number) {
  await page.getByRole('navigation', { name: 'Screens' }).getByRole('link', { name: 'Roster', exact: true }).click();
  await page.getByRole('heading', { level: 1, name: 'Roster' }).waitFor();
  const queue = page.getByRole('complementary', { name: 'Unplaced work' });
  const item = queue.getByRole('listitem').filter({ has: page.getByRole('button', { name: `Book WO-${number}…`, exact: true }) });
  await item.waitFor();
  const text = await item.innerText();
  assert.match(text, /Return visit/, 'the repair waits as a return visit');
  assert.match(text, /Marlow Tower/, 'at Marlow Tower');
  assert.match(text, /EPA 608/, 'needing an EPA 608 certified technician');
  ctx.step(`WO-${number} is in the Roster's unplaced queue`);
  await ctx.screen(page, 'roster-queue');
}

async function buildQuarterlyAgreement(ctx: JourneyContext, page: Page) {
  await page.getByRole('navigation', { name: 'Screens' }).getByRole('link', { name: 'Agreements', exact: true }).click();
  await page.getByRole('heading', { level: 1, name: 'Agreements' }).waitFor();
  await ctx.screen(page, 'agreements');

  await page.getByRole('button', { name: 'New agreement' }).first().click();
  const form = page.locator('form').filter({ has: page.getByLabel('Term starts') });
  await form.waitFor();

  await form.getByLabel('Name').fill(AGREEMENT_NAME);
  const site = form.getByLabel('Site');
  const option = site.locator('option', { hasText: AGREEMENT_SITE });
  await option.waitFor({ state: 'attached' });
  const siteId = await option.getAttribute('value');
  assert.ok(siteId, `the site list offers ${AGREEMENT_SITE}`);
  await site.selectOption(siteId);

  // Choosing the site covers all its units; the journey keeps them all.
  const units = page.getByRole('group', { name: 'Covered units' }).getByRole('checkbox');
  await units.first().waitFor();
  const unitCount = await units.count();
  assert.ok(unitCount >= 1, 'the site has units to cover');
  for (let i = 0; i < unitCount; i++) assert.equal(await units.nth(i).isChecked(), true, 'every unit of the site is covered');

  await form.getByLabel('How often').selectOption('quarterly');
  await form.getByLabel('Day of the month').fill('12');
  const termStart = await form.getByLabel('Term starts').inputValue();
  assert.match(termStart, /^\d{4}-\d{2}-\d{2}$/, 'the term starts today by default');
  const termEnd = shiftDate(termStart, 1, -1);
  await form.getByLabel('Term ends').fill(termEnd);
  await form.getByLabel('SLA response (hours)').fill('8');
  await form.getByLabel('Minutes per visit').fill('90');
  await form.getByLabel('Price per term (USD)').fill('4,200');
  await form
    .getByLabel('Tasks per visit (one a line)')
    .fill('Replace filters\nClean condenser coil\nCheck belts and bearings\nTest safeties and controls');
  assert.match(await form.innerText(), /every 3 months/i, 'the recurrence reads as every 3 months');
  await ctx.screen(page, 'agreement-form');
  await form.getByRole('button', { name: 'Save agreement' }).click();

  const saved = await noticeText(page, /Agreement “.+” for .+ saved\./);
  assert.equal(saved, `Agreement “${AGREEMENT_NAME}” for ${AGREEMENT_SITE} saved. Preview its visit plan next.`);
  const panel = page
    .locator('section')
    .filter({ has: page.getByRole('heading', { level: 2, name: `${AGREEMENT_NAME} — ${AGREEMENT_SITE}` }) });
  await panel.waitFor();
  const terms = await panel.innerText();
  assert.match(terms, /8 hours/, 'the SLA is saved');
  assert.match(terms, /\$4,200/, 'the price is saved');
  // Dates in words as date-fns writes "d MMM yyyy" (the house style, DEVELOPERS.md "Dates on screen").
  const words = (d: string) => format(new Date(`${d}T12:00:00`), 'd MMM yyyy');
  assert.match(terms, new RegExp(`${words(termStart)} → ${words(termEnd)}`), 'the term is saved, its dates in words');
  assert.match(
    terms,
    /Replace filters · Clean condenser coil · Check belts and bearings · Test safeties and controls/,
    'the tasks are saved',
  );
  assert.match(terms, /No visits planned yet/, 'no visits before the plan is applied');
  ctx.step(`saved “${AGREEMENT_NAME}” (${unitCount} unit(s), ${termStart} → ${termEnd})`);

  await panel.getByRole('button', { name: 'Preview visit plan' }).click();
  const previewText = panel.getByText(/Preview: \d+ new, /);
  await previewText.waitFor();
  const newCount = Number(/^Preview: (\d+) new, 0 moved, 0 cancelled/.exec(await previewText.innerText())?.[1] ?? NaN);
  // Quarterly over one year: four rule dates, the first one dropped when the day has already passed this month.
  assert.ok(newCount >= 3 && newCount <= 4, `the preview plans 3 or 4 new visits (${await previewText.innerText()})`);
  const previewRows = panel.getByRole('table', { name: 'Visit plan preview' }).locator('tbody tr');
  assert.equal(await previewRows.count(), newCount, 'one preview row per planned visit');
  for (let i = 0; i < newCount; i++) assert.match(await previewRows.nth(i).innerText(), /Will be created/);
  await ctx.screen(page, 'agreement-plan-preview');

  await panel.getByRole('button', { name: `Apply plan (${newCount} new, 0 moved, 0 cancelled)` }).click();
  const applied = await noticeText(page, /Visit plan for “.+” applied/);
  assert.match(applied, new RegExp(`applied: ${newCount} new, 0 moved, 0 cancelled`), applied);
  await panel.getByText(new RegExp(`\\b${newCount} planned visits?; \\d+ ahead`)).waitFor();
  ctx.step(`applied the plan: ${newCount} visits`);

  await seeVisitsOnCalendar(ctx, page, panel, newCount);
}

/** The calendar (FullCalendar, loaded lazily) opens on the month of the first visit ahead; walks forward through the term. */
async function seeVisitsOnCalendar(ctx: JourneyContext, page: Page, panel: Locator, planned: number) {
  const calendar = panel.locator(`[aria-label="Planned visits of ${AGREEMENT_NAME} on a month calendar"]`);
  await calendar.locator('.fc-daygrid-body').waitFor();
  const titles = new Set<string>();
  const next = calendar.getByRole('button', { name: /next/i });
  for (let month = 0; month < 13 && titles.size < planned; month++) {
    const events = calendar.locator('.fc-event');
    for (const t of await events.allInnerTexts()) titles.add(t.trim());
    if (month === 0) {
      assert.ok(titles.size >= 1, 'the calendar opens on a month with a planned visit');
      await ctx.screen(page, 'agreement-calendar');
    }
    if (titles.size < planned) {
      const shown = calendar.locator('.fc-toolbar-title');
      const heading = (await shown.innerText()).trim();
      await next.click();
      await shown.filter({ hasNotText: heading }).waitFor();
    }
  }
  assert.equal(titles.size, planned, `every planned visit is on the calendar (${[...titles].join(', ')})`);
  for (const t of titles) assert.match(t, /^PM WO-\d+ · Unplaced$/, `a calendar event names its work order and state: ${t}`);
}

export async function run(ctx: JourneyContext) {
  const page = await ctx.launch(desktop);
  await signInThroughForm(ctx, page, 'branch_manager');
  const labels = await navigationLabels(page);
  assert.deepEqual(
    labels,
    expectedNavigation('branch_manager', 'desktop'),
    'the manager sees Roster, Watchlist, Agreements, Fix Quality, Sites',
  );
  await page.getByRole('heading', { level: 1, name: 'Watchlist' }).waitFor();
  await ctx.screen(page, 'watchlist');

  // A second window, open on the same Watchlist before the repair is booked (a colleague, or another tab), whose
  // live stream is down (a laptop on a flaky connection): it does not hear of the booking and still offers it.
  const stale = await ctx.launch(desktop);
  await stale.route('**/api/events*', (r) => r.abort());
  ctx.allowConsoleError(/api\/events/);
  await signInThroughForm(ctx, stale, 'branch_manager');
  const staleCard = stale.getByRole('listitem').filter({ has: stale.getByRole('heading', { level: 3, name: /^CH-1\b.*Marlow Tower/ }) });
  await staleCard.getByRole('button', { name: 'Book repair visit' }).waitFor();

  const repair = await bookTheLeakRepair(ctx, page);
  await bookAgainFromTheStaleWindow(ctx, stale, staleCard, repair);
  await findInRosterQueue(ctx, page, repair);
  await buildQuarterlyAgreement(ctx, page);

  await visitEveryScreen(ctx, page, labels);
}
