import { Router } from 'express';
import { z } from 'zod';
import { idSchema, refrigerantRecordQuerySchema, unitSearchQuerySchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { resolveBranch } from '../../auth/policy';
import { endpoint } from '../../lib/endpoint';
import { sendStoredFile } from '../../lib/send-file';
import { readStoredFile } from '../../storage/storage';
import { attachmentLabel } from '../visits/attachments.service';
import { searchUnits, unitAttachment, unitFile } from './unit-file.service';
import { refrigerantRecord } from './refrigerant-record';
import { recordCsv, recordFileName, recordPdf } from './refrigerant-record.export';
import { refrigerantRecordSchema, unitFileSchema, unitSearchResultSchema } from '@coilpath/contract/responses';

const unitParams = z.object({ id: idSchema });

/**
 * Mounted at `/api/units` beside the units CRUD routes: only `/:id/file` (and its attachments) and
 * `/:id/refrigerant-record` live here.
 * Every signed-in role may call it; the service answers 404 for a unit outside the person's scope.
 */
export function unitFileRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get(
    '/:id/file',
    endpoint({ params: unitParams, response: unitFileSchema }, ({ params, user }) => unitFile(ctx.db, user, params.id)),
  );
  r.get(
    '/:id/refrigerant-record',
    endpoint(
      { params: unitParams, query: refrigerantRecordQuerySchema, response: refrigerantRecordSchema },
      async ({ params, query, user, res }) => {
        const now = ctx.clock.now();
        const record = await refrigerantRecord(ctx.db, user, params.id, now);
        if (query.format === 'json') return record;
        res.setHeader('Cache-Control', 'private, no-store');
        if (query.format === 'csv') {
          res.setHeader('Content-Type', 'text/csv; charset=utf-8');
          res.setHeader('Content-Disposition', `attachment; filename="${recordFileName(record, 'csv')}"`);
          res.send(recordCsv(record));
          return;
        }
        const pdf = await recordPdf(record, now);
        res.setHeader('Content-Type', 'application/pdf');
        res.setHeader('Content-Disposition', `attachment; filename="${recordFileName(record, 'pdf')}"`);
        res.send(pdf);
      },
    ),
  );
  r.get(
    '/:id/file/attachments/:attachmentId',
    endpoint({ params: unitParams.extend({ attachmentId: idSchema }), response: 'file' }, async ({ params, user, res }) => {
      const a = await unitAttachment(ctx.db, user, params.id, params.attachmentId);
      const content = await readStoredFile(ctx.storage, a.storageKey, attachmentLabel[a.kind]);
      sendStoredFile(res, { content, contentType: a.contentType, name: a.displayName, cacheControl: 'private, max-age=3600' });
    }),
  );
  return r;
}

/** `/api/unit-file`: the unit search of the `/units` screen (the person's scope; technicians: their units). */
export function unitSearchRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get(
    '/',
    endpoint({ query: unitSearchQuerySchema, response: unitSearchResultSchema }, ({ query, user }) =>
      searchUnits(ctx.db, user, query, resolveBranch(user, query.branchId)),
    ),
  );
  return r;
}
