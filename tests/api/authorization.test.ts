// Every role (and an anonymous visitor) against every route of shared/routes.ts. The expected
// answer comes from the same ability definition the server uses, so adding a route to the table
// adds it here automatically; a route whose handler is missing, or that the middleware lets
// through wrongly, fails. Status meanings: RFC 9110 sections 15.5.2 (401), 15.5.4 (403), 15.5.5 (404).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { defineAbilityFor } from '../../shared/abilities';
import { ROLES, type Role } from '../../shared/roles';
import { ROUTES, findRoute, type RouteDef } from '../../shared/routes';
import { errorBodySchema } from '../../shared/schemas/errors';
import { DEMO_USERS, startTestServer, type TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';

let srv: TestServer;
const clients = new Map<Role | 'anonymous', ApiClient>();
const ids = new Map<Role, number>();

// Sign-out last, so it does not end the session the other requests use.
const ORDERED: RouteDef[] = [...(ROUTES as readonly RouteDef[])].sort(
  (a, b) => Number(a.method === 'DELETE' && a.path === '/api/session') - Number(b.method === 'DELETE' && b.path === '/api/session'),
);

beforeAll(async () => {
  srv = await startTestServer();
  clients.set('anonymous', new ApiClient(srv.url));
  for (const u of DEMO_USERS) {
    const c = new ApiClient(srv.url);
    const res = await c.signIn(u.email, u.password);
    expect(res.status).toBe(200);
    clients.set(u.role, c);
    ids.set(u.role, res.body.user.id);
  }
});
afterAll(() => srv?.close());

/** Fill path parameters with values that exist (a demo user id) or are well-formed. */
function concretePath(path: string): string {
  return path.replace(':id', String(ids.get('analyst'))).replace(':token', 'A'.repeat(43));
}

describe('the route table', () => {
  it('has unique method+path pairs and only /api paths', () => {
    const keys = ROUTES.map((r) => `${r.method} ${r.path}`);
    expect(new Set(keys).size).toBe(keys.length);
    for (const r of ROUTES) expect(r.path.startsWith('/api/')).toBe(true);
  });

  it('matches each concrete path back to its own entry', () => {
    for (const r of ROUTES) expect(findRoute(r.method, concretePath(r.path))).toBe(r);
  });

  it('refuses an /api path that is not in the table with a JSON 404', async () => {
    const res = await clients.get('admin')!.get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(errorBodySchema.parse(res.body).error.code).toBe('not_found');
  });
});

// Facts from the agreed contract, checked independently of the table: admin manages users,
// every signed-in user reads their own account, nobody else may list users.
describe('the contract in a few fixed cases', () => {
  it.each(ROLES)('%s: GET /api/users is for admins only', async (role) => {
    const res = await clients.get(role)!.get('/api/users');
    expect(res.status).toBe(role === 'admin' ? 200 : 403);
  });
  it('anonymous: GET /api/users is 401, GET /api/health is 200', async () => {
    expect((await clients.get('anonymous')!.get('/api/users')).status).toBe(401);
    expect((await clients.get('anonymous')!.get('/api/health')).status).toBe(200);
  });
});

const who: (Role | 'anonymous')[] = ['anonymous', ...ROLES];
describe.each(who)('as %s', (role) => {
  it.each(ORDERED.map((r) => [`${r.method} ${r.path}`, r] as const))('%s is allowed or refused as the ability says', async (_name, route) => {
    const client = clients.get(role)!;
    const userId = role === 'anonymous' ? null : ids.get(role)!;
    const ability = defineAbilityFor(userId === null ? null : { id: userId, role: role as Role });
    const res = await client.request(route.method, concretePath(route.path), { body: route.method === 'GET' ? undefined : {} });

    // Never "no such route": the table and the handlers agree.
    if (res.status === 404) expect(res.body?.error?.message ?? '').not.toMatch(/^No API route/);
    // Always the uniform error body on failure.
    if (res.status >= 400) expect(errorBodySchema.safeParse(res.body).success).toBe(true);

    if (route.public) {
      expect([401, 403]).not.toContain(res.status);
    } else if (userId === null) {
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    } else if (ability.can(route.action, route.subject)) {
      expect([401, 403]).not.toContain(res.status);
    } else {
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
  });
});
