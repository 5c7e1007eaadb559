import { Router } from 'express';
import { desc, eq } from 'drizzle-orm';
import { z } from 'zod';
import { outboxListSchema } from '@coilpath/contract/responses';
import type { AppContext } from '../../context';
import { mailOutbox } from '../../db/schema';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { notFound } from '../../lib/errors';
import { sendStoredFile } from '../../lib/send-file';
import { readStoredFile } from '../../storage/storage';

export function outboxRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(requireRole('owner'));
  r.get(
    '/',
    endpoint(
      { query: z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) }), response: outboxListSchema },
      async ({ query }) => {
        const rows = await ctx.db
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
          .limit(query.limit);
        return {
          messages: rows.map((m) => ({
            ...m,
            receivedAt: m.receivedAt.toISOString(),
            attachments: m.attachments.map((a, i) => ({ index: i, filename: a.filename, contentType: a.contentType, size: a.size })),
          })),
        };
      },
    ),
  );
  r.get(
    '/:id/attachments/:index',
    endpoint({ params: idParams.extend({ index: z.coerce.number().int().min(0).max(100) }), response: 'file' }, async ({ params, res }) => {
      const [m] = await ctx.db.select().from(mailOutbox).where(eq(mailOutbox.id, params.id)).limit(1);
      const a = m?.attachments[params.index];
      if (!m || !a?.storageKey) throw notFound('attachment');
      const content = await readStoredFile(ctx.storage, a.storageKey, 'e-mail attachment');
      sendStoredFile(res, { content, contentType: a.contentType, name: a.filename });
    }),
  );
  return r;
}
