import { Router } from 'express';
import { agreementInputSchema, agreementListQuerySchema, agreementPatchSchema, pmCompletionQuerySchema } from '@coilpath/contract';
import {
  agreementAnswerSchema,
  agreementListAnswerSchema,
  planApplyResultSchema,
  planPreviewSchema,
  pmCompletionResponseSchema,
} from '@coilpath/contract/responses';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { applyPlan, createAgreement, getAgreement, listAgreements, patchAgreement, pmCompletion, previewPlan } from './agreements.service';

/** `/api/agreements`: branch managers (own branch) and the owner. */
export function agreementsRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(requireRole('branch_manager', 'owner'));
  // Declared before `/:id` (which also checks for a uuid) so the name is never read as an id.
  r.get(
    '/pm-completion',
    endpoint({ query: pmCompletionQuerySchema, response: pmCompletionResponseSchema }, ({ user, query }) => pmCompletion(ctx, user, query)),
  );
  r.get(
    '/',
    endpoint({ query: agreementListQuerySchema, response: agreementListAnswerSchema }, async ({ user, query }) => ({
      agreements: await listAgreements(ctx, user, query),
    })),
  );
  r.post(
    '/',
    endpoint({ body: agreementInputSchema, status: 201, response: agreementAnswerSchema }, async ({ user, body }) => ({
      agreement: await createAgreement(ctx, user, body),
    })),
  );
  r.get(
    '/:id',
    endpoint({ params: idParams, response: agreementAnswerSchema }, async ({ user, params }) => ({
      agreement: await getAgreement(ctx, user, params.id),
    })),
  );
  r.patch(
    '/:id',
    endpoint({ params: idParams, body: agreementPatchSchema, response: agreementAnswerSchema }, async ({ user, params, body }) => ({
      agreement: await patchAgreement(ctx, user, params.id, body),
    })),
  );
  r.post(
    '/:id/plan',
    endpoint({ params: idParams, response: planPreviewSchema }, ({ user, params }) => previewPlan(ctx, user, params.id)),
  );
  r.post(
    '/:id/plan/apply',
    endpoint({ params: idParams, response: planApplyResultSchema }, ({ user, params }) => applyPlan(ctx, user, params.id)),
  );
  return r;
}
