// Builds the Express app (no listen here; server/index.ts and the tests do that).
import fs from 'node:fs';
import path from 'node:path';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import session from 'express-session';
import helmet from 'helmet';
import { apiNotFound, errorHandler } from './middleware/errorHandler';
import { authorize } from './middleware/authorize';
import { createCsrf } from './middleware/csrf';
import { currentUser } from './middleware/currentUser';
import { apiRouters } from './routes';
import { publicPagesRouter } from './routes/public';
import { SESSION_COOKIE } from './routes/session';
import { createServices, type ServiceDeps, type Services } from './services';

export interface AppDeps extends ServiceDeps {
  /** Folder of the built client (index.html + assets); when missing, a notice page is served instead. */
  clientDir?: string;
  /** Where unexpected errors go (default console.error). */
  logError?: (err: unknown) => void;
}

export function buildApp(deps: AppDeps): { app: Express; services: Services } {
  const services = createServices(deps);
  const { config } = deps;
  const production = config.env === 'production';
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxy);

  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // Fonts, styles and scripts all come from this origin (no CDN, no web fonts from the network).
          'font-src': ["'self'", 'data:'],
          'img-src': ["'self'", 'data:', 'blob:'],
          // Over plain http (local use) upgrading would break every request.
          'upgrade-insecure-requests': production ? [] : null,
        },
      },
      strictTransportSecurity: production,
    }),
  );

  const csrf = createCsrf(config.sessionSecret, production);
  const api = express.Router();
  // ADES astrometry may be sent as JSON text (shared/schemas/odApi.ts allows 5 MB of text; JSON escaping adds a
  // little): that one path gets a larger limit, everything else 1 MB. body-parser skips a body already parsed.
  api.post('/objects/:id/astrometry', express.json({ limit: '6mb' }));
  api.use(express.json({ limit: '1mb' }));
  api.use(cookieParser());
  api.use(
    session({
      name: SESSION_COOKIE,
      secret: config.sessionSecret,
      store: services.sessionStore,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      unset: 'destroy',
      cookie: { httpOnly: true, sameSite: 'lax', secure: production, maxAge: config.session.idleMs, path: '/' },
    }),
  );
  api.use(currentUser(services.auth, config.session.absoluteMs));
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(authorize());
  api.use(csrf.protect);
  for (const router of apiRouters(services, csrf)) api.use(router);
  api.use(apiNotFound);
  api.use(errorHandler(deps.logError));
  app.use('/api', api);
  // The public release pages and feed (server-rendered, no sign-in; issue 7).
  app.use(publicPagesRouter(services));

  serveClient(app, deps.clientDir);
  app.use(errorHandler(deps.logError));
  return { app, services };
}

export function createApp(deps: AppDeps): Express {
  return buildApp(deps).app;
}

/** Serve the built client with SPA fallback: every non-/api GET that wants HTML gets index.html. */
function serveClient(app: Express, clientDir: string | undefined): void {
  const index = clientDir ? path.join(clientDir, 'index.html') : undefined;
  const built = index !== undefined && fs.existsSync(index);
  if (built) app.use(express.static(clientDir!, { index: false, maxAge: '1h' }));
  app.use((req, res, next) => {
    if ((req.method !== 'GET' && req.method !== 'HEAD') || (req.path === '/api' || req.path.startsWith('/api/'))) return next();
    if (built) {
      res.set('Cache-Control', 'no-cache');
      return res.sendFile(index!);
    }
    res
      .status(503)
      .type('html')
      .send(
        '<!doctype html><meta charset="utf-8"><title>Tocsin</title><h1>Tocsin: client not built</h1>' +
          '<p>The API is running under <code>/api</code>, but the web client has not been built. Run <code>npm run build</code> and reload.</p>',
      );
  });
}
