import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq, gt, sql } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { circuits, liveEvents, mailOutbox } from '../../db/schema';
import { toLiveEvent } from '../events/events.service';
import { startMailSink } from '../../mail/sink';
import { createSmtpMailer, type Mailer } from '../../mail/mailer';
import { makeBookedVisit, NOT_AVAILABLE } from './visits.fixtures';

const PSIG_F = { pressure: 'psig', temperature: 'F' } as const;

let t: TestApp;
let sink: Awaited<ReturnType<typeof startMailSink>>;

beforeAll(async () => {
  // The sink writes into the app's own database, so the app is built first with a mailer that
  // forwards to the SMTP transport once the sink is listening.
  const smtp: { mailer?: Mailer } = {};
  t = await createTestApp({ now: '2026-03-10T15:00:00Z', mailer: { send: (m) => smtp.mailer!.send(m) } });
  sink = await startMailSink(t.ctx.db, t.storage);
  smtp.mailer = createSmtpMailer(sink.url, 'Coilpath <service@coilpath.example>');
});
afterAll(async () => {
  await sink?.close();
  await t?.close();
});

describe('service summary through the real SMTP sink', () => {
  it('lands in mail_outbox with the readings, the finding and the PDF attached', async () => {
    const f = await makeTwoBranches(t.ctx.db);
    const p = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const [c1] = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, p.unit.id)).orderBy(circuits.number);
    const { visit } = await makeBookedVisit(t.ctx.db, {
      branchId: f.a.id,
      siteId: p.site.id,
      unitId: p.unit.id,
      techId: f.inA.technician.id,
      startAt: '2026-03-10T14:00:00Z',
    });
    const tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
    await tech.patch(`/api/visits/${visit.id}`).send({ state: 'on_site' });
    await tech
      .post(`/api/visits/${visit.id}/readings`)
      .send({ units: PSIG_F, readings: [{ circuitId: c1!.id, suctionPressure: 111.5, suctionLineTemp: 48.7 }] });
    await tech
      .post(`/api/visits/${visit.id}/findings`)
      .send({ causeCode: 'wiring_fault', origin: 'factory_defect', reportedCircuit: 1, actualCircuit: 2 });

    const [newest] = await t.ctx.db.select({ id: sql<number>`coalesce(max(${liveEvents.id}), 0)::int` }).from(liveEvents);
    const res = await tech.post(`/api/visits/${visit.id}/close`).send({
      signature: NOT_AVAILABLE,
      outcome: 'needs_return',
      returnNeeds: ['manufacturer'],
      returnNotes: 'Factory to confirm the wiring change',
    });
    expect(res.status).toBe(200);
    expect(res.body.summary).toMatchObject({ sent: true, to: p.site.contactEmail });
    // Every change of the close, the summary's "sent" mark included, names the technician on the live screens.
    const written = await t.ctx.db
      .select()
      .from(liveEvents)
      .where(and(gt(liveEvents.id, Number(newest!.id)), eq(liveEvents.branchId, f.a.id)));
    expect(written.length).toBeGreaterThan(0);
    expect(written.map((e) => toLiveEvent(e).by)).toEqual(written.map(() => ({ id: f.inA.technician.id, name: f.inA.technician.name })));

    // The sink files the message after the SMTP session ends: wait for the row, bounded.
    let rows: (typeof mailOutbox.$inferSelect)[] = [];
    for (let i = 0; i < 250 && rows.length === 0; i++) {
      rows = await t.ctx.db.select().from(mailOutbox).where(eq(mailOutbox.to, p.site.contactEmail!));
      if (rows.length === 0) await new Promise((r) => setTimeout(r, 20));
    }
    expect(rows).toHaveLength(1);
    const m = rows[0]!;
    expect(m.subject).toMatch(/^Service summary WO-\d+/);
    expect(m.text).toContain('Wiring fault (origin: Factory defect)');
    expect(m.text).toContain('reported on circuit 1, found on circuit 2');
    expect(m.text).toMatch(/superheat 11\.8 °F/);
    // The HTML part is caught too, with the same finding, and the Message-ID the outbox shows.
    expect(m.html).toContain('Wiring fault (origin: Factory defect)');
    expect(m.messageId).toMatch(/^<.+@.+>$/);
    expect(m.attachments).toHaveLength(1);
    expect(m.attachments[0]).toMatchObject({ contentType: 'application/pdf' });
    expect(m.attachments[0]!.filename).toMatch(/^service-summary-WO-\d+\.pdf$/);
    const pdf = await t.storage.get(m.attachments[0]!.storageKey!);
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');

    // The outbox screen gets both parts and the Message-ID.
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    const box = await owner.get('/api/outbox');
    expect(box.status).toBe(200);
    const listed = (box.body.messages as { id: string }[]).find((x) => x.id === m.id);
    expect(listed).toMatchObject({ messageId: m.messageId, text: m.text, html: m.html });
  });
});
