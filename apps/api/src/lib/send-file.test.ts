/**
 * Stored files as the routes send them: PDFs and anything but a raster image as downloads (`attachment`), photos
 * inline, the name as `filename*=UTF-8''…` (RFC 6266, RFC 8187), never sniffed (`X-Content-Type-Options: nosniff`).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { attachments, mailOutbox, visits } from '../db/schema';
import { createTestApp, signedInAgent, type TestApp } from '../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder, TEST_PASSWORD } from '../testing/fixtures';
import { contentDisposition, shownInline } from './send-file';

/** The `filename*` value of a header, decoded (RFC 8187 §3.2.1: charset, empty language, percent-encoded UTF-8). */
const extFilename = (header: string) => {
  const m = /filename\*=UTF-8''([^;\s]+)/.exec(header);
  return m ? decodeURIComponent(m[1]!) : null;
};

describe('contentDisposition', () => {
  it('writes the RFC 6266 §5 example name "€ rates" as filename*=UTF-8\'\'%E2%82%AC%20rates, with an ASCII fallback', () => {
    // RFC 6266 §5: `attachment; filename*= UTF-8''%e2%82%ac%20rates` (hex digits in either case, RFC 3986 §2.1).
    const h = contentDisposition('attachment', '€ rates');
    expect(h).toBe(`attachment; filename="_ rates"; filename*=UTF-8''%E2%82%AC%20rates`);
  });

  it('percent-encodes what RFC 8187 attr-char leaves out (quote, parentheses, star) and keeps the exact name', () => {
    const name = `Schéma d'unité (RTU-3) *final*.pdf`;
    const h = contentDisposition('attachment', name);
    expect(extFilename(h)).toBe(name);
    const ext = /filename\*=UTF-8''(\S+)$/.exec(h)![1]!;
    // attr-char (RFC 8187 §3.2.1): ALPHA DIGIT ! # $ & + - . ^ _ ` | ~ ; all else as %XX.
    expect(ext).toMatch(/^(?:[A-Za-z0-9!#$&+\-.^_`|~]|%[0-9A-F]{2})+$/);
    expect(h).toContain(`filename="Schema d'unite (RTU-3) *final*.pdf"`);
  });

  it('cannot be broken out of: quotes, backslashes, CR and LF never reach the header as such', () => {
    const h = contentDisposition('attachment', 'a"b\\c\r\nSet-Cookie: x=1.pdf');
    expect(h).not.toMatch(/[\r\n]/);
    expect(h).toContain('filename="a_b_cSet-Cookie: x=1.pdf"');
    expect(extFilename(h)).toBe('a"b\\cSet-Cookie: x=1.pdf');
    expect(contentDisposition('inline', '\r\n')).toBe(`inline; filename="file"; filename*=UTF-8''file`);
  });

  it('shows raster images inline and nothing else', () => {
    for (const t of ['image/jpeg', 'image/png', 'image/webp', 'IMAGE/PNG; charset=binary']) expect(shownInline(t), t).toBe(true);
    for (const t of ['application/pdf', 'image/svg+xml', 'text/html', 'application/octet-stream']) expect(shownInline(t), t).toBe(false);
  });
});

describe('the routes that send stored files', () => {
  const png = Buffer.from('89504e470d0a1a0a0000000d4948445200000001000000010806000000', 'hex');
  const pdf = Buffer.from('%PDF-1.4\n%coilpath test\n');
  let t: TestApp;
  let owner: Awaited<ReturnType<typeof signedInAgent>>;
  let unitId: string;
  let photoId: string;
  let documentId: string;
  let outboxId: string;

  beforeAll(async () => {
    t = await createTestApp();
    const f = await makeTwoBranches(t.ctx.db);
    const { site, unit } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    unitId = unit.id;
    const wo = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: site.id, unitId: unit.id });
    const [v] = await t.ctx.db.insert(visits).values({ branchId: f.a.id, workOrderId: wo.id, techId: f.inA.technician.id }).returning();
    const row = async (kind: 'photo' | 'document', content: Buffer, contentType: string, displayName: string) => {
      const storageKey = await t.storage.put(content, { contentType });
      const [a] = await t.ctx.db
        .insert(attachments)
        .values({ visitId: v!.id, unitId, kind, storageKey, displayName, contentType, sizeBytes: content.length })
        .returning();
      return a!.id;
    };
    photoId = await row('photo', png, 'image/png', 'Condenser coil.png');
    documentId = await row('document', pdf, 'application/pdf', 'Démarrage RTU-3 (rapport).pdf');
    const pdfKey = await t.storage.put(pdf, { contentType: 'application/pdf' });
    const svgKey = await t.storage.put(Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), {
      contentType: 'image/svg+xml',
    });
    const [m] = await t.ctx.db
      .insert(mailOutbox)
      .values({
        from: 'a@test.example',
        to: 'b@test.example',
        subject: 'Service summary',
        attachments: [
          { filename: 'service-summary-WO-1042.pdf', contentType: 'application/pdf', size: pdf.length, storageKey: pdfKey },
          { filename: 'diagram.svg', contentType: 'image/svg+xml', size: 80, storageKey: svgKey },
        ],
      })
      .returning();
    outboxId = m!.id;
    owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
  });
  afterAll(() => t?.close());

  const expectFile = (res: { status: number; headers: Record<string, string> }, disposition: 'inline' | 'attachment', name: string) => {
    expect(res.status).toBe(200);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-disposition']!.split(';')[0]).toBe(disposition);
    expect(extFilename(res.headers['content-disposition']!)).toBe(name);
  };

  it('sends an uploaded PDF as a download under its exact name, and a photo inline', async () => {
    const doc = await owner.get(`/api/attachments/${documentId}`);
    expectFile(doc, 'attachment', 'Démarrage RTU-3 (rapport).pdf');
    expect(doc.headers['content-type']).toBe('application/pdf');
    expectFile(await owner.get(`/api/attachments/${photoId}`), 'inline', 'Condenser coil.png');
  });

  it('does the same from the unit file', async () => {
    expectFile(await owner.get(`/api/units/${unitId}/file/attachments/${documentId}`), 'attachment', 'Démarrage RTU-3 (rapport).pdf');
    expectFile(await owner.get(`/api/units/${unitId}/file/attachments/${photoId}`), 'inline', 'Condenser coil.png');
  });

  it('sends e-mailed attachments as downloads, an SVG included (it could carry script)', async () => {
    expectFile(await owner.get(`/api/outbox/${outboxId}/attachments/0`), 'attachment', 'service-summary-WO-1042.pdf');
    expectFile(await owner.get(`/api/outbox/${outboxId}/attachments/1`), 'attachment', 'diagram.svg');
  });
});
