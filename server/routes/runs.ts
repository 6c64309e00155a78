import { Router } from 'express';
import { idParamsSchema } from '../../shared/schemas/api';
import { createRunBodySchema, runListQuerySchema } from '../../shared/schemas/runs';
import { handle } from '../middleware/validate';
import type { Services } from '../services';

export function runsRouter({ runs }: Services): Router {
  const router = Router();
  router.get('/runs', handle({ query: runListQuerySchema }, ({ query }) => runs.list(query)));
  // 202 Accepted: the run is queued; its status and result are read at /api/runs/:id (RFC 9110 §15.3.3).
  router.post('/runs', handle({ body: createRunBodySchema }, ({ body, req }) => runs.create(body, req.user!.id), { status: 202 }));
  router.get('/runs/:id', handle({ params: idParamsSchema }, ({ params }) => runs.get(params.id)));
  router.delete('/runs/:id', handle({ params: idParamsSchema }, ({ params, req }) => runs.cancel(params.id, req.user!.name)));
  return router;
}
