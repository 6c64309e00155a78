import { Router } from 'express';
import { idParamsSchema } from '../../shared/schemas/api';
import { createUserBodySchema, updateUserBodySchema, type UserListResponse } from '../../shared/schemas/users';
import { handle } from '../middleware/validate';
import type { Services } from '../services';

export function usersRouter({ users }: Services): Router {
  const router = Router();
  router.get('/users', handle({}, (): UserListResponse => ({ users: users.list() })));
  router.post('/users', handle({ body: createUserBodySchema }, ({ body, req }) => users.create(body, req.user), { status: 201 }));
  router.get('/users/:id', handle({ params: idParamsSchema }, ({ params }) => users.get(params.id)));
  router.patch('/users/:id', handle({ params: idParamsSchema, body: updateUserBodySchema }, ({ params, body, req }) => users.update(params.id, body, req.user!.id)));
  router.post(
    '/users/:id/invitation',
    handle({ params: idParamsSchema }, async ({ params, req }) => {
      await users.reinvite(params.id, req.user);
      return undefined;
    }),
  );
  return router;
}
