import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, TEST_PASSWORD } from '../../testing/fixtures';
import { attachments, units } from '../../db/schema';
import { attachmentMaxBytes } from '@coilpath/contract';
import { cleanDisplayName } from './attachments.service';
import { makeBookedVisit, tinyPdf, tinyPng } from './visits.fixtures';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let visitId: string;
let unitId: string;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let tech: Agent, tech2: Agent, manager: Agent, managerB: Agent;

beforeAll(async () => {
  t = await createTestApp({ now: '2026-03-10T15:00:00Z' });
  f = await makeTwoBranches(t.ctx.db);
  const other = await makeUser(t.ctx.db, 'technician', f.a.id);
  const p = await makeSiteWithUnit(t.ctx.db, f.a.id);
  unitId = p.unit.id;
  ({
    visit: { id: visitId },
  } = await makeBookedVisit(t.ctx.db, {
    branchId: f.a.id,
    siteId: p.site.id,
    unitId,
    techId: f.inA.technician.id,
    startAt: '2026-03-10T14:00:00Z',
  }));
  const sign = (email: string) => signedInAgent(t.app, email, TEST_PASSWORD);
  [tech, tech2, manager, managerB] = await Promise.all([
    sign(f.inA.technician.email),
    sign(other.email),
    sign(f.inA.manager.email),
    sign(f.inB.manager.email),
  ]);
});
afterAll(() => t.close());

describe('POST /api/visits/:id/attachments', () => {
  it('stores a photo under a generated name, typed by content, attached to the visit and the unit', async () => {
    const res = await tech
      .post(`/api/visits/${visitId}/attachments`)
      .attach('file', tinyPng, { filename: '../../etc/roof<1>  view.png', contentType: 'text/plain' });
    expect(res.status).toBe(201);
    const a = res.body.attachment;
    expect(a).toMatchObject({
      visitId,
      unitId,
      kind: 'photo',
      contentType: 'image/png',
      displayName: 'roof1 view.png',
      sizeBytes: tinyPng.length,
    });
    const [row] = await t.ctx.db.select().from(attachments).where(eq(attachments.id, a.id));
    expect(row!.storageKey).not.toContain('roof');
    expect(row!.storageKey).toMatch(/^[0-9a-f]{2}\/[0-9a-f-]{36}$/);

    const file = await tech
      .get(a.url)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    expect(file.status).toBe(200);
    expect(file.headers['content-type']).toBe('image/png');
    expect(Buffer.compare(file.body as Buffer, tinyPng)).toBe(0);
    expect((await tech.get(a.thumbUrl)).status).toBe(200);
  });

  it('takes a PDF as a document and a nameplate photo as the unit’s nameplate', async () => {
    const pdf = await tech.post(`/api/visits/${visitId}/attachments`).attach('file', tinyPdf, 'report.pdf');
    expect(pdf.status).toBe(201);
    expect(pdf.body.attachment).toMatchObject({ kind: 'document', contentType: 'application/pdf' });
    const plate = await tech.post(`/api/visits/${visitId}/attachments`).field('kind', 'nameplate').attach('file', tinyPng, 'plate.png');
    expect(plate.status).toBe(201);
    const [u] = await t.ctx.db.select().from(units).where(eq(units.id, unitId));
    expect(u!.nameplateAttachmentId).toBe(plate.body.attachment.id);
  });

  it('stores an upload sent again with the same client id once (a phone retrying after a lost answer)', async () => {
    const id = crypto.randomUUID();
    const first = await tech.post(`/api/visits/${visitId}/attachments`).field('id', id).attach('file', tinyPng, 'coil.png');
    expect(first.status).toBe(201);
    expect(first.body.attachment.id).toBe(id);
    const again = await tech.post(`/api/visits/${visitId}/attachments`).field('id', id).attach('file', tinyPng, 'coil.png');
    expect(again.status).toBe(201);
    expect(again.body.attachment.id).toBe(id);
    expect(await t.ctx.db.select().from(attachments).where(eq(attachments.id, id))).toHaveLength(1);
    const bad = await tech.post(`/api/visits/${visitId}/attachments`).field('id', 'not-a-uuid').attach('file', tinyPng, 'coil.png');
    expect(bad.status).toBe(400);
  });

  it('refuses a text file renamed .jpg (415)', async () => {
    const before = await t.ctx.db.select().from(attachments);
    const res = await tech
      .post(`/api/visits/${visitId}/attachments`)
      .attach('file', Buffer.from('just some notes, not a photo\n'.repeat(20)), { filename: 'photo.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(415);
    expect(res.body.error.message).toMatch(/JPEG, PNG, WebP, HEIC/);
    expect(await t.ctx.db.select().from(attachments)).toHaveLength(before.length);
  });

  it('refuses a file over 15 MB (413)', async () => {
    const big = Buffer.alloc(attachmentMaxBytes + 1, 0);
    tinyPng.copy(big);
    const res = await tech.post(`/api/visits/${visitId}/attachments`).attach('file', big, 'huge.png');
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('too_large');
  });

  it('answers 400 to a body that is not readable multipart', async () => {
    const res = await tech
      .post(`/api/visits/${visitId}/attachments`)
      .set('Content-Type', 'multipart/form-data; boundary=xyz')
      .send('--xyz\r\nthis is not a part header\r\n\r\n--xyz--\r\n');
    expect(res.status).toBe(400);
  });

  it('refuses a missing file (400), another technician (404) and the office (403)', async () => {
    expect((await tech.post(`/api/visits/${visitId}/attachments`).field('kind', 'photo')).status).toBe(400);
    expect((await tech2.post(`/api/visits/${visitId}/attachments`).attach('file', tinyPng, 'a.png')).status).toBe(404);
    expect((await manager.post(`/api/visits/${visitId}/attachments`).attach('file', tinyPng, 'a.png')).status).toBe(403);
    expect((await tech.post(`/api/visits/${visitId}/attachments`).field('kind', 'selfie').attach('file', tinyPng, 'a.png')).status).toBe(
      400,
    );
  });
});

describe('GET /api/attachments/:id', () => {
  it('serves the office in scope; another technician and another branch get 404', async () => {
    const up = await tech.post(`/api/visits/${visitId}/attachments`).attach('file', tinyPng, 'a.png');
    const url = up.body.attachment.url as string;
    expect((await manager.get(url)).status).toBe(200);
    expect((await managerB.get(url)).status).toBe(404);
    expect((await tech2.get(url)).status).toBe(404);
    expect((await tech.get('/api/attachments/00000000-0000-4000-8000-000000000000')).status).toBe(404);
  });

  it('shows a photo inline but sends a PDF as a download (attachment), never as a page of the site', async () => {
    const photo = await tech.post(`/api/visits/${visitId}/attachments`).attach('file', tinyPng, 'a.png');
    expect((await manager.get(photo.body.attachment.url)).headers['content-disposition']).toMatch(/^inline; /);
    const pdf = await tech.post(`/api/visits/${visitId}/attachments`).field('kind', 'document').attach('file', tinyPdf, 'report.pdf');
    expect(pdf.status).toBe(201);
    const res = await manager.get(pdf.body.attachment.url);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect(res.headers['content-disposition']).toBe('attachment; filename="report.pdf"; filename*=UTF-8\'\'report.pdf');
  });
});

describe('cleanDisplayName', () => {
  it('drops paths and control characters and keeps a fallback', () => {
    expect(cleanDisplayName('C:\\fakepath\\IMG_0001.HEIC')).toBe('IMG_0001.HEIC');
    expect(cleanDisplayName('..')).toBe('upload');
    expect(cleanDisplayName(undefined, 'photo')).toBe('photo');
    expect(cleanDisplayName('a'.repeat(300))).toHaveLength(120);
  });
});
