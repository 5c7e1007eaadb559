/**
 * Every route that streams a stored file answers a record whose bytes are gone from storage with
 * 410 `file_missing` in the API's error shape — never 500 "The change was not saved".
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiErrorSchema } from '@coilpath/contract';
import { attachments, mailOutbox, visits } from '../db/schema';
import { createTestApp, signedInAgent, type TestApp } from '../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder, TEST_PASSWORD } from '../testing/fixtures';

const png = Buffer.from('89504e470d0a1a0a0000000d4948445200000001000000010806000000', 'hex');

let t: TestApp;
let owner: Awaited<ReturnType<typeof signedInAgent>>;
let unitId: string;
let visitId: string;

beforeAll(async () => {
  t = await createTestApp();
  const f = await makeTwoBranches(t.ctx.db);
  const { site, unit } = await makeSiteWithUnit(t.ctx.db, f.a.id);
  unitId = unit.id;
  const wo = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: site.id, unitId: unit.id });
  const [v] = await t.ctx.db.insert(visits).values({ branchId: f.a.id, workOrderId: wo.id, techId: f.inA.technician.id }).returning();
  visitId = v!.id;
  owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
});
afterAll(() => t?.close());

/** An attachment row whose file is stored, and one whose file was stored and then removed. */
async function photo(kind: 'photo' | 'document', gone: boolean) {
  const storageKey = await t.storage.put(png, { contentType: 'image/png' });
  if (gone) await t.storage.remove(storageKey);
  const [a] = await t.ctx.db
    .insert(attachments)
    .values({ visitId, unitId, kind, storageKey, displayName: 'coil.png', contentType: 'image/png', sizeBytes: png.length })
    .returning();
  return a!.id;
}

async function outboxMessage(gone: boolean) {
  const storageKey = await t.storage.put(Buffer.from('%PDF-1.4 summary'), { contentType: 'application/pdf' });
  if (gone) await t.storage.remove(storageKey);
  const [m] = await t.ctx.db
    .insert(mailOutbox)
    .values({
      from: 'a@test.example',
      to: 'b@test.example',
      subject: 'Service summary',
      attachments: [{ filename: 'summary.pdf', contentType: 'application/pdf', size: 16, storageKey }],
    })
    .returning();
  return m!.id;
}

function expectGone(res: { status: number; body: unknown }, what: string) {
  expect(res.status).toBe(410);
  expect(apiErrorSchema.safeParse(res.body).success).toBe(true);
  const error = (res.body as { error: { code: string; message: string } }).error;
  expect(error.code).toBe('file_missing');
  expect(error.message).toContain(`The file of this ${what} is missing`);
  expect(error.message).not.toMatch(/not saved/);
}

describe('a stored file that is gone', () => {
  it('GET /api/attachments/:id answers 410 file_missing (and 200 while the file is there)', async () => {
    const there = await owner.get(`/api/attachments/${await photo('photo', false)}`);
    expect(there.status).toBe(200);
    expect(Buffer.compare(there.body as Buffer, png)).toBe(0);
    expectGone(await owner.get(`/api/attachments/${await photo('photo', true)}`), 'photo');
    expectGone(await owner.get(`/api/attachments/${await photo('document', true)}?thumb=1`), 'document');
  });

  it('GET /api/units/:id/file/attachments/:attachmentId answers 410 file_missing', async () => {
    expect((await owner.get(`/api/units/${unitId}/file/attachments/${await photo('photo', false)}`)).status).toBe(200);
    expectGone(await owner.get(`/api/units/${unitId}/file/attachments/${await photo('photo', true)}`), 'photo');
  });

  it('GET /api/outbox/:id/attachments/:index answers 410 file_missing', async () => {
    expect((await owner.get(`/api/outbox/${await outboxMessage(false)}/attachments/0`)).status).toBe(200);
    expectGone(await owner.get(`/api/outbox/${await outboxMessage(true)}/attachments/0`), 'e-mail attachment');
  });
});
