// Deny by default: every /api request is looked up in shared/routes.ts.
// No entry -> 404 (no handler is reached); public entry -> allowed; otherwise a signed-in user
// (401) whose ability allows the entry's action on its subject (403).
import type { RequestHandler } from 'express';
import { findRoute, type RouteDef } from '../../shared/routes';
import { sendError } from './errorHandler';

declare global {
  namespace Express {
    interface Request {
      /** The shared/routes.ts entry this request matched. */
      route_def?: RouteDef;
    }
  }
}

export function authorize(): RequestHandler {
  return (req, res, next) => {
    const path = req.baseUrl + req.path;
    const def = findRoute(req.method, path);
    if (!def) return sendError(res, 404, 'not_found', `No API route ${req.method} ${path}`);
    req.route_def = def;
    if (def.public) return next();
    if (!req.user) return sendError(res, 401, 'unauthenticated', 'Please sign in');
    if (!req.ability.can(def.action, def.subject)) return sendError(res, 403, 'forbidden', 'You are not allowed to do this');
    next();
  };
}
