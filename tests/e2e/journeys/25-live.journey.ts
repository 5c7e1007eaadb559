/**
 * Two dispatchers of one branch, each in their own browser on a desktop (1440×900), both on the Roster's
 * board. The second books a job a couple of weeks ahead; the first drags its chip to the day before. Without
 * a reload, the second's board shows the chip on its new day saying "Changed by Priya just now" (the live
 * events of `GET /api/events`); the first, who moved it, sees no such line on their own chip. Then a
 * technician sets off to a stop, and both boards show it "En route" (this leaves that stop en route in the
 * demo: a started visit cannot be unbooked).
 */
import assert from 'node:assert/strict';
import type { Page } from 'playwright-core';
import type { JourneyContext } from '../harness';
import { desktop, phone } from '../harness';
import { addDays, dateInZone, weekdayOf } from '../handoff';
import { DEMO_PASSWORD, demo } from '../support';

export const title = 'Two dispatchers see each other’s moves';

/** The demo's Chicago branch (apps/api/src/db/seed/catalogue.ts): two dispatchers share its board. */
const BRANCH_ZONE = 'America/Chicago';
const SECOND_DISPATCHER = 'dispatch2@coilpath.example';
/** A Chicago technician other than the one the technician journeys use. */
/** The technician the technician journeys use (tech@): set off with someone else's stop when there is one. */
const TECHNICIANS_JOURNEY = 'Luis Ferreira';
/** A demo technician's sign-in: tech@ for Luis Ferreira, first.last@ for the other Chicago technicians (catalogue.ts). */
const emailOf = (name: string) =>
  name === TECHNICIANS_JOURNEY ? 'tech@coilpath.example' : `${name.toLowerCase().split(' ').join('.')}@coilpath.example`;

async function signIn(ctx: JourneyContext, page: Page, email: string, home = '/roster') {
  await page.goto(`${ctx.base}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => u.pathname === home, { timeout: 15_000 });
  if (home !== '/roster') return;
  await page.getByRole('table', { name: /^Technician board/ }).waitFor();
  await page.getByRole('combobox', { name: 'Show' }).selectOption('all');
  ctx.step(`signed in as ${email} → the Roster's board`);
}

/** Moves the board a week at a time until the cell exists (at most four weeks). */
async function showCell(page: Page, testId: string) {
  // Step week by week towards the cell's date (earlier or later than the week shown), each time waiting for the
  // new week's cells before looking again.
  const title = page.locator('h2[aria-live="polite"]');
  const target = testId.slice(-10);
  const shownDays = () =>
    page.locator('[data-testid^="board-"]').evaluateAll((els) =>
      els
        .map((e) => e.getAttribute('data-testid')!.slice(-10))
        .filter((d) => /^\d{4}-\d{2}-\d{2}$/.test(d))
        .sort(),
    );
  for (let i = 0; i < 8 && (await page.getByTestId(testId).count()) === 0; i++) {
    await page.locator('[data-testid^="board-"]').first().waitFor();
    const days = await shownDays();
    if (days.includes(target)) break;
    const before = await title.innerText();
    await page.getByRole('button', { name: target < days[0]! ? 'Previous week' : 'Next week' }).click();
    // The title names the new week and the cells are the new week's (their earliest day moved).
    await page.waitForFunction(
      ([t, first]) => {
        const days = Array.from(document.querySelectorAll('[data-testid^="board-"]'), (e) => e.getAttribute('data-testid')!.slice(-10))
          .filter((d) => /^\d{4}-\d{2}-\d{2}$/.test(d))
          .sort();
        return document.querySelector('h2[aria-live="polite"]')?.textContent !== t && days.length > 0 && days[0] !== first;
      },
      [before, days[0]] as const,
    );
  }
  assert.equal(await page.getByTestId(testId).count(), 1, `the board reaches ${testId}`);
}

type Job = { id: string; number: number };
type Candidate = { techId: string; name: string; eligible: boolean; proposedStart: string | null; proposedEnd: string | null };
type DayLoad = { techId: string; day: string; bookedMinutes: number; capacityMinutes: number };

/**
 * A job, a technician and a Wednesday at least a week ahead where the server proposes a start, with the
 * Tuesday before free and worked by that technician (so the move there breaks no rule).
 */
async function findMove(ctx: JourneyContext, page: Page, today: string) {
  const jobs = (
    (await (await page.request.get(`${ctx.base}/api/work-orders`, { params: { state: 'unplaced' } })).json()) as { workOrders: Job[] }
  ).workOrders;
  let wednesday = addDays(today, 8);
  while (weekdayOf(wednesday) !== 3) wednesday = addDays(wednesday, 1);
  for (let week = 0; week < 3; week++, wednesday = addDays(wednesday, 7)) {
    const tuesday = addDays(wednesday, -1);
    const load = (
      (await (await page.request.get(`${ctx.base}/api/roster/load`, { params: { from: tuesday, to: tuesday } })).json()) as {
        load: DayLoad[];
      }
    ).load;
    for (const job of jobs.slice(0, 6)) {
      const res = await page.request.post(`${ctx.base}/api/roster/suggest`, {
        data: { workOrderId: job.id, day: wednesday },
        headers: { Origin: ctx.base },
      });
      const { candidates } = (await res.json()) as { candidates: Candidate[] };
      const pick = candidates.find((c) => {
        const l = load.find((x) => x.techId === c.techId && x.day === tuesday);
        return c.eligible && c.proposedStart && l && l.capacityMinutes > 0 && l.bookedMinutes === 0;
      });
      if (pick) return { job, tech: pick, wednesday, tuesday };
    }
  }
  throw new Error('no unplaced job with a proposal on a Wednesday ahead whose Tuesday is free');
}

export async function run(ctx: JourneyContext) {
  const first = await ctx.launch(desktop);
  const second = await ctx.launch(desktop);
  await signIn(ctx, first, demo.dispatcher);
  await signIn(ctx, second, SECOND_DISPATCHER);
  const today = dateInZone(ctx.now(), BRANCH_ZONE);

  // ── The second dispatcher books a job on a Wednesday ahead ──
  const { job, tech, wednesday, tuesday } = await findMove(ctx, second, today);
  const booked = await second.request.post(`${ctx.base}/api/bookings`, {
    data: { workOrderId: job.id, techId: tech.techId, startAt: tech.proposedStart, endAt: tech.proposedEnd },
    headers: { Origin: ctx.base },
  });
  assert.equal(booked.status(), 201, `booking WO-${job.number}: ${await booked.text()}`);
  const booking = ((await booked.json()) as { booking: { id: string } }).booking;
  ctx.step(`${SECOND_DISPATCHER} booked WO-${job.number} with ${tech.name} on ${wednesday}`);

  // Both boards show it on the Wednesday; the first never reloads from here on.
  const cell = (page: Page, day: string) => page.getByTestId(`board-${tech.techId}-${day}`);
  const chip = (page: Page, day: string) => cell(page, day).locator(`[data-chip="${booking.id}"]`);
  await showCell(first, `board-${tech.techId}-${wednesday}`);
  await showCell(second, `board-${tech.techId}-${wednesday}`);
  await chip(first, wednesday).waitFor();
  await chip(second, wednesday).waitFor();
  assert.equal(
    await chip(second, wednesday).getByTestId('chip-changed-by').count(),
    0,
    'one’s own booking says nothing about who changed it',
  );

  // ── The first dispatcher drags it to the Tuesday ──
  await chip(first, wednesday).dragTo(cell(first, tuesday).locator('[data-nav-head]'));
  const moved = first.locator('[aria-live="polite"] > [role]').filter({ hasText: new RegExp(`^Moved: WO-${job.number} with `) });
  await moved.waitFor();
  ctx.step(`the first dispatcher: "${(await moved.innerText()).trim()}"`);
  await chip(first, tuesday).waitFor();

  // ── The second board follows by itself ──
  await chip(second, tuesday).waitFor({ timeout: 10_000 });
  assert.equal(await chip(second, wednesday).count(), 0, `WO-${job.number} left ${wednesday} on the second board`);
  const mark = chip(second, tuesday).getByTestId('chip-changed-by');
  await mark.waitFor();
  assert.equal(
    (await mark.innerText()).trim(),
    'Changed by Priya just now',
    'the chip says who moved it (the demo dispatcher Priya Venkatesh)',
  );
  assert.equal(
    await chip(first, tuesday).getByTestId('chip-changed-by').count(),
    0,
    'the one who moved it is not told about their own move',
  );
  ctx.step(`the second board shows WO-${job.number} on ${tuesday}: "${(await mark.innerText()).trim()}", without a reload`);
  await ctx.screen(second, 'roster-changed-by-another');

  // ── A technician sets off: the stop's state moves on both boards ──
  // The next stop ahead of a Chicago technician other than the one the technician journeys use; when the demo
  // has none in the coming two weeks (a holiday season), the job just moved.
  type Row = { id: string; techId: string; startAt: string; visitId: string | null; workOrder: { number: number; state: string } };
  const techs = (
    (await (await first.request.get(`${ctx.base}/api/roster/technicians`)).json()) as { technicians: { id: string; name: string }[] }
  ).technicians;
  const now = ctx.now();
  const rows = (
    (await (
      await first.request.get(`${ctx.base}/api/bookings`, {
        params: { from: now.toISOString(), to: new Date(now.getTime() + 14 * 86_400_000).toISOString() },
      })
    ).json()) as { bookings: Row[] }
  ).bookings;
  const nameOf = (techId: string) => techs.find((t) => t.id === techId)!.name;
  const other = rows
    .filter((b) => b.workOrder.state === 'booked' && b.visitId && b.id !== booking.id && nameOf(b.techId) !== TECHNICIANS_JOURNEY)
    .sort((a, b) => a.startAt.localeCompare(b.startAt))[0];
  const stop = other ?? rows.find((b) => b.id === booking.id);
  assert.ok(stop, `a stop ahead (WO-${job.number} at the least)`);
  if (other) {
    // Leave the demo as it was for the journeys after this one (this booking, at least).
    const unbook = await first.request.delete(`${ctx.base}/api/bookings/${booking.id}`, { headers: { Origin: ctx.base } });
    assert.equal(unbook.status(), 204, `unbooking WO-${job.number}`);
    await chip(second, tuesday).waitFor({ state: 'detached', timeout: 10_000 });
    ctx.step(`unbooked by the first: the chip left the second board too`);
  }
  const techId = stop.techId;
  const technicianName = nameOf(techId);
  const stopDay = dateInZone(new Date(stop.startAt), BRANCH_ZONE);
  const stopCell = `board-${techId}-${stopDay}`;
  for (const page of [first, second]) {
    await showCell(page, stopCell);
    await page.getByTestId(stopCell).locator(`[data-chip="${stop.id}"]`).waitFor();
  }
  const technician = await ctx.launch(phone);
  await signIn(ctx, technician, emailOf(technicianName), '/day');
  const enRoute = await technician.request.patch(`${ctx.base}/api/visits/${stop.visitId}`, {
    data: { state: 'en_route' },
    headers: { Origin: ctx.base },
  });
  assert.equal(enRoute.status(), 200, `${technicianName} sets off to WO-${stop.workOrder.number}: ${await enRoute.text()}`);
  for (const page of [first, second]) {
    await page.getByTestId(stopCell).locator(`[data-chip="${stop.id}"]`).filter({ hasText: 'En route' }).waitFor({ timeout: 10_000 });
  }
  ctx.step(`${technicianName} set off to WO-${stop.workOrder.number} (${stopDay}): both boards say "En route" without a reload`);
  await ctx.screen(first, 'roster-stop-en-route');
  ctx.expectNoConsoleErrors();
}
