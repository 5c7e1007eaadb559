import express, { Router } from 'express';
import {
  ALARM_BODY_LIMIT_BYTES,
  ALARM_SIGNATURE_HEADER,
  ALARM_TIMESTAMP_HEADER,
  alarmSourceCreateSchema,
  alarmSourceListQuerySchema,
  alarmSourcePatchSchema,
  mapDeliverySchema,
} from '@coilpath/contract';
import {
  alarmSourceAnswerSchema,
  alarmSourceListSchema,
  alarmSourceSecretSchema,
  mappedDeliveryAnswerSchema,
} from '@coilpath/contract/responses';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { createSource, ingestAlarm, listSources, mapDelivery, patchSource, rotateSource } from './alarm-sources.service';

const managers = requireRole('branch_manager', 'owner');

/** `/api/alarm-sources`: managers and the owner register controllers, rotate and disable them, map unmatched deliveries. */
export function alarmSourcesRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(managers);
  r.get(
    '/',
    endpoint({ query: alarmSourceListQuerySchema, response: alarmSourceListSchema }, ({ user, query }) =>
      listSources(ctx, user, query.branchId),
    ),
  );
  r.post(
    '/',
    endpoint({ body: alarmSourceCreateSchema, status: 201, response: alarmSourceSecretSchema }, ({ user, body }) =>
      createSource(ctx, user, body),
    ),
  );
  r.patch(
    '/:id',
    endpoint({ params: idParams, body: alarmSourcePatchSchema, response: alarmSourceAnswerSchema }, async ({ user, params, body }) => ({
      source: await patchSource(ctx, user, params.id, body),
    })),
  );
  r.post(
    '/:id/rotate',
    endpoint({ params: idParams, response: alarmSourceSecretSchema }, ({ user, params }) => rotateSource(ctx, user, params.id)),
  );
  r.post(
    '/deliveries/:id/map',
    endpoint({ params: idParams, body: mapDeliverySchema, response: mappedDeliveryAnswerSchema }, ({ user, params, body }) =>
      mapDelivery(ctx, user, params.id, body.unitId),
    ),
  );
  return r;
}

/**
 * `/api/ingest`: machine-to-machine (listed in `lib/machine-routes.ts`). Mounted in app.ts before the
 * JSON parser and the session check: the signature is computed over the exact bytes received, and a
 * session cookie is neither needed nor read.
 */
export function ingestRoutes(ctx: AppContext): Router {
  const r = Router();
  r.post('/alarms/:sourceId', express.raw({ type: () => true, limit: ALARM_BODY_LIMIT_BYTES }), async (req, res) => {
    const answer = await ingestAlarm(ctx, {
      sourceId: String(req.params.sourceId),
      timestamp: req.get(ALARM_TIMESTAMP_HEADER),
      signature: req.get(ALARM_SIGNATURE_HEADER),
      rawBody: Buffer.isBuffer(req.body) ? req.body : Buffer.alloc(0),
    });
    res.status(answer.status).json(answer.body);
  });
  return r;
}
