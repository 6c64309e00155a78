import { Router } from 'express';
import { acceptInvitationBodySchema, invitationParamsSchema, type InvitationResponse } from '../../shared/schemas/auth';
import { handle } from '../middleware/validate';
import type { Services } from '../services';

export function invitationsRouter({ invitations }: Services): Router {
  const router = Router();
  router.get('/invitations/:token', handle({ params: invitationParamsSchema }, ({ params }): InvitationResponse => invitations.lookup(params.token)));
  router.post(
    '/invitations/:token',
    handle({ params: invitationParamsSchema, body: acceptInvitationBodySchema }, async ({ params, body }): Promise<InvitationResponse> => {
      const who = invitations.lookup(params.token);
      await invitations.accept(params.token, body.password);
      return who;
    }),
  );
  return router;
}
