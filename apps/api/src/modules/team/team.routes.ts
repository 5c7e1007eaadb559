import { Router } from 'express';
import { publicLimiter } from '../../auth/public-limiter';
import { acceptInvitationSchema, invitationInputSchema, linkCheckSchema, userProfileSchema, usersQuerySchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { requireAuth, requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { setSessionCookie } from '../../auth/cookies';
import * as svc from './team.service';
import { invitationListAnswerSchema, invitationRowSchema, userPageSchema, userRowSchema } from '@coilpath/contract/responses';

/**
 * `/api/users` — the owner manages people; branch managers and dispatchers read their own
 * branch's people (the Roster's technicians). Technicians: 403.
 */
export function usersRoutes(ctx: AppContext): Router {
  const r = Router();
  const readers = requireRole('owner', 'branch_manager', 'dispatcher');
  const owner = requireRole('owner');
  r.get(
    '/',
    readers,
    endpoint({ query: usersQuerySchema, response: userPageSchema }, ({ user, query }) => svc.listUsers(ctx, user, query)),
  );
  r.get(
    '/:id',
    readers,
    endpoint({ params: idParams, response: userRowSchema }, ({ user, params }) => svc.getUser(ctx.db, user, params.id)),
  );
  r.patch(
    '/:id',
    owner,
    endpoint({ params: idParams, body: userProfileSchema, response: userRowSchema }, ({ user, params, body }) =>
      svc.updateUser(ctx, user, params.id, body),
    ),
  );
  r.post(
    '/:id/deactivate',
    owner,
    endpoint({ params: idParams, response: userRowSchema }, ({ user, params }) => svc.setUserActive(ctx, user, params.id, false)),
  );
  r.post(
    '/:id/reactivate',
    owner,
    endpoint({ params: idParams, response: userRowSchema }, ({ user, params }) => svc.setUserActive(ctx, user, params.id, true)),
  );
  return r;
}

/**
 * `/api/invitations` — the owner invites, lists, resends and withdraws. `check` and `accept` are
 * public (the signed token in the e-mailed link is the credential) and rate limited.
 */
export function invitationsRoutes(ctx: AppContext): Router {
  const r = Router();
  const limiter = publicLimiter('invitation', Math.max(ctx.config.signInLimit, 10));
  r.post('/check', limiter, async (req, res) => {
    const { token } = linkCheckSchema.parse(req.body ?? {});
    res.json({ invitation: await svc.previewInvitation(ctx, token) });
  });
  r.post('/accept', limiter, async (req, res) => {
    const input = acceptInvitationSchema.parse(req.body ?? {});
    const { user, token } = await svc.acceptInvitation(ctx, input);
    setSessionCookie(ctx, res, token);
    res.status(201).json({ user });
  });

  const owner = [requireAuth, requireRole('owner')];
  r.get(
    '/',
    ...owner,
    endpoint({ response: invitationListAnswerSchema }, async () => ({ invitations: await svc.listInvitations(ctx) })),
  );
  r.post(
    '/',
    ...owner,
    endpoint({ body: invitationInputSchema, status: 201, response: invitationRowSchema }, ({ user, body }) =>
      svc.createInvitation(ctx, user, body.email, body.profile),
    ),
  );
  r.post(
    '/:id/resend',
    ...owner,
    endpoint({ params: idParams, response: invitationRowSchema }, ({ user, params }) => svc.resendInvitation(ctx, user, params.id)),
  );
  r.delete(
    '/:id',
    ...owner,
    endpoint({ params: idParams, response: invitationRowSchema }, ({ params }) => svc.revokeInvitation(ctx, params.id)),
  );
  return r;
}
