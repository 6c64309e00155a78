// Loads the signed-in user for every request (req.user) and builds their ability (req.ability).
// A session whose user is gone or deactivated, or that is older than the absolute limit, is ended here.
import type { RequestHandler } from 'express';
import { defineAbilityFor, type AppAbility } from '../../shared/abilities';
import type { UserRow } from '../db/schema';
import type { AuthService } from '../services/auth';

declare global {
  namespace Express {
    interface Request {
      user: UserRow | null;
      ability: AppAbility;
    }
  }
}

export function currentUser(auth: AuthService, absoluteMs: number): RequestHandler {
  return (req, _res, next) => {
    req.user = null;
    const { userId, signedInAt } = req.session ?? {};
    if (userId !== undefined) {
      const expired = signedInAt === undefined || Date.now() - signedInAt > absoluteMs;
      const user = expired ? null : auth.activeUser(userId);
      if (user) req.user = user;
      else {
        req.ability = defineAbilityFor(null);
        return req.session.destroy(() => next());
      }
    }
    req.ability = defineAbilityFor(req.user ? { id: req.user.id, role: req.user.role } : null);
    next();
  };
}
