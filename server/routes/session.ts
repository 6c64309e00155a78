import { Router, type Request, type Response } from 'express';
import { defineAbilityFor } from '../../shared/abilities';
import { signInBodySchema, type SessionResponse } from '../../shared/schemas/auth';
import { HttpError } from '../errors';
import type { Csrf } from '../middleware/csrf';
import { signInRateLimit } from '../middleware/rateLimit';
import { handle } from '../middleware/validate';
import { toSessionUser } from '../services/auth';
import type { Services } from '../services';

export const SESSION_COOKIE = 'tocsin.sid';

const promisify = (fn: (cb: (err?: unknown) => void) => void) =>
  new Promise<void>((resolve, reject) => fn((err) => (err ? reject(err) : resolve())));

export function sessionPayload(req: Request, res: Response, csrf: Csrf, newToken = false): SessionResponse {
  return {
    user: toSessionUser(req.user!),
    rules: req.ability.rules as unknown as SessionResponse['rules'],
    csrfToken: csrf.token(req, res, newToken),
  };
}

export function sessionRouter({ auth, config }: Services, csrf: Csrf): Router {
  const router = Router();

  router.post(
    '/session',
    signInRateLimit(config.signInRateLimit),
    handle({ body: signInBodySchema }, async ({ body, req, res }) => {
      const user = await auth.authenticate(body.email, body.password);
      // One answer for unknown e-mail, wrong password and deactivated user.
      if (!user) throw new HttpError(401, 'invalid_credentials', 'E-mail address or password is not correct');
      await promisify((cb) => req.session.regenerate(cb));
      req.session.userId = user.id;
      req.session.signedInAt = Date.now();
      await promisify((cb) => req.session.save(cb));
      auth.recordSignIn(user.id);
      req.user = user;
      req.ability = defineAbilityFor({ id: user.id, role: user.role });
      return sessionPayload(req, res, csrf, true);
    }),
  );

  router.get('/session', handle({}, ({ req, res }) => sessionPayload(req, res, csrf)));

  router.delete(
    '/session',
    handle({}, async ({ req, res }) => {
      if (req.session) await promisify((cb) => req.session.destroy(cb));
      res.clearCookie(SESSION_COOKIE, { path: '/' });
      return undefined;
    }),
  );

  return router;
}
