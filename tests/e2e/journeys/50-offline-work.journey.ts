/**
 * The technician works the day's route without signal (390×844): signed in and with the route opened online
 * (Route fetches every stop's visit), the network is cut and the app reopened; on the kept route the
 * technician works two stops: en route and on site from Route, then on each Visit a reading, a finding, a photo
 * (its thumbnail drawn from the bytes kept on the phone) and the close-out — the first with "Customer not
 * available", the second signed on the pad. Between the stops the app is reloaded, still offline: the outbox
 * survives and the banner still counts 6 changes waiting; after the second stop it counts 12. With the
 * connection back the outbox sends them in order, the count goes, and the API holds each change exactly once
 * per stop (one reading, one finding, one photo, one en-route, on-site and close event, the sign-off: the signer
 * and the stored signature image, or "not available"; the visit closed as resolved).
 * First a conflict: offline, the technician marks the first booked stop en route while the dispatcher unbooks
 * that visit; back online the change is refused, told in words, never sent over the office's change, and
 * discarded; the office then books the work order again as it was.
 * Works the first two stops still booked on the first such day from today; creates no return visit; unbooks one
 * stop and books its work order again as it was. Runs last, after the office journeys (file name 50-…): closing
 * stops of the week the dispatcher journey drags bookings in made its board drag refuse (seen, cause not found).
 */
import assert from 'node:assert/strict';
import { request, type APIRequestContext, type Page } from 'playwright-core';
import type { JourneyContext } from '../harness';
import { phone } from '../harness';
import { addDays, dateInZone } from '../handoff';
import { DEMO_PASSWORD, demo, samplePng, signInThroughForm, keptKeys } from '../support';

export const title = 'Technician works two stops offline';

/** The demo technician works in the Chicago branch (apps/api/src/db/seed/catalogue.ts). */
const BRANCH_ZONE = 'America/Chicago';
const routeHeading = (page: Page) => page.getByRole('heading', { level: 1, name: 'Route' });
const notice = (page: Page, text: string | RegExp) => page.locator('[role="status"], [role="alert"]').filter({ hasText: text }).first();

/** The second stop's on-site contact who signs its close-out (invented for the journey). */
const SIGNER = 'Teodora Vance';

interface VisitDto {
  status: string;
  attachments: { displayName: string }[];
  signature: { kind: string; signerName?: string } | null;
  outcome: string | null;
  readings: { circuitId: string; suctionPressure: number | null }[];
  findings: { causeCode: string; notes: string | null }[];
  events: { state: string }[];
}

/** The first day from `from` with a stop still booked, as the API answers it (not the phone's kept copy). */
async function firstBooked(ctx: JourneyContext, page: Page, from: string): Promise<{ date: string; visitId: string }> {
  let date = from;
  for (let i = 0; i < 14; i++, date = addDays(date, 1)) {
    const day = (await (await page.request.get(`${ctx.base}/api/day?date=${date}`)).json()) as {
      stops: { visitId: string; status: string }[];
    };
    const stop = day.stops.find((s) => s.status === 'booked');
    if (stop) return { date, visitId: stop.visitId };
  }
  throw new Error(`the demo books the technician a stop within two weeks of ${from}`);
}

/**
 * Books as the office does: a booking refused only for rules a dispatcher may book against (409 naming them) is
 * made again overriding those rules with the reason given.
 */
async function bookOverriding(office: APIRequestContext, booking: Record<string, unknown>, reason: string, what: string): Promise<void> {
  let booked = await office.post('/api/bookings', { data: booking });
  if (booked.status() === 409) {
    const rules = ((await booked.json()) as { error: { details?: { rules?: string[] } } }).error.details?.rules;
    assert.ok(rules?.length, `the booking is refused only for a rule that can be overridden (${await booked.text()})`);
    booked = await office.post('/api/bookings', { data: { ...booking, overrideRules: rules, overrideReason: reason } });
  }
  assert.equal(booked.status(), 201, `${what} (${await booked.text()})`);
}

/** The first day from `from` with two stops still booked (the API's answer), and those two in route order; null if none. */
async function firstTwoBooked(ctx: JourneyContext, page: Page, from: string): Promise<{ date: string; visitIds: [string, string] } | null> {
  let date = from;
  for (let i = 0; i < 14; i++, date = addDays(date, 1)) {
    const day = (await (await page.request.get(`${ctx.base}/api/day?date=${date}`)).json()) as {
      stops: { visitId: string; status: string }[];
    };
    const booked = day.stops.filter((s) => s.status === 'booked');
    if (booked.length >= 2) return { date, visitIds: [booked[0]!.visitId, booked[1]!.visitId] };
  }
  return null;
}

/**
 * Two booked stops on one day. The demo books the anchored week only (on a Friday: that day), and the journeys
 * before this one work some of it; when no day has two left, the dispatcher books a second service call after the
 * first booked stop of the first such day, at the same site and unit, as an office would.
 */
async function twoBookedStops(ctx: JourneyContext, page: Page, from: string): Promise<{ date: string; visitIds: [string, string] }> {
  const found = await firstTwoBooked(ctx, page, from);
  if (found) return found;
  const one = await firstBooked(ctx, page, from);
  const day = (await (await page.request.get(`${ctx.base}/api/day?date=${one.date}`)).json()) as {
    tech: { id: string };
    stops: { visitId: string; booking: { endAt: string }; site: { id: string }; units: { id: string }[] }[];
  };
  const stop = day.stops.find((s) => s.visitId === one.visitId)!;
  const office = await request.newContext({ baseURL: ctx.base });
  try {
    const signedIn = await office.post('/api/auth/sign-in', { data: { email: demo.dispatcher, password: DEMO_PASSWORD } });
    assert.equal(signedIn.status(), 200, 'the dispatcher signs in');
    const created = await office.post('/api/work-orders', {
      data: {
        siteId: stop.site.id,
        unitId: stop.units[0]?.id ?? null,
        kind: 'service_call',
        complaint: 'Tenant reports the east zone warm in the afternoon.',
        estimatedMinutes: 60,
      },
    });
    assert.equal(created.status(), 201, `the dispatcher opens a service call (${await created.text()})`);
    const wo = ((await created.json()) as { workOrder: { id: string } }).workOrder;
    const startAt = new Date(Date.parse(stop.booking.endAt) + 30 * 60_000);
    const booking = {
      workOrderId: wo.id,
      techId: day.tech.id,
      startAt: startAt.toISOString(),
      endAt: new Date(startAt.getTime() + 60 * 60_000).toISOString(),
    };
    await bookOverriding(office, booking, 'Second stop of the day, agreed with the technician.', 'the service call is booked');
  } finally {
    await office.dispose();
  }
  const again = await firstTwoBooked(ctx, page, one.date);
  assert.ok(again && again.date === one.date, `the technician has two stops booked on ${one.date}`);
  ctx.step(`the dispatcher booked a second stop on ${one.date} (the demo left one)`);
  return again;
}

/** The natural width of an image once loaded (runs in the page). */
const imageWidth = async (img: HTMLImageElement) => {
  if (!img.complete) await new Promise((r) => img.addEventListener('load', r, { once: true }));
  return img.naturalWidth;
};

/** A stroke drawn with the mouse across the signature pad, until the pad says it is drawn. */
async function drawSignature(page: Page) {
  const pad = page.getByRole('img', { name: 'Signature', exact: true });
  await pad.scrollIntoViewIfNeeded();
  const box = await pad.boundingBox();
  assert.ok(box && box.width > 300, `the pad spans the phone's width (${box?.width} px)`);
  await page.mouse.move(box.x + 20, box.y + box.height * 0.6);
  await page.mouse.down();
  for (let i = 1; i <= 24; i++)
    await page.mouse.move(box.x + 20 + i * ((box.width - 40) / 24), box.y + box.height * (0.5 + 0.3 * Math.sin(i / 2)), { steps: 2 });
  await page.mouse.up();
  await page
    .getByRole('status')
    .filter({ hasText: /^Signature drawn\.$/ })
    .waitFor();
}

/** Opens Route on the date and waits for the stop's card with its "En route" button. */
async function openStop(ctx: JourneyContext, page: Page, date: string, visitId: string) {
  await page.goto(`${ctx.base}/day?date=${date}`);
  await routeHeading(page).waitFor();
  const card = page
    .getByRole('list', { name: 'Stops in route order' })
    .locator(':scope > li')
    .filter({ has: page.locator(`a[href="/visits/${visitId}"]`) });
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
  const stopOf = (visitId: string) => stops.locator(':scope > li').filter({ has: page.locator(`a[href="/visits/${visitId}"]`) });
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
    const refused = page
      .getByRole('list', { name: 'Changes the server did not accept' })
      .getByRole('listitem')
      .filter({ hasText: otherSite });
    await refused.waitFor({ timeout: 30_000 });
    const words = await refused.innerText();
    assert.match(words, /Not sent — the visit changed at the office: En route/, 'the conflict names the change');
    assert.match(
      words,
      /The office moved this visit to another technician or unbooked it while this phone was offline/,
      'the conflict is told in words',
    );
    await page.getByText('1 change not accepted by the server', { exact: false }).first().waitFor();
    await ctx.screen(page, 'route-conflict');
    assert.equal((await office.get(`/api/visits/${otherId}`)).status(), 404, 'the unbooked visit stays unbooked: nothing was sent over it');
    await refused.getByRole('button', { name: 'Discard' }).click();
    await refused.waitFor({ state: 'detached' });
    await notice(page, 'Discarded: En route. It was not saved.').waitFor();
    ctx.step('back online: the conflict is shown in words, not sent over the office’s change, and discarded');

    // The office books the work order again as it was (overriding, with a reason, any rule the demo's booking broke):
    // the stop is booked again, for the rest of this journey and the ones after it.
    const again = {
      workOrderId: otherStop.workOrder.id,
      techId: dayAnswer.tech.id,
      startAt: otherStop.booking.startAt,
      endAt: otherStop.booking.endAt,
      fixed: otherStop.booking.fixed,
    };
    await bookOverriding(office, again, 'Booked again as before after the offline conflict check.', 'the work order is booked again');
  } finally {
    await office.dispose();
  }

  // ── Working offline: the first day from today with two stops still booked, opened online ──
  const { date, visitIds } = await twoBookedStops(ctx, page, today);
  await page.goto(`${ctx.base}/day?date=${date}`);
  await routeHeading(page).waitFor();
  const work: { visitId: string; site: string; before: VisitDto }[] = [];
  for (const visitId of visitIds) {
    const card = stops.locator(':scope > li').filter({ has: page.locator(`a[href="/visits/${visitId}"]`) });
    await card.getByRole('button', { name: 'En route' }).waitFor();
    const site = (await card.getByRole('heading', { level: 2 }).innerText()).replace(/^Stop \d+:\s*/, '').trim();
    const before = (await (await page.request.get(`${ctx.base}/api/visits/${visitId}`)).json()) as VisitDto;
    assert.equal(before.status, 'booked');
    work.push({ visitId, site, before });
  }

  // The phone keeps the route and both visits (Route fetches every stop's visit; written a moment after each answer).
  const kept = (keys: string) => keys.includes(`["day","${date}"]`) && visitIds.every((id) => keys.includes(`["visit","${id}"]`));
  for (let i = 0; !kept(await page.evaluate(keptKeys)); i++) {
    assert.ok(i < 60, `the phone keeps the route of ${date} and the visits at ${work.map((w) => w.site).join(' and ')} (IndexedDB)`);
    await page.waitForTimeout(250);
  }
  ctx.step(`route of ${date} and the visits at ${work.map((w) => w.site).join(' and ')} kept on the phone`);

  // ── No signal: the app reopens from the phone ──
  await page.context().setOffline(true);
  await page.reload();
  await routeHeading(page).waitFor();
  await page.getByText('Offline.', { exact: false }).first().waitFor();
  await page.getByText(/^Kept on this phone, as of (\w{3} \d{1,2} \w{3}, )?\d\d:\d\d\.$/).waitFor();
  ctx.step(`offline: ${await page.getByText(/^Kept on this phone, as of/).innerText()}`);

  const plan = [
    {
      suction: '118',
      cause: 'Sensor fault',
      causeCode: 'sensor_fault',
      notes: 'Suction transducer reads 6 psi high against the reference gauge; recalibrated.',
      photo: 'stop1-transducer.png',
      signer: null,
    },
    {
      suction: '121',
      cause: 'Airflow',
      causeCode: 'airflow',
      notes: 'Condenser coil matted with cottonwood; washed and combed.',
      photo: 'stop2-coil.png',
      signer: SIGNER,
    },
  ] as const;
  for (const [n, w] of work.entries()) {
    const p = plan[n]!;
    const waitingBefore = n * 6;
    if (n > 0) {
      // To Route without signal (the service worker serves the app, the phone the route).
      await page.goto(`${ctx.base}/day?date=${date}`);
      await routeHeading(page).waitFor();
    }
    // The stop by its visit, not its site: a site can have two stops in a day (a return visit beside a booked one).
    const card = stopOf(w.visitId);
    await card.getByRole('button', { name: 'En route' }).click();
    await notice(page, 'Marked en route on this phone; it is sent when the connection is back.').waitFor();
    await card.getByRole('button', { name: 'On site' }).click();
    await notice(page, 'Marked on site on this phone; it is sent when the connection is back.').waitFor();
    await page
      .getByText(`${waitingBefore + 2} changes waiting to send`, { exact: false })
      .first()
      .waitFor();
    if (n === 0) await ctx.screen(page, 'route-offline-waiting');
    await card.getByRole('link', { name: 'Record the visit' }).click();
    await page.getByRole('heading', { level: 1, name: /^Visit · / }).waitFor();

    // A reading on the first circuit (values only recorded: the technician journey checks the computation).
    const suction = page.getByLabel(/^Suction pressure, .*circuit 1 \(psig\)$/).first();
    await suction.fill(p.suction);
    await page
      .getByLabel(/^Suction line temperature, .*circuit 1 \(°F\)$/)
      .first()
      .fill('52');
    await page.getByRole('button', { name: 'Save readings' }).click();
    await notice(page, /^Readings for 1 circuit kept on this phone/).waitFor();
    assert.equal(await suction.inputValue(), p.suction, 'the kept reading shows in the form');

    // A finding.
    await page.getByLabel('Cause code').selectOption({ label: p.cause });
    await page.getByLabel('Origin').selectOption({ label: 'Wear' });
    await page.getByLabel('Notes', { exact: true }).fill(p.notes);
    await page.getByRole('button', { name: 'Add finding' }).click();
    await notice(page, `Finding kept on this phone: ${p.cause}.`).waitFor();
    await page.getByRole('listitem').filter({ hasText: p.cause }).filter({ hasText: 'Waiting to send' }).waitFor();

    // A photo: kept on the phone, its thumbnail drawn from the kept bytes.
    await page.getByLabel('Photo or PDF file').setInputFiles({ name: p.photo, mimeType: 'image/png', buffer: samplePng() });
    await notice(page, `${p.photo} kept on this phone; it is sent when the connection is back.`).waitFor();
    const thumb = page.getByRole('img', { name: `Photo waiting to send: ${p.photo}` });
    await thumb.scrollIntoViewIfNeeded();
    assert.equal(await thumb.evaluate(imageWidth), 16, 'the waiting photo’s thumbnail shows the 16×16 PNG');

    // Close-out: the first stop's customer is not there; at the second the contact signs on the pad.
    await page.getByRole('radio', { name: /^Resolved/ }).check();
    if (p.signer) {
      await page.getByRole('radio', { name: 'Customer signs' }).check();
      await page.getByLabel('Signer’s printed name').fill(p.signer);
      await drawSignature(page);
    } else {
      await page.getByRole('radio', { name: 'Customer not available' }).check();
    }
    await page.getByLabel('Visit notes', { exact: true }).fill(`Stop ${n + 1} worked without signal; unit running within range.`);
    await page.getByRole('button', { name: 'Close visit' }).click();
    await notice(page, 'Visit closed on this phone; the close-out is sent when the connection is back.').waitFor();
    await page.getByText(/The close-out is kept on this phone and waits to send/).waitFor();
    await page
      .getByText(`${waitingBefore + 6} changes waiting to send`, { exact: false })
      .first()
      .waitFor();
    if (p.signer)
      assert.match(
        await page.locator('#close-out').innerText(),
        new RegExp(`Signed by ${p.signer}, `),
        'the waiting close-out shows the signature',
      );
    ctx.step(
      `offline at ${w.site}: en route, on site, a reading, a finding, a photo and the close-out (${p.signer ? `signed by ${p.signer}` : 'customer not available'}); ${waitingBefore + 6} changes waiting`,
    );

    if (n === 0) {
      // The app reloaded while still offline: the outbox is kept on the phone, the count stays, the photo waits.
      await page.reload();
      await page.getByRole('heading', { level: 1, name: /^Visit · / }).waitFor();
      await page.getByText('Offline.', { exact: false }).first().waitFor();
      await page.getByText('6 changes waiting to send', { exact: false }).first().waitFor();
      await page.getByText(/The close-out is kept on this phone and waits to send/).waitFor();
      const kept = page.getByRole('img', { name: `Photo waiting to send: ${p.photo}` });
      await kept.scrollIntoViewIfNeeded();
      assert.equal(await kept.evaluate(imageWidth), 16, 'after the reload the waiting photo still shows from the phone');
      await ctx.screen(page, 'visit-offline-reloaded');
      ctx.step('reloaded offline: still 6 changes waiting, the close-out and the photo kept on the phone');
    }
  }
  await ctx.screen(page, 'visit-offline-closed');

  // ── The connection is back: everything arrives, in order, once ──
  await page.context().setOffline(false);
  await page
    .getByText(/changes? waiting to send/)
    .first()
    .waitFor({ state: 'detached', timeout: 60_000 });
  await page
    .getByText(/Service summary \(with PDF\) sent to \S+@\S+\.|Service summary not sent/)
    .first()
    .waitFor({ timeout: 30_000 });
  assert.match(await page.locator('#close-out').innerText(), /Closed .* as Resolved/, 'the close-out shows the server’s close');
  ctx.step('back online: the outbox emptied; the close-out shows the server’s answer');

  for (const [n, w] of work.entries()) {
    const p = plan[n]!;
    const after = (await (await page.request.get(`${ctx.base}/api/visits/${w.visitId}`)).json()) as VisitDto;
    assert.equal(after.status, 'closed', `${w.site} is closed`);
    assert.equal(after.outcome, 'resolved');
    assert.equal(
      after.readings.filter((r) => r.suctionPressure === Number(p.suction)).length,
      1,
      `one reading of ${p.suction} psig arrived at ${w.site} (${after.readings.length} in all)`,
    );
    assert.ok(after.readings.length - w.before.readings.length <= 1, 'no reading was doubled');
    assert.equal(
      after.findings.filter((f) => f.causeCode === p.causeCode && f.notes === p.notes).length,
      1,
      `one finding arrived at ${w.site}`,
    );
    assert.equal(after.findings.length, w.before.findings.length + 1, 'no finding was doubled');
    assert.equal(after.attachments.length, w.before.attachments.length + 1, `one photo arrived at ${w.site}`);
    assert.equal(
      after.attachments.filter((a) => a.displayName.includes(p.photo.replace(/\.png$/, ''))).length,
      1,
      `the photo ${p.photo} arrived once`,
    );
    assert.equal(after.events.filter((e) => e.state === 'en_route').length, 1, 'en route recorded once');
    assert.equal(after.events.filter((e) => e.state === 'on_site').length, 1, 'on site recorded once');
    assert.equal(after.events.filter((e) => e.state === 'closed').length, 1, 'closed once');
    if (p.signer) {
      assert.equal(after.signature?.kind, 'signed');
      assert.equal(after.signature?.signerName, p.signer);
      const img = await page.request.get(`${ctx.base}/api/visits/${w.visitId}/signature`);
      assert.equal(img.status(), 200, 'the signature image is stored');
      assert.match(img.headers()['content-type'] ?? '', /^image\/png/);
    } else {
      assert.equal(after.signature?.kind, 'customer_not_available');
    }
  }
  ctx.step(
    'the API holds, per stop, one reading, one finding, one photo, one en-route, on-site and close event, the sign-off; both closed as resolved',
  );

  // On Route both stops show closed, from the server.
  await page.goto(`${ctx.base}/day?date=${date}`);
  await routeHeading(page).waitFor();
  for (const w of work) await stopOf(w.visitId).getByText('Closed: Resolved').waitFor();
  ctx.step(`Route shows ${work.map((w) => w.site).join(' and ')} closed: resolved`);

  ctx.expectNoConsoleErrors();
}
