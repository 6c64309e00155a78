// The routers of the API, mounted under /api by app.ts. A new resource adds its router here and
// its routes to shared/routes.ts (without a table entry its handler can never be reached).
import type { Router } from 'express';
import type { Csrf } from '../middleware/csrf';
import type { Services } from '../services';
import { accountRouter } from './account';
import { astrometryRouter } from './astrometry';
import { bulletinsRouter } from './bulletins';
import { distributionsRouter } from './distributions';
import { fitsRouter } from './fits';
import { healthRouter } from './health';
import { invitationsRouter } from './invitations';
import { objectsRouter } from './objects';
import { observatoriesRouter } from './observatories';
import { publicApiRouter } from './public';
import { releasesRouter } from './releases';
import { runsRouter } from './runs';
import { sessionRouter } from './session';
import { usersRouter } from './users';

export function apiRouters(services: Services, csrf: Csrf): Router[] {
  return [healthRouter(csrf), sessionRouter(services, csrf), accountRouter(services), usersRouter(services), invitationsRouter(services), objectsRouter(services), runsRouter(services), observatoriesRouter(services), astrometryRouter(services), fitsRouter(services), bulletinsRouter(services), distributionsRouter(services), releasesRouter(services), publicApiRouter(services)];
}
