/**
 * The technician works a stop without signal (390×844): signed in and with the route opened online, the
 * network is cut and the app reopened; on the kept route the technician goes en route and on site, records
 * a reading and a finding and closes the visit, all offline; the screens show each change at once and the
 * banner counts what waits ("5 changes waiting to send"). With the connection back the outbox sends them in
 * order, the count goes, and the API holds each change exactly once (one reading for the circuit, one
 * finding, one en-route and one on-site event, the visit closed as resolved).
 * First a conflict: offline, the technician marks the first booked stop en route while the dispatcher unbooks
 * that visit; back online the change is refused, told in words, never sent over the office's change, and
 * discarded; the office then books the work order again as it was.
 * Works the first stop still booked from today; creates no return visit; unbooks one stop and books
 * its work order again as it was. Runs after the office journeys (file name 50-…): closing a stop of the
 * week the dispatcher journey drags bookings in made its board drag refuse (seen, cause not found).
 */
import assert from 'node:assert/strict';
import { request, type Page } from 'playwright-core';
import type { JourneyContext } from '../harness';
import { phone } from '../harness';
import { addDays, dateInZone } from '../handoff';
import { DEMO_PASSWORD, demo, signInThroughForm, keptKeys } from '../support';

export const title = 'Technician works a stop offline';

/** The demo technician works in the Chicago branch (apps/api/src/db/seed/catalogue.ts). */
const BRANCH_ZONE = 'America/Chicago';
const routeHeading = (page: Page) => page.getByRole('heading', { level: 1, name: 'Route' });
const notice = (page: Page, text: string | RegExp) => page.locator('[role="status"], [role="alert"]').filter({ hasText: text }).first();

interface VisitDto {
  status: string;
  outcome: string | null;
  readings: { circuitId: string; suctionPressure: number | null }[];
  findings: { causeCode: string; notes: string | null }[];
  events: { state: string }[];
}

/** The first day from `from` with a stop still booked, as the API answers it (not the phone's kept copy). */
async function firstBooked(ctx: JourneyContext, page: Page, from: string): Promise<{ date: string; visitId: string }> {
  let date = from;
  for (let i = 0; i < 14; i++, date = addDays(date, 1)) {
    const day = (await (await page.request.get(`${ctx.base}/api/day?date=${date}`)).json()) as { stops: { visitId: string; status: string }[] };
    const stop = day.stops.find((s) => s.status === 'booked');
    if (stop) return { date, visitId: stop.visitId };
  }
  throw new Error(`the demo books the technician a stop within two weeks of ${from}`);
}

/** Opens Route on the date and waits for the stop's card with its "En route" button. */
async function openStop(ctx: JourneyContext, page: Page, date: string, visitId: string) {
  await page.goto(`${ctx.base}/day?date=${date}`);
  await routeHeading(page).waitFor();
  const card = page.getByRole('list', { name: 'Stops in route order' }).locator(':scope > li').filter({ has: page.locator(`a[href="/visits/${visitId}"]`) });
  await card.getByRole('button', { name: 'En route' }).waitFor();
  return card;
}

export async function run(ctx: JourneyContext): Promise<void> {
  const page = await ctx.launch(phone);
  // While the network is cut, the page's own refetches fail at the network layer: expected here.
  ctx.allowConsoleError(/ERR_INTERNET_DISCONNECTED|Failed to fetch|net::ERR_FAILED/);
  await signInThroughForm(ctx, page, 'technician');
  await page.waitForFunction(() => navigator.serviceWorker?.controller != null, undefined, { timeout: 30_000 });

  // ── A conflict: the office unbooks a stop while the phone, offline, marks it en route ──
  const today = dateInZone(ctx.now(), BRANCH_ZONE);
  const stops = page.getByRole('list', { name: 'Stops in route order' });
  const conflictFound = await firstBooked(ctx, page, today);
  const conflictDate = conflictFound.date;
  const other = await openStop(ctx, page, conflictDate, conflictFound.visitId);
  const otherSite = (await other.getByRole('heading', { level: 2 }).innerText()).replace(/^Stop \d+:\s*/, '').trim();
  const otherHref = await other.getByRole('link', { name: 'Open visit' }).getAttribute('href');
  const otherId = /\/visits\/([\w-]+)$/.exec(otherHref ?? '')?.[1];
  assert.ok(otherId, `the stop links its visit (${otherHref})`);
  // The unbooked visit answers 404 to the phone's change and to its refetch: expected here.
  ctx.allowConsoleError(new RegExp(`status of 404 .*/api/visits/${otherId}`));
  // The booking as Route knows it, to book the work order again at the end (the journeys after this one
  // find the technician's week as the demo made it).
  const dayAnswer = (await (await page.request.get(`${ctx.base}/api/day?date=${conflictDate}`)).json()) as {
    tech: { id: string };
    stops: { visitId: string; booking: { startAt: string; endAt: string; fixed: boolean }; workOrder: { id: string } }[];
  };
  const otherStop = dayAnswer.stops.find((s) => s.visitId === otherId);
  assert.ok(otherStop, 'the stop is on the day’s answer');
  await page.context().setOffline(true);
  await page.getByText('Offline.', { exact: false }).first().waitFor();
  await other.getByRole('button', { name: 'En route' }).click();
  await notice(page, 'Marked en route on this phone; it is sent when the connection is back.').waitFor();

  const office = await request.newContext({ baseURL: ctx.base });
  try {
    const signedIn = await office.post('/api/auth/sign-in', { data: { email: demo.dispatcher, password: DEMO_PASSWORD } });
    assert.equal(signedIn.status(), 200, 'the dispatcher signs in');
    const v = (await (await office.get(`/api/visits/${otherId}`)).json()) as { booking: { id: string } | null };
    assert.ok(v.booking, 'the visit has a booking');
    const unbooked = await office.delete(`/api/bookings/${v.booking.id}`);
    assert.ok(unbooked.ok(), `the dispatcher unbooks the visit (${unbooked.status()})`);
    ctx.step(`offline: en route at ${otherSite}; meanwhile the dispatcher unbooks that visit`);

    await page.context().setOffline(false);
    const refused = page.getByRole('list', { name: 'Changes the server did not accept' }).getByRole('listitem').filter({ hasText: otherSite });
    await refused.waitFor({ timeout: 30_000 });
    const words = await refused.innerText();
    assert.match(words, /Not sent — the visit changed at the office: En route/, 'the conflict names the change');
    assert.match(words, /The office moved this visit to another technician or unbooked it while this phone was offline/, 'the conflict is told in words');
    await page.getByText('1 change not accepted by the server', { exact: false }).first().waitFor();
    await ctx.screen(page, 'route-conflict');
    assert.equal((await office.get(`/api/visits/${otherId}`)).status(), 404, 'the unbooked visit stays unbooked: nothing was sent over it');
    await refused.getByRole('button', { name: 'Discard' }).click();
    await refused.waitFor({ state: 'detached' });
    await notice(page, 'Discarded: En route. It was not saved.').waitFor();
    ctx.step('back online: the conflict is shown in words, not sent over the office’s change, and discarded');

    // The office books the work order again as it was (overriding, with a reason, any rule the demo's booking broke):
    // the stop is booked again, for the rest of this journey and the ones after it.
    const again = { workOrderId: otherStop.workOrder.id, techId: dayAnswer.tech.id, startAt: otherStop.booking.startAt, endAt: otherStop.booking.endAt, fixed: otherStop.booking.fixed };
    let rebooked = await office.post('/api/bookings', { data: again });
    if (rebooked.status() === 409) {
      const rules = ((await rebooked.json()) as { error: { details?: { rules?: string[] } } }).error.details?.rules;
      assert.ok(rules?.length, `the booking is refused only for a rule that can be overridden (${await rebooked.text()})`);
      rebooked = await office.post('/api/bookings', { data: { ...again, overrideRules: rules, overrideReason: 'Booked again as before after the offline conflict check.' } });
    }
    assert.equal(rebooked.status(), 201, `the work order is booked again (${await rebooked.text()})`);
  } finally {
    await office.dispose();
  }

  // ── Working offline: the first day from today with a stop still booked, opened online ──
  let date = today;
  const found = await firstBooked(ctx, page, today);
  date = found.date;
  const stop = await openStop(ctx, page, date, found.visitId);
  const site = (await stop.getByRole('heading', { level: 2 }).innerText()).replace(/^Stop \d+:\s*/, '').trim();
  const href = await stop.getByRole('link', { name: 'Open visit' }).getAttribute('href');
  const visitId = /\/visits\/([\w-]+)$/.exec(href ?? '')?.[1];
  assert.ok(visitId, `the stop links its visit (${href})`);
  const before = (await (await page.request.get(`${ctx.base}/api/visits/${visitId}`)).json()) as VisitDto;
  assert.equal(before.status, 'booked');

  // The phone keeps the route, the visit and its briefings (written a moment after each answer).
  const kept = (keys: string) => keys.includes(`["day","${date}"]`) && keys.includes(`["visit","${visitId}"]`);
  for (let i = 0; !kept(await page.evaluate(keptKeys)); i++) {
    assert.ok(i < 60, `the phone keeps the route of ${date} and the visit at ${site} (IndexedDB)`);
    await page.waitForTimeout(250);
  }
  ctx.step(`route of ${date} and the visit at ${site} kept on the phone`);

  // ── No signal: the app reopens from the phone ──
  await page.context().setOffline(true);
  await page.reload();
  await routeHeading(page).waitFor();
  await page.getByText('Offline.', { exact: false }).first().waitFor();
  await page.getByText(/^Kept on this phone, as of (\w{3} \d{1,2} \w{3}, )?\d\d:\d\d\.$/).waitFor();
  ctx.step(`offline: ${await page.getByText(/^Kept on this phone, as of/).innerText()}`);

  const card = stops.locator(':scope > li').filter({ hasText: site }).first();
  await card.getByRole('button', { name: 'En route' }).click();
  await notice(page, 'Marked en route on this phone; it is sent when the connection is back.').waitFor();
  await card.getByRole('button', { name: 'On site' }).click();
  await notice(page, 'Marked on site on this phone; it is sent when the connection is back.').waitFor();
  await page.getByText('2 changes waiting to send', { exact: false }).first().waitFor();
  await ctx.screen(page, 'route-offline-waiting');
  ctx.step('offline: en route and on site from Route; the banner counts 2 changes waiting');

  await card.getByRole('link', { name: 'Record the visit' }).click();
  await page.getByRole('heading', { level: 1, name: /^Visit · / }).waitFor();

  // A reading on the first circuit (values only recorded: the technician journey checks the computation).
  const suction = page.getByLabel(/^Suction pressure, .*circuit 1 \(psig\)$/).first();
  await suction.fill('118');
  await page.getByLabel(/^Suction line temperature, .*circuit 1 \(°F\)$/).first().fill('52');
  await page.getByRole('button', { name: 'Save readings' }).click();
  await notice(page, /^Readings for 1 circuit kept on this phone/).waitFor();
  assert.equal(await suction.inputValue(), '118', 'the kept reading shows in the form');

  // A finding.
  await page.getByLabel('Cause code').selectOption({ label: 'Sensor fault' });
  await page.getByLabel('Origin').selectOption({ label: 'Wear' });
  await page.getByLabel('Notes', { exact: true }).fill('Suction transducer reads 6 psi high against the reference gauge; recalibrated.');
  await page.getByRole('button', { name: 'Add finding' }).click();
  await notice(page, 'Finding kept on this phone: Sensor fault.').waitFor();
  await page.getByRole('listitem').filter({ hasText: 'Sensor fault' }).filter({ hasText: 'Waiting to send' }).waitFor();

  // Close-out.
  await page.getByRole('radio', { name: /^Resolved/ }).check();
  await page.getByRole('radio', { name: 'Customer not available' }).check();
  await page.getByLabel('Visit notes', { exact: true }).fill('Transducer recalibrated; unit running within range.');
  await page.getByRole('button', { name: 'Close visit' }).click();
  await notice(page, 'Visit closed on this phone; the close-out is sent when the connection is back.').waitFor();
  await page.getByText(/The close-out is kept on this phone and waits to send/).waitFor();
  await page.getByText('5 changes waiting to send', { exact: false }).first().waitFor();
  await ctx.screen(page, 'visit-offline-closed');
  ctx.step('offline: a reading, a finding and the close-out recorded; 5 changes waiting to send');

  // ── The connection is back: everything arrives, in order, once ──
  await page.context().setOffline(false);
  await page.getByText(/changes? waiting to send/).first().waitFor({ state: 'detached', timeout: 30_000 });
  await page.getByText(/Service summary \(with PDF\) sent to \S+@\S+\.|Service summary not sent/).first().waitFor({ timeout: 30_000 });
  assert.match(await page.locator('#close-out').innerText(), /Closed .* as Resolved/, 'the close-out shows the server’s close');
  ctx.step('back online: the outbox emptied; the close-out shows the server’s answer');

  const after = (await (await page.request.get(`${ctx.base}/api/visits/${visitId}`)).json()) as VisitDto;
  assert.equal(after.status, 'closed');
  assert.equal(after.outcome, 'resolved');
  const circuitReadings = after.readings.filter((r) => r.suctionPressure === 118);
  assert.equal(circuitReadings.length, 1, `one reading of 118 psig arrived (${after.readings.length} readings in all)`);
  assert.equal(after.readings.length - before.readings.length <= 1, true, 'no reading was doubled');
  assert.equal(after.findings.filter((f) => f.causeCode === 'sensor_fault' && /transducer/.test(f.notes ?? '')).length, 1, 'one finding arrived');
  assert.equal(after.events.filter((e) => e.state === 'en_route').length, 1, 'en route recorded once');
  assert.equal(after.events.filter((e) => e.state === 'on_site').length, 1, 'on site recorded once');
  ctx.step('the API holds one reading, one finding, one en-route and one on-site event; the visit closed as resolved');

  // On Route the stop shows closed, from the server.
  await page.getByRole('link', { name: 'Back to Route' }).click();
  await routeHeading(page).waitFor();
  await page.goto(`${ctx.base}/day?date=${date}`);
  await stops.locator(':scope > li').filter({ hasText: site }).first().getByText('Closed: Resolved').waitFor();
  ctx.step(`Route shows ${site} closed: resolved`);

  ctx.expectNoConsoleErrors();
}
