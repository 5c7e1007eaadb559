import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openTestDatabase } from '../testing/harness';
import type { Database } from '../db/client';
import { mailOutbox } from '../db/schema';
import { createMemoryStorage } from '../storage/storage';
import { createSmtpMailer } from './mailer';
import { startMailSink } from './sink';

let database: Database;
let sink: Awaited<ReturnType<typeof startMailSink>>;
const storage = createMemoryStorage();

beforeAll(async () => {
  database = await openTestDatabase();
  sink = await startMailSink(database.db, storage);
});
afterAll(async () => {
  await sink.close();
  await database.close();
});

describe('local mail sink', () => {
  it('catches a message sent through nodemailer into the outbox: both parts, its Message-ID and attachments', async () => {
    const mailer = createSmtpMailer(sink.url, 'Coilpath <no-reply@coilpath.example>');
    const pdf = Buffer.from('%PDF-1.4\n% test\n');
    await mailer.send({
      to: 'contact@site.example',
      subject: 'Service summary',
      text: 'Readings and findings',
      html: '<p>Readings and findings</p>',
      attachments: [{ filename: 'summary.pdf', content: pdf, contentType: 'application/pdf' }],
    });
    const rows = await database.db.select().from(mailOutbox);
    expect(rows).toHaveLength(1);
    const m = rows[0]!;
    expect(m.to).toBe('contact@site.example');
    expect(m.subject).toBe('Service summary');
    expect(m.text?.trim()).toBe('Readings and findings');
    expect(m.html).toBe('<p>Readings and findings</p>');
    expect(m.messageId).toMatch(/^<[^<>@\s]+@[^<>\s]+>$/);
    expect(m.attachments).toHaveLength(1);
    expect(m.attachments[0]!.filename).toBe('summary.pdf');
    expect(m.attachments[0]!.contentType).toBe('application/pdf');
    expect(await storage.get(m.attachments[0]!.storageKey!)).toEqual(pdf);
  });
});
