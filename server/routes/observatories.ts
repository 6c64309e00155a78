// The office's observatory table (issue 8). Bodies are checked by the service with observatorySchema (422 with
// zod's messages, as the contract of issue 8 asks, rather than the generic 400).
import { Router } from 'express';
import { z } from 'zod';
import { observatoryCodeSchema } from '../../shared/schemas/od';
import { handle } from '../middleware/validate';
import type { Services } from '../services';
import { parseObservatory } from '../services/od/observatories';

const codeParamsSchema = z.object({ code: observatoryCodeSchema });

export function observatoriesRouter({ observatories }: Services): Router {
  const router = Router();
  router.get('/observatories', handle({}, () => observatories.list()));
  router.post('/observatories', handle({}, ({ req }) => observatories.create(parseObservatory(req.body), req.user!.id), { status: 201 }));
  router.put('/observatories/:code', handle({ params: codeParamsSchema }, ({ params, req }) => observatories.update(params.code, parseObservatory(req.body), req.user!.id)));
  router.delete('/observatories/:code', handle({ params: codeParamsSchema }, ({ params }) => observatories.remove(params.code)));
  return router;
}
