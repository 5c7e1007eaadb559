import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import type { Db } from '../db/client';
import { mailOutbox } from '../db/schema';
import type { Storage } from '../storage/storage';

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return '';
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}

/**
 * The local SMTP sink (docs/DESIGN.md §7): listens on 127.0.0.1, accepts every message and files it in
 * `mail_outbox` (attachments behind the storage interface), which `/outbox` shows.
 */
export async function startMailSink(db: Db, storage: Storage): Promise<{ url: string; port: number; close(): Promise<void> }> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    size: 30 * 1024 * 1024,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          const files = [];
          for (const a of mail.attachments) {
            const storageKey = await storage.put(a.content, { contentType: a.contentType });
            files.push({ filename: a.filename ?? 'attachment', contentType: a.contentType, size: a.size, storageKey });
          }
          await db.insert(mailOutbox).values({
            messageId: mail.messageId ?? null,
            from: addressText(mail.from),
            to: addressText(mail.to),
            subject: mail.subject ?? '(no subject)',
            text: mail.text ?? null,
            html: typeof mail.html === 'string' ? mail.html : null,
            attachments: files,
          });
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve());
  });
  const address = server.server.address();
  const port = typeof address === 'object' && address ? address.port : 0;
  return {
    url: `smtp://127.0.0.1:${port}?ignoreTLS=true`,
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
