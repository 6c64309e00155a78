// User administration: deactivation, invitations, password change, validation, conflicts.
// Sources: the agreed API contract (status codes and shapes); OWASP Session Management Cheat Sheet
// (ending all sessions of a disabled account; renewing sessions after a password change);
// RFC 9110 sections 15.5.10 (409 Conflict) and 15.5.21 (422 Unprocessable Content).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { invitations, sessions, users } from '../../server/db/schema';
import { hashToken } from '../../server/services/invitations';
import { userListResponseSchema, userSchema } from '../../shared/schemas/users';
import { DEMO_USERS, startTestServer, type TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';

let srv: TestServer;
let admin: ApiClient;
beforeAll(async () => {
  srv = await startTestServer();
  admin = new ApiClient(srv.url);
  const a = DEMO_USERS.find((u) => u.role === 'admin')!;
  expect((await admin.signIn(a.email, a.password)).status).toBe(200);
});
afterAll(() => srv?.close());

async function createWithPassword(email: string, role = 'analyst', password = 'correct horse battery') {
  const res = await admin.request('POST', '/api/users', { body: { email, name: 'Test Person', role, password } });
  expect(res.status).toBe(201);
  return res.body as { id: number };
}

describe('listing and creating', () => {
  it('lists the demo users with the agreed fields', async () => {
    const res = await admin.get('/api/users');
    expect(res.status).toBe(200);
    const list = userListResponseSchema.parse(res.body);
    for (const u of DEMO_USERS) expect(list.users.find((x) => x.email === u.email)).toMatchObject({ role: u.role, active: true, invited: false });
    expect(JSON.stringify(res.body)).not.toMatch(/password|hash/i);
  });

  it('creates a user with a password who can then sign in', async () => {
    await createWithPassword('direct@hspdo.example', 'reviewer');
    expect((await new ApiClient(srv.url).signIn('direct@hspdo.example', 'correct horse battery')).status).toBe(200);
  });

  it('refuses a second user with the same e-mail (409), whatever its case', async () => {
    const res = await admin.request('POST', '/api/users', { body: { email: 'DIRECT@hspdo.example', name: 'Dup', role: 'analyst' } });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('conflict');
  });

  it('validates bodies and params with 400 and says where', async () => {
    const bad = await admin.request('POST', '/api/users', { body: { email: 'not-an-email', name: '', role: 'captain', password: 'short', admin: true } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('validation');
    const issues: { in: string; path: string }[] = bad.body.error.details.issues;
    for (const field of ['email', 'name', 'role', 'password']) expect(issues.some((i) => i.in === 'body' && i.path === field)).toBe(true);
    expect(issues.some((i) => /admin/.test(JSON.stringify(i)))).toBe(true); // unknown keys are refused

    const badParam = await admin.get('/api/users/abc');
    expect(badParam.status).toBe(400);
    expect(badParam.body.error.details.issues[0]).toMatchObject({ in: 'params', path: 'id' });

    const empty = await admin.request('PATCH', '/api/users/1', { body: {} });
    expect(empty.status).toBe(400);

    expect((await admin.get('/api/users/999999')).status).toBe(404);
  });
});

describe('deactivation', () => {
  it('ends the user\'s sessions at once and blocks sign-in; reactivation allows it again', async () => {
    const { id } = await createWithPassword('leaver@hspdo.example', 'communications');
    const a = new ApiClient(srv.url);
    const b = new ApiClient(srv.url);
    expect((await a.signIn('leaver@hspdo.example', 'correct horse battery')).status).toBe(200);
    expect((await b.signIn('leaver@hspdo.example', 'correct horse battery')).status).toBe(200);
    expect(srv.db.select().from(sessions).where(eq(sessions.userId, id)).all()).toHaveLength(2);

    const res = await admin.request('PATCH', `/api/users/${id}`, { body: { active: false } });
    expect(res.status).toBe(200);
    expect(userSchema.parse(res.body).active).toBe(false);

    expect(srv.db.select().from(sessions).where(eq(sessions.userId, id)).all()).toHaveLength(0);
    expect((await a.get('/api/session')).status).toBe(401);
    expect((await b.request('PUT', '/api/account/password', { body: { currentPassword: 'correct horse battery', newPassword: 'another long password' } })).status).toBe(401);
    expect((await new ApiClient(srv.url).signIn('leaver@hspdo.example', 'correct horse battery')).status).toBe(401);

    expect((await admin.request('PATCH', `/api/users/${id}`, { body: { active: true } })).status).toBe(200);
    expect((await new ApiClient(srv.url).signIn('leaver@hspdo.example', 'correct horse battery')).status).toBe(200);
  });

  it('takes a role change into account on the next request', async () => {
    const { id } = await createWithPassword('mover@hspdo.example', 'analyst');
    const c = new ApiClient(srv.url);
    await c.signIn('mover@hspdo.example', 'correct horse battery');
    expect((await c.get('/api/users')).status).toBe(403);
    expect((await admin.request('PATCH', `/api/users/${id}`, { body: { role: 'admin' } })).status).toBe(200);
    expect((await c.get('/api/users')).status).toBe(200);
    expect((await c.get('/api/session')).body.user.role).toBe('admin');
  });

  it('does not let an admin deactivate or demote themselves (422)', async () => {
    const me = (await admin.get('/api/session')).body.user.id;
    const res = await admin.request('PATCH', `/api/users/${me}`, { body: { active: false } });
    expect(res.status).toBe(422);
    expect((await admin.request('PATCH', `/api/users/${me}`, { body: { role: 'analyst' } })).status).toBe(422);
  });
});

describe('invitation round trip', () => {
  it('e-mails a one-time link; the invitee chooses a password and signs in', async () => {
    srv.mail.clear();
    const created = await admin.request('POST', '/api/users', { body: { email: 'Invitee@HSPDO.example', name: 'Wren Calloway', role: 'liaison' } });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ email: 'invitee@hspdo.example', invited: true });

    const mail = await srv.mail.waitFor('invitee@hspdo.example');
    expect(mail.subject).toContain('Halden Sound Planetary Defence Office');
    const link = mail.text.match(/https?:\/\/\S+\/invite\/([A-Za-z0-9_-]+)/);
    expect(link).not.toBeNull();
    expect(mail.text).toContain('Wren Calloway');
    expect(mail.html).toContain(`/invite/${link![1]}`);
    expect(link![0].startsWith(srv.url)).toBe(true);
    const token = link![1];

    // Only a hash of the token is stored; the link is valid 7 days.
    const row = srv.db.select().from(invitations).where(eq(invitations.tokenHash, hashToken(token))).get()!;
    expect(row).toBeDefined();
    expect(row.expiresAt.getTime() - row.createdAt.getTime()).toBe(7 * 24 * 3_600_000);

    // Before accepting, the user cannot sign in (there is no password yet).
    expect((await new ApiClient(srv.url).signIn('invitee@hspdo.example', '')).status).toBe(400);

    const visitor = new ApiClient(srv.url);
    const lookup = await visitor.get(`/api/invitations/${token}`);
    expect(lookup.status).toBe(200);
    expect(lookup.body).toEqual({ email: 'invitee@hspdo.example', name: 'Wren Calloway' });

    expect((await visitor.request('POST', `/api/invitations/${token}`, { body: { password: 'short' } })).status).toBe(400);
    expect((await visitor.request('POST', `/api/invitations/${token}`, { body: { password: 'a fine long passphrase' }, csrf: false })).status).toBe(403);
    expect((await visitor.request('POST', `/api/invitations/${token}`, { body: { password: 'a fine long passphrase' } })).status).toBe(200);

    // One-time: the link is dead now.
    expect((await visitor.get(`/api/invitations/${token}`)).status).toBe(404);
    expect((await visitor.request('POST', `/api/invitations/${token}`, { body: { password: 'another fine passphrase' } })).status).toBe(404);

    const signIn = await new ApiClient(srv.url).signIn('invitee@hspdo.example', 'a fine long passphrase');
    expect(signIn.status).toBe(200);
    expect(signIn.body.user.role).toBe('liaison');
  });

  it('refuses expired and unknown tokens with 404, and a fresh invitation replaces the old one', async () => {
    srv.mail.clear();
    const created = await admin.request('POST', '/api/users', { body: { email: 'late@hspdo.example', name: 'Osk Tamsin', role: 'analyst' } });
    const first = (await srv.mail.waitFor('late@hspdo.example')).text.match(/\/invite\/([A-Za-z0-9_-]+)/)![1];
    expect((await admin.request('POST', `/api/users/${created.body.id}/invitation`)).status).toBe(204);
    const all = (await srv.mail.messages()).filter((m) => m.to.includes('late@hspdo.example'));
    expect(all).toHaveLength(2);
    const second = all[1].text.match(/\/invite\/([A-Za-z0-9_-]+)/)![1];
    expect(second).not.toBe(first);
    const visitor = new ApiClient(srv.url);
    expect((await visitor.get(`/api/invitations/${first}`)).status).toBe(404);
    expect((await visitor.get(`/api/invitations/${second}`)).status).toBe(200);

    // Expire it in the database (expiry one day in the past).
    srv.db.update(invitations).set({ expiresAt: new Date(Date.now() - 86_400_000) }).where(eq(invitations.tokenHash, hashToken(second))).run();
    expect((await visitor.get(`/api/invitations/${second}`)).status).toBe(404);
    expect((await visitor.get(`/api/invitations/${'Z'.repeat(43)}`)).status).toBe(404);
  });

  it('will not re-invite a user who already has a password (409)', async () => {
    const analystId = srv.db.select().from(users).where(eq(users.email, 'analyst@hspdo.example')).get()!.id;
    expect((await admin.request('POST', `/api/users/${analystId}/invitation`)).status).toBe(409);
  });
});

describe('change password', () => {
  it('needs the current password (422), a long new one (400), then works and ends other sessions', async () => {
    await createWithPassword('changer@hspdo.example', 'reviewer', 'first long password');
    const c = new ApiClient(srv.url);
    const other = new ApiClient(srv.url);
    await c.signIn('changer@hspdo.example', 'first long password');
    await other.signIn('changer@hspdo.example', 'first long password');

    const wrong = await c.request('PUT', '/api/account/password', { body: { currentPassword: 'not it', newPassword: 'second long password' } });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.code).toBe('unprocessable');

    const short = await c.request('PUT', '/api/account/password', { body: { currentPassword: 'first long password', newPassword: 'elevenchars' } });
    expect(short.status).toBe(400); // 11 characters; the minimum is 12
    expect(short.body.error.details.issues[0].path).toBe('newPassword');

    const ok = await c.request('PUT', '/api/account/password', { body: { currentPassword: 'first long password', newPassword: 'second long password' } });
    expect(ok.status).toBe(204);
    expect((await c.get('/api/session')).status).toBe(200); // this session stays
    expect((await other.get('/api/session')).status).toBe(401); // the other one ends

    expect((await new ApiClient(srv.url).signIn('changer@hspdo.example', 'first long password')).status).toBe(401);
    expect((await new ApiClient(srv.url).signIn('changer@hspdo.example', 'second long password')).status).toBe(200);
  });
});
