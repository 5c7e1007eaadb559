/**
 * The customer's service summary: only notes marked for the customer, the findings in plain words, the readings,
 * refrigerant added and the open leak case with its repair deadline reach it — never an internal note, a
 * reading's working note or what a return visit needs — and it speaks for the contractor (trading name, office
 * address, phone, licence number; the technician's name and EPA 608 number), with Reply-To the branch's office.
 * The message is written to MIME by nodemailer and read back with mailparser; the PDF with pdfjs-dist.
 */
import nodemailer from 'nodemailer';
import { simpleParser, type ParsedMail } from 'mailparser';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { readPdf } from '../../testing/pdf-text';
import { circuits, leakCases, users } from '../../db/schema';
import { createTransportMailer, type Mailer } from '../../mail/mailer';
import { makeBookedVisit, NOT_AVAILABLE } from './visits.fixtures';

const PSIG_F = { pressure: 'psig', temperature: 'F' } as const;

/** The app's mailer over a stream transport: each message as the bytes an SMTP server would receive. */
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

const INTERNAL = {
  visit: 'Staffing: send two techs next time, the roof hatch is heavy',
  finding: 'Warranty claim: compressor still under the factory warranty',
  reading: 'Gauge set 3 needs calibration',
  returnNotes: 'Order the contactor from the distributor',
};
const CUSTOMER = { finding: 'We cleaned the condenser coil; keep the area around the unit clear.' };

let t: TestApp;
let mailer: ReturnType<typeof mimeMailer>;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;

beforeAll(async () => {
  mailer = mimeMailer();
  t = await createTestApp({ now: '2026-03-10T15:00:00Z', mailer });
  f = await makeTwoBranches(t.ctx.db);
});
afterAll(() => t?.close());

async function closeWithEverything(notesAudience: 'internal' | 'customer') {
  const p = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { fullChargeLb: 100 } });
  const [c1] = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, p.unit.id)).orderBy(circuits.number);
  await t.ctx.db.insert(leakCases).values({
    branchId: f.a.id,
    unitId: p.unit.id,
    openedOn: '2026-03-02',
    rule: '40 CFR 82.157',
    method: 'annualizing',
    thresholdPercent: 10,
    leakRatePercent: 23.4,
    repairDueDate: '2026-04-01',
  });
  const { visit } = await makeBookedVisit(t.ctx.db, {
    branchId: f.a.id,
    siteId: p.site.id,
    unitId: p.unit.id,
    techId: f.inA.technician.id,
    startAt: '2026-03-10T14:00:00Z',
    onSite: true,
  });
  const tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
  expect(
    (
      await tech
        .post(`/api/visits/${visit.id}/readings`)
        .send({ units: PSIG_F, readings: [{ circuitId: c1!.id, suctionPressure: 111.5, suctionLineTemp: 48.7, notes: INTERNAL.reading }] })
    ).status,
  ).toBe(200);
  const a = await tech
    .post(`/api/visits/${visit.id}/findings`)
    .send({ causeCode: 'component_failure', origin: 'factory_defect', notes: INTERNAL.finding });
  expect(a.status).toBe(201);
  expect(a.body.finding.notesAudience).toBe('internal'); // the default
  const b = await tech
    .post(`/api/visits/${visit.id}/findings`)
    .send({ causeCode: 'airflow', origin: 'wear', notes: CUSTOMER.finding, notesAudience: 'customer' });
  expect(b.status).toBe(201);
  expect(
    (
      await tech
        .post(`/api/units/${p.unit.id}/refrigerant-events`)
        .send({ visitId: visit.id, refrigerant: 'R-410A', poundsAdded: 3.5, reason: 'leak_top_off' })
    ).status,
  ).toBe(201);
  const notes = notesAudience === 'customer' ? 'Your unit is running normally again.' : INTERNAL.visit;
  mailer.raw.length = 0;
  const res = await tech.post(`/api/visits/${visit.id}/close`).send({
    signature: NOT_AVAILABLE,
    outcome: 'needs_return',
    returnNeeds: ['parts'],
    returnNotes: INTERNAL.returnNotes,
    notes,
    notesAudience,
    rootCauseFindingId: a.body.finding.id,
  });
  expect(res.status).toBe(200);
  expect(res.body.summary.sent).toBe(true);
  expect(mailer.raw).toHaveLength(1);
  const mail: ParsedMail = await simpleParser(mailer.raw[0]!);
  const pdf = await readPdf(mail.attachments[0]!.content);
  return { mail, pdf, notes };
}

/** The HTML part's words, tags dropped and entities read. */
const htmlWords = (html: string) =>
  html
    .replace(/<[^>]+>/g, ' ')
    .replace(/&amp;/g, '&')
    .replace(/&#39;/g, "'")
    .replace(/&quot;/g, '"')
    .replace(/\s+/g, ' ');

describe('the service summary', () => {
  it('carries no internal note in the text, the HTML or the PDF, and does carry what is the customer’s', async () => {
    const { mail, pdf } = await closeWithEverything('internal');
    const parts = { text: mail.text!.replace(/\s+/g, ' '), html: htmlWords(mail.html as string), pdf: pdf.flat };
    for (const [part, words] of Object.entries(parts)) {
      for (const secret of Object.values(INTERNAL)) expect(words, `${part} leaks “${secret}”`).not.toContain(secret);
      expect(words, part).not.toMatch(/Parts|What is needed/); // the return visit's needs are the office's
      expect(words, part).toContain(CUSTOMER.finding);
      expect(words, part).toContain('Component failure (origin: Factory defect)');
      expect(words, part).toMatch(/superheat 11\.8 °F/);
      expect(words, part).toContain('added 3.5 lb');
      // The open leak case and its repair deadline (23.4 % a year over the 10 % limit; due 1 April 2026).
      expect(words, part).toContain('a leak rate of 23.4 % a year is above the 10 % limit');
      expect(words, part).toContain('The repair is due by Wed 1 Apr 2026');
      expect(words, part).toContain('A return visit is needed.');
    }
  });

  it('carries the technician’s notes when they are marked for the customer', async () => {
    const { mail, pdf, notes } = await closeWithEverything('customer');
    expect(mail.text).toContain(`Technician's notes: ${notes}`);
    expect(pdf.flat).toContain(notes);
  });

  it('speaks for the contractor: trading name, office, phone, licence, the technician’s EPA 608 number; Reply-To the office', async () => {
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    const details = {
      tradingName: 'Żółć & Nguyễn Cooling',
      officeAddress: '12 Lakeview Ave, Springfield IL 62701',
      officePhone: '+1 217 555 0142',
      licenceNumber: 'IL-HVAC-004217',
      officeEmail: 'Office@Cooling.example',
    };
    const patched = await owner.patch(`/api/branches/${f.a.id}`).send(details);
    expect(patched.status).toBe(200);
    expect(patched.body).toMatchObject({ ...details, officeEmail: 'office@cooling.example' });
    // A partial change leaves the contractor's details as they are.
    expect((await owner.patch(`/api/branches/${f.a.id}`).send({ callbackWindowDays: 30 })).body).toMatchObject({
      tradingName: details.tradingName,
    });
    expect((await owner.patch(`/api/branches/${f.a.id}`).send({ officeEmail: 'not an address' })).status).toBe(400);
    await t.ctx.db.update(users).set({ epa608Number: 'EPA-608-77310' }).where(eq(users.id, f.inA.technician.id));

    const { mail, pdf } = await closeWithEverything('internal');
    expect(mail.replyTo?.value.map((a) => a.address)).toEqual(['office@cooling.example']);
    expect(mail.from?.value[0]?.address).toBe('no-reply@coilpath.example');
    for (const words of [mail.text!.replace(/\s+/g, ' '), htmlWords(mail.html as string), pdf.flat]) {
      expect(words).toContain(details.tradingName);
      expect(words).toContain(details.officeAddress);
      expect(words).toContain(`Phone ${details.officePhone}`);
      expect(words).toContain(`Licence ${details.licenceNumber}`);
      expect(words).toContain(`${f.inA.technician.name} (EPA 608 certification EPA-608-77310)`);
    }
  });
});
