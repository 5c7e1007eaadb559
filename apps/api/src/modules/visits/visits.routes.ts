import { Router, type NextFunction, type Request, type Response } from 'express';
import multer from 'multer';
import {
  attachmentMaxBytes,
  attachmentUploadFieldsSchema,
  closeVisitSchema,
  findingInputSchema,
  idSchema,
  refrigerantEventInputSchema,
  saveReadingsSchema,
  visitStateChangeSchema,
} from '@coilpath/contract';
import { z } from 'zod';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { badRequest, notFound, unauthorized } from '../../lib/errors';
import { assertVisitReadable, assertVisitWritable, loadVisit } from './access';
import { signatureImage } from './signature';
import { addAttachment, readAttachment } from './attachments.service';
import { sendStoredFile } from '../../lib/send-file';
import { unitBriefing } from './briefing.service';
import { briefingRevisionOf, createRevisionCache } from '../../lib/revision-cache';
import { closeVisit, resendSummary } from './closeout.service';
import { recordRefrigerantEvent } from './refrigerant.service';
import { addFinding, changeState, currentVisit, saveReadings, visitDetail } from './visits.service';
import {
  attachmentAnswerSchema,
  closeVisitResultSchema,
  currentVisitResultSchema,
  findingAnswerSchema,
  readingsAnswerSchema,
  refrigerantEventResultSchema,
  summaryAnswerSchema,
  unitBriefingSchema,
  visitDetailSchema,
} from '@coilpath/contract/responses';

/** `/api/visits`: the Visit screen's reads and the assigned technician's writes. */
export function visitsRoutes(ctx: AppContext): Router {
  const r = Router();

  r.get(
    '/current',
    requireRole('technician'),
    endpoint({ response: currentVisitResultSchema }, ({ user }) => currentVisit(ctx, user)),
  );

  r.get(
    '/:id',
    endpoint({ params: idParams, response: visitDetailSchema }, ({ user, params }) => visitDetail(ctx.db, user, params.id)),
  );

  r.patch(
    '/:id',
    endpoint({ params: idParams, body: visitStateChangeSchema, response: visitDetailSchema }, ({ user, params, body }) =>
      changeState(ctx, user, params.id, body),
    ),
  );

  r.post(
    '/:id/readings',
    endpoint({ params: idParams, body: saveReadingsSchema, response: readingsAnswerSchema }, ({ user, params, body }) =>
      saveReadings(ctx, user, params.id, body),
    ),
  );

  r.post(
    '/:id/findings',
    endpoint({ params: idParams, body: findingInputSchema, response: findingAnswerSchema }, async ({ user, params, body, res }) => {
      const out = await addFinding(ctx, user, params.id, body);
      res.status(out.created ? 201 : 200).json({ finding: out.finding });
    }),
  );

  // The visit is checked before the upload is read, so a refused request never buffers 15 MB.
  const multerUpload = multer({ storage: multer.memoryStorage(), limits: { fileSize: attachmentMaxBytes, files: 1, fields: 5 } }).single(
    'file',
  );
  // Multer's own limit errors (LIMIT_FILE_SIZE → 413) pass through; an unreadable body is the client's 400.
  const upload = (req: Request, res: Response, next: NextFunction) =>
    multerUpload(req, res, (err?: unknown) => {
      const code = (err as { code?: unknown } | undefined)?.code;
      if (err && !(typeof code === 'string' && code.startsWith('LIMIT_'))) {
        return next(badRequest('The upload could not be read. Send the file again as multipart/form-data in the field "file".'));
      }
      next(err);
    });
  r.post(
    '/:id/attachments',
    async (req: Request, _res: Response, next: NextFunction) => {
      if (!req.user) throw unauthorized();
      const id = idSchema.parse(req.params.id);
      assertVisitWritable(req.user, await loadVisit(ctx.db, id));
      next();
    },
    upload,
    endpoint(
      {
        params: idParams,
        body: attachmentUploadFieldsSchema.extend({ unitId: idSchema.optional() }),
        status: 201,
        response: attachmentAnswerSchema,
      },
      async ({ user, params, body, req }) => ({
        attachment: await addAttachment(ctx, user, params.id, req.file, { id: body.id, kind: body.kind, unitId: body.unitId }),
      }),
    ),
  );

  r.post(
    '/:id/close',
    endpoint({ params: idParams, body: closeVisitSchema, response: closeVisitResultSchema }, ({ user, params, body }) =>
      closeVisit(ctx, user, params.id, body),
    ),
  );

  // The customer's signature image (PNG) of a closed, signed visit: whoever may read the visit; 404 when not signed.
  r.get(
    '/:id/signature',
    endpoint({ params: idParams, response: 'file' }, async ({ user, params, res }) => {
      assertVisitReadable(user, await loadVisit(ctx.db, params.id));
      const png = await signatureImage(ctx.db, params.id);
      if (!png) throw notFound('signature');
      sendStoredFile(res, { content: png, contentType: 'image/png', name: 'signature.png', cacheControl: 'private, max-age=3600' });
    }),
  );

  r.post(
    '/:id/summary',
    endpoint({ params: idParams, response: summaryAnswerSchema }, async ({ user, params }) => ({
      summary: await resendSummary(ctx, user, params.id),
    })),
  );

  return r;
}

/** `/api/attachments/:id`: the file itself (`?thumb=1` serves the same file, sized by the screen). */
export function attachmentsRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get(
    '/:id',
    endpoint({ params: idParams, query: z.object({ thumb: z.string().optional() }), response: 'file' }, async ({ user, params, res }) => {
      const { attachment: a, content } = await readAttachment(ctx, user, params.id);
      sendStoredFile(res, { content, contentType: a.contentType, name: a.displayName, cacheControl: 'private, max-age=3600' });
    }),
  );
  return r;
}

/** `/api/units/:id/briefing` and `/api/units/:id/refrigerant-events` (the units CRUD lives in modules/units). */
export function briefingRoutes(ctx: AppContext): Router {
  const r = Router();
  // Each technician opens the briefing of every stop, often several times a day: the answer is kept per unit
  // while its site's briefing revision stands (migration 0021), for every unit a day's routes may hold.
  const briefings = createRevisionCache(4096, briefingRevisionOf);
  r.get(
    '/:id/briefing',
    endpoint({ params: idParams, response: unitBriefingSchema }, ({ user, params }) => unitBriefing(ctx, user, params.id, briefings)),
  );
  r.post(
    '/:id/refrigerant-events',
    endpoint(
      { params: idParams, body: refrigerantEventInputSchema, response: refrigerantEventResultSchema },
      async ({ user, params, body, res }) => {
        const { created, ...out } = await recordRefrigerantEvent(ctx, user, params.id, body);
        res.status(created ? 201 : 200).json(out);
      },
    ),
  );
  return r;
}
