import fs from 'node:fs';
import { Router } from 'express';
import type { HealthResponse } from '../../shared/schemas/api';
import type { Csrf } from '../middleware/csrf';
import { handle } from '../middleware/validate';

const VERSION: string = JSON.parse(fs.readFileSync(new URL('../../package.json', import.meta.url), 'utf8')).version;

export function healthRouter(csrf: Csrf): Router {
  const router = Router();
  router.get('/health', handle({}, (): HealthResponse => ({ status: 'ok', version: VERSION, time: new Date().toISOString() })));
  router.get('/csrf', handle({}, ({ req, res }) => ({ csrfToken: csrf.token(req, res) })));
  return router;
}
