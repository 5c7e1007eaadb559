import { Router } from 'express';
import type { AppContext } from '../../context';
import { branchInputSchema, branchPatchSchema } from '@coilpath/contract';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { onlySent } from '../sites/list-query';
import { branchList, createBranch, getBranch, updateBranch } from './branches.service';
import { branchDetailSchema, branchListAnswerSchema } from '@coilpath/contract/responses';

/** `/api/branches` — the branches a person may see (the owner's branch switcher) and their settings. */
export function branchesRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get(
    '/',
    endpoint({ response: branchListAnswerSchema }, ({ user }) => branchList(ctx, user)),
  );
  /** Full settings; branch people may read their own branch, only the owner changes branches. */
  r.get(
    '/:id',
    endpoint({ params: idParams, response: branchDetailSchema }, ({ user, params }) => getBranch(ctx, user, params.id)),
  );
  r.post(
    '/',
    requireRole('owner'),
    endpoint({ body: branchInputSchema, status: 201, response: branchDetailSchema }, ({ user, body }) => createBranch(ctx, user, body)),
  );
  r.patch(
    '/:id',
    requireRole('owner'),
    endpoint({ params: idParams, body: branchPatchSchema, response: branchDetailSchema }, ({ user, params, body, req }) =>
      updateBranch(ctx, user, params.id, onlySent(body, req.body)),
    ),
  );
  return r;
}
