// The public side of press releases, without sign-in: JSON under /api/public (marked public in shared/routes.ts)
// and the server-rendered pages and Atom feed under /public (mounted by app.ts before the client). Only published
// releases exist here (server/services/releases/publicSite.ts).
import express, { Router } from 'express';
import { z } from 'zod';
import { handle } from '../middleware/validate';
import type { Services } from '../services';
import { publicCss } from '../services/releases/publicSite';

const slugParamsSchema = z.object({ slug: z.string().min(1).max(200) });

/** JSON: /api/public/releases and /api/public/releases/:slug. */
export function publicApiRouter({ publicSite }: Services): Router {
  const router = Router();
  router.get('/public/releases', handle({}, () => publicSite.list()));
  router.get('/public/releases/:slug', handle({ params: slugParamsSchema }, ({ params }) => publicSite.get(params.slug)));
  return router;
}

/** HTML pages, the stylesheet and the Atom feed under /public. */
export function publicPagesRouter({ publicSite }: Services): Router {
  const router = Router();
  const html = (res: express.Response, status: number, body: string) => res.status(status).set('Cache-Control', 'no-cache').type('html').send(body);
  router.get(['/public', '/public/', '/public/releases', '/public/releases/'], (_req, res) => html(res, 200, publicSite.listPage()));
  router.get('/public/site.css', (_req, res) => res.set('Cache-Control', 'no-cache').type('text/css').send(publicCss()));
  router.get('/public/feed.atom', (_req, res) => res.set('Cache-Control', 'no-cache').type('application/atom+xml; charset=utf-8').send(publicSite.feed()));
  router.get('/public/releases/:slug', (req, res) => {
    const page = publicSite.releasePage(String(req.params.slug));
    html(res, page ? 200 : 404, page ?? publicSite.notFoundPage());
  });
  router.use('/public', (req, res, next) => (req.method === 'GET' || req.method === 'HEAD' ? html(res, 404, publicSite.notFoundPage()) : next()));
  return router;
}
