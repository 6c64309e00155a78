// Press releases (issue 7), signed in. Thin: validate, call the release service.
import { Router } from 'express';
import { idParamsSchema } from '../../shared/schemas/api';
import {
  cancelBodySchema,
  createReleaseBodySchema,
  releaseListQuerySchema,
  releaseTransitionBodySchema,
  releaseVersionParamsSchema,
  scheduleBodySchema,
  updateReleaseBodySchema,
} from '../../shared/schemas/releases';
import { handle } from '../middleware/validate';
import type { Services } from '../services';
import { actorOf } from './bulletins';

export function releasesRouter({ releases }: Services): Router {
  const router = Router();
  router.get('/releases', handle({ query: releaseListQuerySchema }, ({ query, req }) => releases.list(query, actorOf(req))));
  router.post('/releases', handle({ body: createReleaseBodySchema }, ({ body, req }) => releases.create(body, actorOf(req)), { status: 201 }));
  router.get('/releases/:id', handle({ params: idParamsSchema }, ({ params, req }) => releases.get(params.id, actorOf(req))));
  router.put('/releases/:id', handle({ params: idParamsSchema, body: updateReleaseBodySchema }, ({ params, body, req }) => releases.update(params.id, body, actorOf(req))));
  router.post(
    '/releases/:id/schedule',
    handle({ params: idParamsSchema, body: scheduleBodySchema }, ({ params, body, req }) => {
      const actor = actorOf(req);
      const current = releases.get(params.id, actor);
      const action = current.state === 'scheduled' ? 'reschedule' : 'schedule';
      return releases.transition(params.id, { action, publishAt: body.publishAt, timeZone: body.timeZone }, actor);
    }),
  );
  router.post('/releases/:id/cancel', handle({ params: idParamsSchema, body: cancelBodySchema }, ({ params, body, req }) => releases.transition(params.id, { action: 'cancel', comment: body.comment }, actorOf(req))));
  router.post('/releases/:id/transitions', handle({ params: idParamsSchema, body: releaseTransitionBodySchema }, ({ params, body, req }) => releases.transition(params.id, body, actorOf(req))));
  router.get('/releases/:id/versions/:version', handle({ params: releaseVersionParamsSchema }, ({ params, req }) => releases.readableVersion(params.id, params.version, actorOf(req))));
  return router;
}
