/** The mail outbox: the latest messages (attachments by their index, without content) and one attachment's file. */
import type { AppContext } from '../../context';
import { notFound } from '../../lib/errors';
import { readStoredFile } from '../../storage/storage';
import { findMessage, listMessages } from './outbox.repo';

export async function outboxMessages(ctx: AppContext, limit: number) {
  const rows = await listMessages(ctx.db, limit);
  return {
    messages: rows.map((m) => ({
      ...m,
      receivedAt: m.receivedAt.toISOString(),
      attachments: m.attachments.map((a, i) => ({ index: i, filename: a.filename, contentType: a.contentType, size: a.size })),
    })),
  };
}

export async function outboxAttachment(ctx: AppContext, id: string, index: number) {
  const m = await findMessage(ctx.db, id);
  const a = m?.attachments[index];
  if (!m || !a?.storageKey) throw notFound('attachment');
  const content = await readStoredFile(ctx.storage, a.storageKey, 'e-mail attachment');
  return { content, contentType: a.contentType, name: a.filename };
}
