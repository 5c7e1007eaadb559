/** The queries of the mail outbox (what the app sent, kept for the owner to read). */
import { desc, eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { mailOutbox } from '../../db/schema';

export async function listMessages(db: Db, limit: number) {
  return db
    .select({
      id: mailOutbox.id,
      messageId: mailOutbox.messageId,
      from: mailOutbox.from,
      to: mailOutbox.to,
      subject: mailOutbox.subject,
      text: mailOutbox.text,
      html: mailOutbox.html,
      attachments: mailOutbox.attachments,
      receivedAt: mailOutbox.receivedAt,
    })
    .from(mailOutbox)
    .orderBy(desc(mailOutbox.receivedAt))
    .limit(limit);
}

export async function findMessage(db: Db, id: string) {
  const [m] = await db.select().from(mailOutbox).where(eq(mailOutbox.id, id)).limit(1);
  return m;
}
