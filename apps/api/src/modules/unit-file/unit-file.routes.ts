import { Router } from 'express';
import { z } from 'zod';
import { idSchema, unitSearchQuerySchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { resolveBranch } from '../../auth/middleware';
import { endpoint } from '../../lib/endpoint';
import { sendStoredFile } from '../../lib/send-file';
import { readStoredFile } from '../../storage/storage';
import { attachmentLabel } from '../visits/attachments.service';
import { searchUnits, unitAttachment, unitFile } from './unit-file.service';

const unitParams = z.object({ id: idSchema });

/**
 * Mounted at `/api/units` beside the units CRUD routes: only `/:id/file` (and its attachments) live here.
 * Every signed-in role may call it; the service answers 404 for a unit outside the person's scope.
 */
export function unitFileRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get(
    '/:id/file',
    endpoint({ params: unitParams }, ({ params, user }) => unitFile(ctx.db, user, params.id)),
  );
  r.get(
    '/:id/file/attachments/:attachmentId',
    endpoint({ params: unitParams.extend({ attachmentId: idSchema }) }, async ({ params, user, res }) => {
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
    endpoint({ query: unitSearchQuerySchema }, ({ query, user }) => searchUnits(ctx.db, user, query, resolveBranch(user, query.branchId))),
  );
  return r;
}
