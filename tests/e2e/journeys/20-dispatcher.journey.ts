/**
 * Dispatcher, on a desktop (1440×900): signs in through the form, sees the dispatcher's navigation,
 * finds the technician's return visit in the Roster's unplaced queue, asks for a suggestion, books
 * it with one click on the proposed technician and time, drags the booking to another day in the
 * week view and sees that technician's load gauge move with it. Then every screen in the navigation.
 */
import assert from 'node:assert/strict';
import type { Locator, Page } from 'playwright-core';
import type { JourneyContext } from '../harness';
import { desktop } from '../harness';
import { addDays, dateInZone, readHandoff, weekdayOf } from '../handoff';
import { expectedNavigation, navigationLabels, signInThroughForm, visitEveryScreen } from '../support';

export const title = 'Dispatcher on a desktop';

/** The demo dispatcher works in the Chicago branch (apps/api/src/db/seed/catalogue.ts). */
const BRANCH_ZONE = 'America/Chicago';

/** A "what happened" notice (role status/alert) with this text. */
const notice = (page: Page, text: string | RegExp) => page.locator('[aria-live="polite"] > [role]').filter({ hasText: text });

/** Booked minutes in a load gauge's text: "2 h 00 min of 8 h 30 min", "45 min of …", "Day off", "1 h 00 min on a day off". */
function bookedMinutes(text: string): number {
  const t = text.trim();
  if (t === 'Day off') return 0;
  const m = /^(?:(\d+) h )?(\d+) min (?:of|on a day off)/.exec(t);
  assert.ok(m, `a load gauge text: "${t}"`);
  return Number(m[1] ?? 0) * 60 + Number(m[2]);
}

/** Polls `read` until `done` holds, at most `ms` (no fixed sleeps: waits on animation frames in the page). */
async function until<T>(page: Page, read: () => Promise<T>, done: (v: T) => boolean, ms: number): Promise<T> {
  const end = Date.now() + ms;
  let v = await read();
  while (!done(v) && Date.now() < end) {
    await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => r(null))));
    v = await read();
  }
  return v;
}

/** The date (`data-date`) of the calendar column an event sits in. */
const columnOf = (event: Locator) =>
  event.evaluate((el) => el.closest<HTMLElement>('td.fc-timegrid-col')?.dataset.date ?? null).catch(() => null);

export async function run(ctx: JourneyContext) {
  const page = await ctx.launch(desktop);
  await signInThroughForm(ctx, page, 'dispatcher');
  const labels = await navigationLabels(page);
  assert.deepEqual(labels, expectedNavigation('dispatcher', 'desktop'), 'the dispatcher sees Roster and Sites');
  await page.getByRole('heading', { level: 1, name: 'Roster' }).waitFor();
  await ctx.screen(page, 'roster');

  // ── The return visit in the unplaced queue ──
  const queue = page.getByRole('list', { name: 'Unplaced work, sorted' });
  await queue.waitFor();
  const handoff = readHandoff().returnVisit;
  let number: number;
  if (handoff) {
    number = handoff.number;
  } else {
    // Run on its own (no technician journey before it): the demo's own return visit.
    const item = queue.getByRole('listitem').filter({ hasText: 'Return visit' }).first();
    number = Number(/WO-(\d+)/.exec(await item.innerText())![1]);
  }
  const item = queue.getByRole('listitem').filter({ has: page.getByRole('button', { name: `Book WO-${number}…`, exact: true }) });
  await item.waitFor();
  const itemText = await item.innerText();
  assert.match(itemText, /Return visit/, `WO-${number} is a return visit`);
  if (handoff) {
    assert.match(itemText, new RegExp(`from WO-${handoff.originNumber}\\b`), 'the queue names the visit it came from');
    assert.ok(itemText.includes(handoff.siteName), `the queue names the site (${handoff.siteName})`);
  }
  ctx.step(`found WO-${number} in the unplaced queue${handoff ? ` (from the technician's WO-${handoff.originNumber} at ${handoff.siteName})` : ''}`);

  // ── Ask for a suggestion ──
  // The demo week is well booked, so the dispatcher tries the coming days until a technician has a
  // slot: weekdays Mon–Thu only, so the drag below has a later working day in the same week. From
  // Wednesday on, the rest of the demo's week is full (at most Friday would be left to drag to), so the
  // search starts on the next Monday.
  const today = dateInZone(new Date(), BRANCH_ZONE);
  const todayWeekday = weekdayOf(today);
  const firstOffset = todayWeekday === 1 || todayWeekday === 2 ? 1 : (8 - todayWeekday) % 7 || 7;
  await item.getByRole('button', { name: `Book WO-${number}…`, exact: true }).click();
  const dialog = page.getByRole('dialog', { name: new RegExp(`^Book WO-${number}\\b`) });
  await dialog.waitFor();
  const proposalName = /^Book \S+ at \d\d:\d\d$/;
  const proposal = dialog.getByRole('button', { name: proposalName }).first();
  let day = today;
  const tried: string[] = [];
  for (let i = firstOffset; i < firstOffset + 14; i++) {
    day = addDays(today, i);
    if (![1, 2, 3, 4].includes(weekdayOf(day))) continue;
    await dialog.getByLabel('Date').fill(day);
    await dialog.getByRole('heading', { name: `Suggested technicians for ${day}` }).waitFor();
    // Every candidate's reasons name the day ranked ("… free on <day>", "No free slot … on <day>", "Not working on <day>").
    await dialog.getByRole('listitem').filter({ hasText: new RegExp(`on ${day}\\b`) }).first().waitFor();
    await dialog.getByText('Ranking technicians…').waitFor({ state: 'hidden' });
    if ((await proposal.count()) > 0) break;
    tried.push(day);
  }
  assert.ok((await proposal.count()) > 0, `a technician is free for WO-${number} on one of the coming weekdays (none on ${tried.join(', ')})`);
  if (tried.length) ctx.step(`no free technician on ${tried.join(', ')}: every candidate says why (no free slot / not working)`);
  // The first candidate with a one-click proposal: its reasons are the list under its name.
  const candidate = dialog.locator('ol > li').filter({ has: page.getByRole('button', { name: proposalName }) }).first();
  const reasons = (await candidate.locator('ul > li').allInnerTexts()).map((r) => r.trim());
  assert.ok(reasons.length > 0, 'the proposed technician comes with reasons');
  assert.ok(reasons.some((r) => new RegExp(`free on ${day}$`).test(r)), `a reason names the free time on ${day}: ${reasons.join(' | ')}`);
  assert.ok(reasons.some((r) => /drive from the previous stop$/.test(r)), `a reason names the drive: ${reasons.join(' | ')}`);
  const minutes = Number(await dialog.getByLabel('Length in minutes').inputValue());
  assert.ok(minutes >= 15, 'the form proposes the work order’s estimated length');
  const proposalText = (await proposal.innerText()).trim();
  ctx.step(`suggestion for ${day}: "${proposalText}" — ${reasons.join('; ')}`);
  await ctx.screen(page, 'roster-book-suggestions');

  // ── Book it with one click ──
  await proposal.click();
  const booked = notice(page, new RegExp(`^Booked WO-${number} with .+, .+\\.$`));
  await booked.waitFor();
  const bookedText = (await booked.innerText()).trim();
  const [, techName, from, to] = /^Booked WO-\d+ with (.+), \w{3} \d{1,2} \w{3}, (\d\d:\d\d)–(\d\d:\d\d)\.$/.exec(bookedText) ?? [];
  assert.ok(techName && from && to, `the notice says who and when: "${bookedText}"`);
  assert.equal(proposalText, `Book ${techName.split(' ')[0]} at ${from}`, 'booked the proposed technician at the proposed time');
  const length = Number(to.slice(0, 2)) * 60 + Number(to.slice(3)) - (Number(from.slice(0, 2)) * 60 + Number(from.slice(3)));
  assert.equal(length, minutes, 'the booking is as long as the work order’s estimate');
  await dialog.waitFor({ state: 'hidden' });
  await page.getByRole('button', { name: `Book WO-${number}…`, exact: true }).waitFor({ state: 'detached' });
  ctx.step(`booked: ${bookedText}`);

  // ── Show only that technician, in the week of the booking ──
  const show = page.getByRole('combobox', { name: 'Show' });
  await show.selectOption({ label: `Only ${techName}` });
  const techId = await show.inputValue();
  for (let i = 0; i < 3 && (await page.locator(`td.fc-timegrid-col[data-date="${day}"]`).count()) === 0; i++) {
    await page.getByRole('button', { name: 'Next week' }).click();
  }
  const event = page.locator(`.fc-event[aria-label^="WO-${number} with "]`);
  await event.waitFor();
  assert.equal(await columnOf(event), day, `WO-${number} shows on ${day}`);
  await page.waitForFunction(() => !document.querySelector('[aria-busy="true"]'));
  await ctx.screen(page, 'roster-booked');

  // ── Drag it to another day ──
  // The target: the free stretch inside working hours (the calendar shades the rest) on another
  // weekday of the week after today, nearest in time to the booking. Planned again on each try.
  const plan = () =>
    page.evaluate(
      ({ selector, source, today }) => {
        const ev = document.querySelector<HTMLElement>(selector);
        if (!ev) return null;
        const scroller = ev.closest<HTMLElement>('.fc-scroller');
        scroller?.scrollIntoView({ block: 'start' });
        const slot = document.querySelector<HTMLElement>('td.fc-timegrid-slot-lane')!.getBoundingClientRect().height; // 30 min
        const quarter = slot / 2;
        const evCol = ev.closest<HTMLElement>('td.fc-timegrid-col')!;
        const evTop = ev.getBoundingClientRect().top - evCol.getBoundingClientRect().top;
        const height = ev.getBoundingClientRect().height;
        let best: { date: string; col: HTMLElement; top: number; distance: number } | null = null;
        for (const col of Array.from(document.querySelectorAll<HTMLElement>('td.fc-timegrid-col[data-date]'))) {
          const d = col.dataset.date!;
          const wd = new Date(`${d}T12:00:00Z`).getUTCDay();
          if (d === source || d <= today || wd === 0 || wd === 6) continue;
          const c = col.getBoundingClientRect();
          const blocked = Array.from(col.querySelectorAll('.fc-non-business, .fc-event'))
            .map((e) => e.getBoundingClientRect())
            .map((r) => [r.top - c.top, r.bottom - c.top] as const)
            .sort((x, y) => x[0] - y[0]);
          let free = 0;
          for (const [t, bottom] of [...blocked, [c.height, c.height] as const]) {
            // A gap [free, t): room for the booking with a quarter hour either side.
            if (t - free >= height + 2 * quarter) {
              const top = Math.min(Math.max(evTop, free + quarter), t - quarter - height);
              const distance = Math.abs(top - evTop);
              if (!best || distance < best.distance) best = { date: d, col, top, distance };
            }
            free = Math.max(free, bottom);
          }
        }
        if (!best || !scroller) return null;
        // Both the grab point and the drop point inside the calendar's visible scroll area.
        const lo = Math.min(evTop, best.top);
        const hi = Math.max(evTop, best.top) + height;
        const view = scroller.clientHeight;
        if (hi - lo < view - 2 * slot) scroller.scrollTop = Math.max(0, lo - (view - (hi - lo)) / 2);
        const e = ev.getBoundingClientRect();
        const t = best.col.getBoundingClientRect();
        const grabOffset = Math.min(12, height / 3);
        return {
          date: best.date,
          grab: { x: e.left + e.width / 2, y: e.top + grabOffset },
          drop: { x: t.left + t.width / 2, y: t.top + best.top + grabOffset },
        };
      },
      { selector: `.fc-event[aria-label^="WO-${number} with "]`, source: day, today },
    );
  const first = await plan();
  assert.ok(first, `a free stretch of working hours for WO-${number} on another weekday after ${today} in the week of ${day}`);
  const targetDate = first.date;
  const sourceGauge = page.getByTestId(`load-${techId}-${day}`);
  const targetGauge = page.getByTestId(`load-${techId}-${targetDate}`);
  const before = { source: bookedMinutes(await sourceGauge.innerText()), target: bookedMinutes(await targetGauge.innerText()) };

  let moved = false;
  for (let attempt = 1; attempt <= 3 && !moved; attempt++) {
    const p = attempt === 1 ? first : await plan();
    assert.ok(p && p.date === targetDate, `the drag target is still free on ${targetDate}`);
    await page.mouse.move(p.grab.x, p.grab.y);
    await page.mouse.down();
    await page.mouse.move(p.grab.x + 6, p.grab.y + 6, { steps: 3 }); // past FullCalendar's drag threshold
    await page.mouse.move(p.drop.x, p.drop.y, { steps: 15 });
    await page.mouse.up();
    moved = (await until(page, () => columnOf(event), (d) => d === targetDate, 5000)) === targetDate;
    if (!moved) ctx.step(`drag attempt ${attempt} did not land; retrying`);
  }
  assert.ok(moved, `WO-${number} was dragged from ${day} to ${targetDate}`);
  const movedNotice = notice(page, new RegExp(`^Moved: WO-${number} with ${techName}, .+\\.$`));
  await movedNotice.waitFor();
  const movedText = (await movedNotice.innerText()).trim();
  const [, newFrom, newTo] = /, (\d\d:\d\d)–(\d\d:\d\d)\.$/.exec(movedText) ?? [];
  assert.ok(newFrom && newTo, `the notice says the new time: "${movedText}"`);
  const toMin = (hhmm: string) => Number(hhmm.slice(0, 2)) * 60 + Number(hhmm.slice(3));
  assert.equal(toMin(newTo) - toMin(newFrom), minutes, 'the move keeps the booking’s length');
  ctx.step(movedText);

  // ── The load gauge follows ──
  const after = await until(
    page,
    async () => ({ source: bookedMinutes(await sourceGauge.innerText()), target: bookedMinutes(await targetGauge.innerText()) }),
    (v) => v.source !== before.source && v.target !== before.target,
    10_000,
  );
  assert.equal(after.source, before.source - minutes, `${day}: ${before.source} min − ${minutes} min booked`);
  assert.equal(after.target, before.target + minutes, `${targetDate}: ${before.target} min + ${minutes} min booked`);
  ctx.step(`dragged to ${targetDate}: load ${day} ${before.source}→${after.source} min, ${targetDate} ${before.target}→${after.target} min`);
  await page.waitForFunction(() => !document.querySelector('[aria-busy="true"]'));
  await ctx.screen(page, 'roster-moved');

  await visitEveryScreen(ctx, page, labels);
}
