/**
 * Every kind of message Coilpath sends, written to MIME by nodemailer (stream transport) and read
 * back with mailparser: a plain-text part and an HTML part with the same content, the HTML simple
 * (inline styles, no images, no scripts), times in the branch's zone, `Auto-Submitted` on digests.
 */
import nodemailer from 'nodemailer';
import request from 'supertest';
import { simpleParser, type ParsedMail } from 'mailparser';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, signedInAgent, type TestApp } from '../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD, weekdayHours } from '../testing/fixtures';
import { leakCases, sites, users } from '../db/schema';
import { makeBookedVisit, NOT_AVAILABLE } from '../modules/visits/visits.fixtures';
import { runDigest } from '../modules/watchlist/watchlist.jobs';
import { createTransportMailer, type Mailer } from './mailer';

/** The app's mailer over a stream transport: each message as RFC 5322 bytes, as an SMTP server would receive it. */
function mimeMailer(): Mailer & { raw: Buffer[] } {
  const raw: Buffer[] = [];
  const transport = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'windows' });
  const sendMail = transport.sendMail.bind(transport);
  transport.sendMail = (async (m: Parameters<typeof sendMail>[0]) => {
    const info = await sendMail(m);
    raw.push(info.message as Buffer);
    return info;
  }) as typeof transport.sendMail;
  return Object.assign(createTransportMailer(transport, 'Coilpath <no-reply@coilpath.example>'), { raw });
}

// 07:05 in Chicago (CST, UTC−6) on Tuesday 15 December 2026: the digest hour has come.
const NOW = '2026-12-15T13:05:00Z';
const polish = 'Łukasz Żółć';
const vietnamese = 'Nguyễn Thị Hương';

let t: TestApp;
let mailer: ReturnType<typeof mimeMailer>;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;

beforeAll(async () => {
  mailer = mimeMailer();
  t = await createTestApp({ now: NOW, mailer });
  f = await makeTwoBranches(t.ctx.db);
});
afterAll(() => t?.close());

/** The last message sent, parsed from its bytes. */
async function lastParsed(): Promise<{ mail: ParsedMail; raw: string }> {
  const raw = mailer.raw.at(-1)!;
  return { mail: await simpleParser(raw), raw: raw.toString('latin1') };
}

/** The HTML part's words, tags dropped and entities read, white space collapsed. */
const htmlWords = (html: string) =>
  html
    .replace(/<head>[\s\S]*?<\/head>/, '')
    .replace(/<[^>]+>/g, ' ')
    .replace(/&amp;/g, '&')
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&#39;/g, "'")
    .replace(/\s+/g, ' ');

/** Both parts there, multipart/alternative, the HTML plain and carrying every line of the text. */
function expectBothParts(mail: ParsedMail, raw: string) {
  expect(raw).toMatch(/Content-Type: multipart\/alternative/i);
  expect(raw).toMatch(/Content-Type: text\/plain; charset=utf-8/i);
  expect(raw).toMatch(/Content-Type: text\/html; charset=utf-8/i);
  expect(mail.messageId).toMatch(/^<.+@.+>$/);
  expect(typeof mail.text).toBe('string');
  expect(typeof mail.html).toBe('string');
  const html = mail.html as string;
  expect(html).not.toMatch(/<img|<script|<link|<style|src=|url\(/i);
  expect(html).toMatch(/style="/);
  // The HTML shows "Key: value" facts as a two-column table (no colon): compare without colons.
  const words = htmlWords(html).replace(/:/g, '');
  for (const line of mail
    .text!.split('\n')
    .map((l) => l.replace(/^- /, '').trim())
    .filter(Boolean)) {
    expect(words, `HTML part lacks: ${line}`).toContain(line.replace(/:/g, '').replace(/\s+/g, ' '));
  }
}

describe('e-mail messages', () => {
  it('invitation: both parts, the expiry in the branch zone', async () => {
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    const res = await owner.post('/api/invitations').send({
      email: 'new.tech@test.example',
      profile: {
        name: polish,
        role: 'technician',
        branchId: f.a.id,
        skills: [],
        epa608Type: 'universal',
        epa608Number: 'EPA-1',
        workingHours: weekdayHours,
        startAddress: '1 Home St',
        startLat: 41.9,
        startLon: -87.6,
      },
    });
    expect(res.status).toBe(201);
    const { mail, raw } = await lastParsed();
    expectBothParts(mail, raw);
    expect(mail.subject).toContain('invited you to Coilpath');
    expect(mail.text).toContain(`Hello ${polish},`);
    // 72 hours after 07:05 CST on the 15th, read in Chicago.
    expect(mail.text).toContain('expires on Fri 18 Dec 2026, 07:05 CST');
    expect(mail.headers.get('auto-submitted')).toBeUndefined();
    expect(mail.html as string).toMatch(/<a href="http:\/\/coilpath\.test\/accept-invitation\?token=/);
  });

  it('password reset: both parts, the expiry in the person’s branch zone (Phoenix)', async () => {
    await t.ctx.db.update(users).set({ name: vietnamese }).where(eq(users.id, f.inB.manager.id));
    expect((await request(t.app).post('/api/auth/forgot-password').send({ email: f.inB.manager.email })).status).toBe(202);
    // The reset mail is sent by a job after the answer (the same answer whether or not the account exists).
    await t.ctx.jobs.idle();
    const { mail, raw } = await lastParsed();
    expectBothParts(mail, raw);
    expect(mail.text).toContain(`Hello ${vietnamese},`);
    // 60 minutes after 13:05 UTC is 07:05 in Phoenix (MST all year).
    expect(mail.text).toContain('at Tue 15 Dec 2026, 07:05 MST');
  });

  it('service summary: both parts and the PDF, arrival and close in the branch zone, names as written', async () => {
    const p = await makeSiteWithUnit(t.ctx.db, f.a.id);
    await t.ctx.db
      .update(sites)
      .set({ name: `${vietnamese} Bakery` })
      .where(eq(sites.id, p.site.id));
    await t.ctx.db.update(users).set({ name: polish }).where(eq(users.id, f.inA.technician.id));
    const { visit } = await makeBookedVisit(t.ctx.db, {
      branchId: f.a.id,
      siteId: p.site.id,
      unitId: p.unit.id,
      techId: f.inA.technician.id,
      startAt: '2026-12-15T12:30:00Z',
    });
    const tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
    expect((await tech.patch(`/api/visits/${visit.id}`).send({ state: 'on_site' })).status).toBe(200);
    const closed = await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' });
    expect(closed.body.summary).toMatchObject({ sent: true });
    const { mail, raw } = await lastParsed();
    expectBothParts(mail, raw);
    expect(mail.subject).toMatch(new RegExp(`^Service summary WO-\\d+ - ${vietnamese} Bakery$`));
    expect(mail.text).toContain(`Technician: ${polish}`);
    expect(mail.text).toContain('Closed: Tue 15 Dec 2026, 07:05 CST');
    expect(mail.attachments.map((a) => a.contentType)).toEqual(['application/pdf']);
    expect(mail.headers.get('auto-submitted')).toBeUndefined();
  });

  it('digest: both parts, Auto-Submitted: auto-generated, prepared time in the branch zone', async () => {
    const p = await makeSiteWithUnit(t.ctx.db, f.a.id);
    await t.ctx.db.insert(leakCases).values({
      branchId: f.a.id,
      unitId: p.unit.id,
      openedOn: '2026-11-20',
      rule: '40 CFR 84.106',
      method: 'annualizing',
      thresholdPercent: 10,
      leakRatePercent: 36.5,
      repairDueDate: '2026-12-20',
    });
    const before = mailer.raw.length;
    const runs = await runDigest(t.ctx);
    expect(runs.find((r) => r.branchId === f.a.id)?.status).toBe('sent');
    expect(mailer.raw.length).toBe(before + 1);
    const { mail, raw } = await lastParsed();
    expectBothParts(mail, raw);
    expect(raw).toMatch(/^Auto-Submitted: auto-generated\r$/m);
    expect(mail.headers.get('auto-submitted')).toBe('auto-generated');
    expect(mail.text).toContain('Prepared Tue 15 Dec 2026, 07:05 CST');
    expect(mail.text).toContain('repair due in 5 days (Sun 20 Dec 2026)');
  });
});
