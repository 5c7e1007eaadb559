import { Router } from 'express';
import { z } from 'zod';
import { outboxListSchema } from '@coilpath/contract/responses';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { sendStoredFile } from '../../lib/send-file';
import { outboxAttachment, outboxMessages } from './outbox.service';

export function outboxRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(requireRole('owner'));
  r.get(
    '/',
    endpoint(
      { query: z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) }), response: outboxListSchema },
      ({ query }) => outboxMessages(ctx, query.limit),
    ),
  );
  r.get(
    '/:id/attachments/:index',
    endpoint({ params: idParams.extend({ index: z.coerce.number().int().min(0).max(100) }), response: 'file' }, async ({ params, res }) => {
      sendStoredFile(res, await outboxAttachment(ctx, params.id, params.index));
    }),
  );
  return r;
}
