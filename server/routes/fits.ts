// Orbit-fit jobs (issue 8): queue (202, computed by the fit runner), list per object, read, cancel, adopt.
import { Router } from 'express';
import { idParamsSchema } from '../../shared/schemas/api';
import { adoptFitBodySchema, createFitBodySchema } from '../../shared/schemas/odApi';
import { handle } from '../middleware/validate';
import type { Services } from '../services';

export function fitsRouter({ fits }: Services): Router {
  const router = Router();
  router.get('/objects/:id/fits', handle({ params: idParamsSchema }, ({ params }) => fits.list(params.id)));
  // 202 Accepted: the fit is queued; its progress and result are read at /api/fits/:id (RFC 9110 §15.3.3).
  router.post('/objects/:id/fits', handle({ params: idParamsSchema, body: createFitBodySchema }, ({ params, body, req }) => fits.create(params.id, body, req.user!.id), { status: 202 }));
  router.get('/fits/:id', handle({ params: idParamsSchema }, ({ params }) => fits.get(params.id)));
  router.delete('/fits/:id', handle({ params: idParamsSchema }, ({ params, req }) => fits.cancel(params.id, req.user!.name)));
  router.post('/fits/:id/adopt', handle({ params: idParamsSchema, body: adoptFitBodySchema }, ({ params, body, req }) => fits.adopt(params.id, body, req.user!.id), { status: 201 }));
  return router;
}
