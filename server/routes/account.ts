import { Router } from 'express';
import { changePasswordBodySchema } from '../../shared/schemas/auth';
import { handle } from '../middleware/validate';
import type { Services } from '../services';

export function accountRouter({ auth }: Services): Router {
  const router = Router();
  router.put(
    '/account/password',
    handle({ body: changePasswordBodySchema }, async ({ body, req }) => {
      await auth.changePassword(req.user!.id, body.currentPassword, body.newPassword, req.sessionID);
      return undefined;
    }),
  );
  return router;
}
