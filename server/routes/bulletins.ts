// Bulletins, versions and their PDF (issue 6). Thin: validate, call the bulletin service.
import { Router, type Request } from 'express';
import { idParamsSchema } from '../../shared/schemas/api';
import {
  bulletinListQuerySchema,
  createBulletinBodySchema,
  transitionBodySchema,
  updateBulletinBodySchema,
  versionParamsSchema,
  versionQuerySchema,
} from '../../shared/schemas/bulletins';
import { handle } from '../middleware/validate';
import type { Services } from '../services';
import type { Actor } from '../services/bulletins/service';

export function actorOf(req: Request): Actor {
  return { id: req.user!.id, role: req.user!.role, name: req.user!.name };
}

export function bulletinsRouter({ bulletins, distributions }: Services): Router {
  const router = Router();
  router.get('/bulletins', handle({ query: bulletinListQuerySchema }, ({ query }) => bulletins.list(query)));
  router.post('/bulletins', handle({ body: createBulletinBodySchema }, ({ body, req }) => bulletins.create(body, actorOf(req)), { status: 201 }));
  router.get('/bulletins/:id', handle({ params: idParamsSchema }, ({ params, req }) => bulletins.get(params.id, actorOf(req))));
  router.put('/bulletins/:id', handle({ params: idParamsSchema, body: updateBulletinBodySchema }, ({ params, body, req }) => bulletins.update(params.id, body, actorOf(req))));
  router.post(
    '/bulletins/:id/transitions',
    handle({ params: idParamsSchema, body: transitionBodySchema }, ({ params, body, req }) => bulletins.transition(params.id, body, actorOf(req))),
  );
  router.get('/bulletins/:id/versions', handle({ params: idParamsSchema }, ({ params }) => bulletins.versions(params.id)));
  router.get(
    '/bulletins/:id/versions/:version',
    handle({ params: versionParamsSchema, query: versionQuerySchema }, ({ params, query }) => bulletins.version(params.id, params.version, query.against)),
  );
  router.get(
    '/bulletins/:id/versions/:version/pdf',
    handle({ params: versionParamsSchema }, async ({ params, res }) => {
      const { pdf, fileName } = await distributions.versionPdf(params.id, params.version);
      res.type('application/pdf').set('Content-Disposition', `attachment; filename="${fileName}"`).send(pdf);
    }),
  );
  return router;
}
