// Stakeholder lists, distributions and the briefing inbox (issue 6). Thin: validate, call the distribution service.
import { Router } from 'express';
import { idParamsSchema } from '../../shared/schemas/api';
import { acknowledgeBodySchema, createDistributionBodySchema, distributionListQuerySchema, stakeholderListBodySchema } from '../../shared/schemas/bulletins';
import { handle } from '../middleware/validate';
import type { Services } from '../services';
import { actorOf } from './bulletins';

export function distributionsRouter({ distributions }: Services): Router {
  const router = Router();
  router.get('/stakeholder-lists', handle({}, () => distributions.lists()));
  router.post('/stakeholder-lists', handle({ body: stakeholderListBodySchema }, ({ body, req }) => distributions.createList(body, actorOf(req)), { status: 201 }));
  router.get('/stakeholder-lists/:id', handle({ params: idParamsSchema }, ({ params }) => distributions.getList(params.id)));
  router.put('/stakeholder-lists/:id', handle({ params: idParamsSchema, body: stakeholderListBodySchema }, ({ params, body }) => distributions.updateList(params.id, body)));

  router.get('/distributions', handle({ query: distributionListQuerySchema }, ({ query }) => distributions.list(query)));
  router.post('/distributions', handle({ body: createDistributionBodySchema }, ({ body, req }) => distributions.distribute(body, actorOf(req)), { status: 201 }));
  router.get('/distributions/:id', handle({ params: idParamsSchema }, ({ params }) => distributions.get(params.id)));

  router.get('/briefings', handle({}, ({ req }) => distributions.briefings(actorOf(req))));
  router.get('/briefings/:id', handle({ params: idParamsSchema }, ({ params, req }) => distributions.briefing(params.id, actorOf(req))));
  router.get(
    '/briefings/:id/pdf',
    handle({ params: idParamsSchema }, async ({ params, req, res }) => {
      const { pdf, fileName } = await distributions.briefingPdf(params.id, actorOf(req));
      res.type('application/pdf').set('Content-Disposition', `attachment; filename="${fileName}"`).send(pdf);
    }),
  );
  router.post(
    '/briefings/:id/acknowledge',
    handle({ params: idParamsSchema, body: acknowledgeBodySchema }, ({ params, body, req }) => distributions.acknowledge(params.id, actorOf(req), body.comment)),
  );
  return router;
}
