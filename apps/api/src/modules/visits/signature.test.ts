/**
 * The customer's sign-off at close-out: the on-site contact signs on the technician's phone (a PNG and a printed
 * name) or the technician records "customer not available"; one of the two is required. The signature is stored
 * with the close, shown on the closed visit, drawn into the customer's PDF with the signer's name and the time in
 * the branch's zone; a bad image or a missing name is refused and changes nothing; a resent close-out changes
 * nothing either. The test images are written by pngjs (a general-purpose PNG encoder), the PDF is read back with
 * pdfjs-dist.
 */
import { PNG } from 'pngjs';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { pdfImageCount, readPdf } from '../../testing/pdf-text';
import { visitSignatures, visits, workOrders } from '../../db/schema';
import { makeBookedVisit, NOT_AVAILABLE } from './visits.fixtures';

/**
 * A signature-like PNG written by pngjs: `width` × `height`, transparent, with a dark stroke (a sine wave)
 * drawn across, as a signature pad exports it.
 */
function signaturePng(width = 600, height = 200): Buffer {
  const png = new PNG({ width, height });
  for (let x = 0; x < width; x++) {
    const yc = Math.round(height / 2 + (height / 3) * Math.sin((x / width) * 4 * Math.PI));
    for (let y = yc - 2; y <= yc + 2; y++) {
      if (y < 0 || y >= height) continue;
      const i = (y * width + x) * 4;
      png.data[i] = 0x17;
      png.data[i + 1] = 0x21;
      png.data[i + 2] = 0x2b;
      png.data[i + 3] = 0xff;
    }
  }
  return PNG.sync.write(png);
}

/** A name with Polish and Vietnamese letters: it must print as written (Roboto Flex is embedded). */
const SIGNER = 'Łucja Nguyễn-Whitfield';
/**
 * The app's clock, and the branch's zone (America/Chicago). US daylight time began on Sunday 8 March 2026
 * (second Sunday of March, Energy Policy Act of 2005 §110), so 15:00 UTC on 10 March is 10:00 CDT (UTC−5).
 */
const NOW = '2026-03-10T15:00:00Z';
const NOW_IN_CHICAGO = 'Tue 10 Mar 2026, 10:00 CDT';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let tech: Awaited<ReturnType<typeof signedInAgent>>;

beforeAll(async () => {
  t = await createTestApp({ now: NOW });
  f = await makeTwoBranches(t.ctx.db);
  tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
});
afterAll(() => t?.close());

/** A visit on site since 14:00 UTC (09:00 CDT) at a site with a contact e-mail. */
async function visitOnSite() {
  const p = await makeSiteWithUnit(t.ctx.db, f.a.id);
  const { visit } = await makeBookedVisit(t.ctx.db, {
    branchId: f.a.id,
    siteId: p.site.id,
    unitId: p.unit.id,
    techId: f.inA.technician.id,
    startAt: '2026-03-10T14:00:00Z',
    onSite: true,
  });
  return { visit, site: p.site };
}

const mailTo = (to: string | null) => t.mailer.sent.filter((m) => m.to === to);

async function nothingChanged(visitId: string, workOrderId: string) {
  const [v] = await t.ctx.db.select().from(visits).where(eq(visits.id, visitId));
  expect(v!.closedAt).toBeNull();
  expect(v!.outcome).toBeNull();
  const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, workOrderId));
  expect(wo!.state).not.toBe('closed');
  expect(await t.ctx.db.select().from(visitSignatures).where(eq(visitSignatures.visitId, visitId))).toHaveLength(0);
}

describe('POST /api/visits/:id/close — the customer’s sign-off', () => {
  it('stores a signed close-out, shows it on the visit, serves the image and draws it into the customer’s PDF', async () => {
    const { visit, site } = await visitOnSite();
    const png = signaturePng();
    const res = await tech
      .post(`/api/visits/${visit.id}/close`)
      .send({ outcome: 'resolved', signature: { kind: 'signed', signerName: `  ${SIGNER} `, imagePng: png.toString('base64') } });
    expect(res.status).toBe(200);
    // No time from the phone: signed when the close-out arrived (the server's clock).
    expect(res.body.visit.signature).toEqual({
      kind: 'signed',
      signerName: SIGNER,
      signedAt: new Date(NOW).toISOString(),
      imageUrl: `/api/visits/${visit.id}/signature`,
    });

    // The image, byte for byte, to the technician and to the office (owner); not to another branch's manager.
    const img = await tech.get(`/api/visits/${visit.id}/signature`).buffer(true);
    expect(img.status).toBe(200);
    expect(img.headers['content-type']).toBe('image/png');
    expect(img.headers['x-content-type-options']).toBe('nosniff');
    expect(Buffer.compare(img.body as Buffer, png)).toBe(0);
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    expect((await owner.get(`/api/visits/${visit.id}`)).body.signature).toMatchObject({ kind: 'signed', signerName: SIGNER });
    expect((await owner.get(`/api/visits/${visit.id}/signature`)).status).toBe(200);
    const otherManager = await signedInAgent(t.app, f.inB.manager.email, TEST_PASSWORD);
    expect((await otherManager.get(`/api/visits/${visit.id}/signature`)).status).toBe(404);

    // The summary: the signer's name and the time in the branch's zone, in the text and in the PDF, and the image.
    const [m] = mailTo(site.contactEmail);
    expect(m!.text).toContain(`Signed by ${SIGNER}`);
    expect(m!.text).toContain(`Signed ${NOW_IN_CHICAGO}`);
    const pdfBytes = m!.attachments![0]!.content as Buffer;
    const pdf = await readPdf(pdfBytes);
    expect(pdf.flat).toContain('Customer sign-off');
    expect(pdf.flat).toContain(`Signed by ${SIGNER}`);
    expect(pdf.flat).toContain(`Signed ${NOW_IN_CHICAGO}`);
    expect(pdf.flat).not.toContain('Customer not available');
    expect(pdf.contentRoles).toContain('Figure');
    expect(await pdfImageCount(pdfBytes)).toBe(1);
  });

  it('records “customer not available”: no image, the PDF says so', async () => {
    const { visit, site } = await visitOnSite();
    const res = await tech.post(`/api/visits/${visit.id}/close`).send({ outcome: 'resolved', signature: NOT_AVAILABLE });
    expect(res.status).toBe(200);
    expect(res.body.visit.signature).toEqual({ kind: 'customer_not_available', recordedAt: new Date(NOW).toISOString() });
    expect((await tech.get(`/api/visits/${visit.id}/signature`)).status).toBe(404);
    const [m] = mailTo(site.contactEmail);
    const pdfBytes = m!.attachments![0]!.content as Buffer;
    expect((await readPdf(pdfBytes)).flat).toContain('Customer not available to sign');
    expect(await pdfImageCount(pdfBytes)).toBe(0);
  });

  it('keeps the phone’s signing time when it lies between arriving on site and now, else uses the server’s', async () => {
    const a = await visitOnSite();
    const r1 = await tech.post(`/api/visits/${a.visit.id}/close`).send({
      outcome: 'resolved',
      signature: { kind: 'signed', signerName: 'Dana', imagePng: signaturePng().toString('base64'), signedAt: '2026-03-10T14:30:00Z' },
    });
    expect(r1.body.visit.signature.signedAt).toBe('2026-03-10T14:30:00.000Z');
    // 09:30 CDT (UTC−5, see NOW_IN_CHICAGO).
    expect(mailTo(a.site.contactEmail)[0]!.text).toContain('Signed Tue 10 Mar 2026, 09:30 CDT');
    for (const claimed of ['2026-03-10T16:00:00Z' /* after now */, '2026-03-10T13:00:00Z' /* before on site */]) {
      const b = await visitOnSite();
      const r = await tech.post(`/api/visits/${b.visit.id}/close`).send({
        outcome: 'resolved',
        signature: { kind: 'signed', signerName: 'Dana', imagePng: signaturePng().toString('base64'), signedAt: claimed },
      });
      expect(r.body.visit.signature.signedAt).toBe(new Date(NOW).toISOString());
    }
  });

  it('requires a choice (422 signature_required) and changes nothing without one', async () => {
    const { visit, site } = await visitOnSite();
    const res = await tech.post(`/api/visits/${visit.id}/close`).send({ outcome: 'resolved' });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('signature_required');
    expect(res.body.error.message).toMatch(/Customer not available/);
    await nothingChanged(visit.id, visit.workOrderId);
    expect(mailTo(site.contactEmail)).toHaveLength(0);
  });

  it('refuses (400) a missing name or a bad image with a clear message, and changes nothing', async () => {
    const { visit, site } = await visitOnSite();
    const good = signaturePng();
    const damaged = Buffer.from(good);
    damaged[damaged.length - 20] = damaged[damaged.length - 20]! ^ 0xff; // inside the IDAT data: its CRC no longer matches
    const hugeHeader = Buffer.from(good);
    hugeHeader.writeUInt32BE(20_000, 16); // IHDR width: a small file claiming a 20,000-pixel-wide image
    const big = signaturePng(1500, 1000); // a large canvas: a drawing compresses well under the limit
    const over = Buffer.concat([good, Buffer.alloc(210 * 1024)]); // 200 KB limit exceeded
    const jpegish = Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0, 16, 0x4a, 0x46, 0x49, 0x46, 0]);
    const cases: [string, unknown, number, RegExp][] = [
      ['no name', { kind: 'signed', imagePng: good.toString('base64') }, 400, /signature\.signerName/],
      ['a blank name', { kind: 'signed', signerName: '   ', imagePng: good.toString('base64') }, 400, /name of the person signing/],
      ['no image', { kind: 'signed', signerName: SIGNER }, 400, /signature\.imagePng/],
      ['not base64', { kind: 'signed', signerName: SIGNER, imagePng: 'iVBORw0KGgo not base64!' }, 400, /base64/],
      ['a JPEG', { kind: 'signed', signerName: SIGNER, imagePng: jpegish.toString('base64') }, 400, /must be a PNG/],
      ['over 200 KB', { kind: 'signed', signerName: SIGNER, imagePng: over.toString('base64') }, 400, /larger than 200 KB/],
      ['a damaged PNG', { kind: 'signed', signerName: SIGNER, imagePng: damaged.toString('base64') }, 400, /does not decode as a PNG/],
      [
        'a huge image',
        { kind: 'signed', signerName: SIGNER, imagePng: hugeHeader.toString('base64') },
        400,
        /at most 3000 × 1500 pixels; this one is 20000 × 200/,
      ],
      ['an unknown choice', { kind: 'maybe' }, 400, /signature/],
      ['both at once', { kind: 'customer_not_available', signerName: SIGNER }, 400, /signature/],
    ];
    expect(big.length).toBeLessThan(200 * 1024); // a large but plain drawing is well under the limit
    for (const [what, signature, status, message] of cases) {
      const res = await tech.post(`/api/visits/${visit.id}/close`).send({ outcome: 'resolved', signature });
      expect(res.status, what).toBe(status);
      expect(JSON.stringify(res.body.error), what).toMatch(message);
    }
    await nothingChanged(visit.id, visit.workOrderId);
    expect(mailTo(site.contactEmail)).toHaveLength(0);
  });

  it('answers a resent close-out 409 visit_closed and keeps the first sign-off (the outbox counts that as sent)', async () => {
    const { visit, site } = await visitOnSite();
    const body = { outcome: 'resolved', signature: { kind: 'signed', signerName: SIGNER, imagePng: signaturePng().toString('base64') } };
    expect((await tech.post(`/api/visits/${visit.id}/close`).send(body)).status).toBe(200);
    const [before] = await t.ctx.db.select().from(visitSignatures).where(eq(visitSignatures.visitId, visit.id));
    const again = await tech
      .post(`/api/visits/${visit.id}/close`)
      .send({ ...body, signature: { ...body.signature, signerName: 'Someone Else' } });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('visit_closed');
    const after = await t.ctx.db.select().from(visitSignatures).where(eq(visitSignatures.visitId, visit.id));
    expect(after).toHaveLength(1);
    expect(after[0]!.signerName).toBe(SIGNER);
    expect(Buffer.compare(after[0]!.imagePng!, before!.imagePng!)).toBe(0);
    expect(mailTo(site.contactEmail)).toHaveLength(1);
  });
});
