// Sign-in, sign-out, the uniform refusal, CSRF, rate limit, cookies and headers.
// Sources: OWASP Authentication Cheat Sheet ("Authentication and Error Messages": the same generic
// answer whether the user ID or the password was wrong); OWASP Cross-Site Request Forgery
// Prevention Cheat Sheet ("Signed Double-Submit Cookie"); OWASP Session Management Cheat Sheet
// (HttpOnly, SameSite, idle and absolute timeouts, new session ID at sign-in); RFC 6585 section 4
// (429 Too Many Requests); RFC 6265bis (SameSite=Lax).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { abilityFromRules } from '../../shared/abilities';
import { sessionResponseSchema } from '../../shared/schemas/auth';
import { errorBodySchema } from '../../shared/schemas/errors';
import { SqliteSessionStore } from '../../server/services/sessionStore';
import { DEMO_USERS, startTestServer, type TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';

let srv: TestServer;
beforeAll(async () => {
  // A small limit keeps the rate-limit test quick; the production default (10 / 15 min) is checked below.
  srv = await startTestServer({ config: { signInRateLimit: { max: 3, windowMs: 60_000 } } });
});
afterAll(() => srv?.close());

const admin = DEMO_USERS.find((u) => u.role === 'admin')!;
const analyst = DEMO_USERS.find((u) => u.role === 'analyst')!;

describe('sign-in', () => {
  it('signs in every demo user and returns user, rules and a new CSRF token', async () => {
    for (const u of DEMO_USERS) {
      const c = new ApiClient(srv.url);
      const before = await c.fetchCsrf();
      const res = await c.signIn(u.email, u.password);
      expect(res.status).toBe(200);
      const body = sessionResponseSchema.parse(res.body);
      expect(body.user).toMatchObject({ email: u.email, name: u.name, role: u.role });
      // The token is bound to the new session: it changes at sign-in.
      expect(body.csrfToken).not.toBe(before);
      // The rules rebuild into an ability that allows reading one's own account.
      expect(abilityFromRules(body.rules as never).can('read', 'Account')).toBe(true);
      const again = await c.get('/api/session');
      expect(again.status).toBe(200);
      expect(again.body.user.id).toBe(body.user.id);
    }
  });

  it('accepts the e-mail in any case and with spaces around it', async () => {
    const c = new ApiClient(srv.url);
    expect((await c.signIn(`  ${analyst.email.toUpperCase()} `, analyst.password)).status).toBe(200);
  });

  it('sets an httpOnly, SameSite=Lax session cookie and gives a new session id at sign-in', async () => {
    const c = new ApiClient(srv.url);
    const first = await c.signIn(admin.email, admin.password);
    const cookie = first.setCookies.find((s) => s.startsWith('tocsin.sid='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/;\s*Secure/i); // not production: plain http must work locally
    expect(cookie).toMatch(/Expires=/i); // idle expiry travels with the cookie
    const sid1 = c.cookies.get('tocsin.sid');
    await c.signIn(admin.email, admin.password);
    expect(c.cookies.get('tocsin.sid')).not.toBe(sid1);
  });

  it('gives the identical answer for a wrong password, an unknown e-mail and a deactivated user', async () => {
    const adminClient = new ApiClient(srv.url);
    await adminClient.signIn(admin.email, admin.password);
    const created = await adminClient.request('POST', '/api/users', {
      body: { email: 'gone@hspdo.example', name: 'Pell Orrin', role: 'reviewer', password: 'a-long-enough-password' },
    });
    expect(created.status).toBe(201);
    expect((await adminClient.request('PATCH', `/api/users/${created.body.id}`, { body: { active: false } })).status).toBe(200);

    const answers = [];
    for (const [email, password] of [
      [analyst.email, 'not-the-password'],
      ['nobody@hspdo.example', 'not-the-password'],
      ['gone@hspdo.example', 'a-long-enough-password'],
    ]) {
      const res = await new ApiClient(srv.url).signIn(email, password);
      answers.push({ status: res.status, body: res.text });
    }
    expect(answers[0].status).toBe(401);
    expect(errorBodySchema.parse(JSON.parse(answers[0].body)).error.code).toBe('invalid_credentials');
    expect(answers[1]).toEqual(answers[0]);
    expect(answers[2]).toEqual(answers[0]);
  });

  it('refuses a malformed body with 400 and the fields in details', async () => {
    const res = await new ApiClient(srv.url).request('POST', '/api/session', { body: { email: '', extra: 1 } });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation');
    const paths = res.body.error.details.issues.map((i: { path: string }) => i.path);
    expect(paths).toContain('email');
    expect(paths).toContain('password');
  });
});

describe('sign-out', () => {
  it('ends the session (204) and the old cookie no longer works', async () => {
    const c = new ApiClient(srv.url);
    await c.signIn(analyst.email, analyst.password);
    const stolen = c.cookieHeader();
    const out = await c.request('DELETE', '/api/session');
    expect(out.status).toBe(204);
    expect((await c.get('/api/session')).status).toBe(401);
    // Replaying the cookie from before sign-out: the server-side session is gone.
    const replay = await fetch(`${srv.url}/api/session`, { headers: { cookie: stolen } });
    expect(replay.status).toBe(401);
  });

  it('is harmless when not signed in', async () => {
    expect((await new ApiClient(srv.url).request('DELETE', '/api/session')).status).toBe(204);
  });
});

describe('CSRF', () => {
  it('refuses state-changing requests without the header, with a wrong one, or without the cookie', async () => {
    const c = new ApiClient(srv.url);
    await c.signIn(admin.email, admin.password);
    const body = { name: 'Renamed' };
    const id = (await c.get('/api/session')).body.user.id;

    const noHeader = await c.request('PATCH', `/api/users/${id}`, { body, csrf: false });
    expect(noHeader.status).toBe(403);
    expect(noHeader.body.error.code).toBe('csrf');

    const wrong = await c.request('PATCH', `/api/users/${id}`, { body, csrf: 'x'.repeat(64) + '.' + 'y'.repeat(64) });
    expect(wrong.status).toBe(403);
    expect(wrong.body.error.code).toBe('csrf');

    const noCookie = await fetch(`${srv.url}/api/users/${id}`, {
      method: 'PATCH',
      headers: { 'content-type': 'application/json', 'x-csrf-token': c.csrfToken!, cookie: `tocsin.sid=${c.cookies.get('tocsin.sid')}` },
      body: JSON.stringify(body),
    });
    expect(noCookie.status).toBe(403);

    // A token from the anonymous phase is not valid for the signed-in session.
    const anon = new ApiClient(srv.url);
    const anonToken = await anon.fetchCsrf();
    const foreign = await c.request('PATCH', `/api/users/${id}`, { body, csrf: anonToken });
    expect(foreign.status).toBe(403);

    // With the right token it goes through.
    expect((await c.request('PATCH', `/api/users/${id}`, { body: { name: admin.name } })).status).toBe(200);
  });

  it('protects sign-in too', async () => {
    const res = await new ApiClient(srv.url).request('POST', '/api/session', { body: { email: admin.email, password: admin.password }, csrf: false });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });

  it('does not need a token for GET', async () => {
    const c = new ApiClient(srv.url);
    await c.signIn(admin.email, admin.password);
    expect((await fetch(`${srv.url}/api/users`, { headers: { cookie: c.cookieHeader() } })).status).toBe(200);
  });
});

describe('rate limit', () => {
  it('answers 429 after too many failed attempts for one e-mail, even with the right password, and not for another e-mail', async () => {
    const c = new ApiClient(srv.url);
    const reviewer = DEMO_USERS.find((u) => u.role === 'reviewer')!;
    for (let i = 0; i < 3; i++) expect((await c.signIn(reviewer.email, 'wrong-password')).status).toBe(401);
    const blocked = await c.signIn(reviewer.email, reviewer.password);
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('rate_limited');
    // Another e-mail from the same client is counted separately.
    const liaison = DEMO_USERS.find((u) => u.role === 'liaison')!;
    expect((await c.signIn(liaison.email, liaison.password)).status).toBe(200);
  });

  it('defaults to 10 attempts per 15 minutes', async () => {
    const { loadConfig } = await import('../../server/config');
    expect(loadConfig({}).signInRateLimit).toEqual({ max: 10, windowMs: 15 * 60 * 1000 });
  });
});

describe('headers and errors', () => {
  it('sends helmet security headers and no x-powered-by', async () => {
    const res = await fetch(`${srv.url}/api/health`);
    expect(res.headers.get('content-security-policy')).toContain("default-src 'self'");
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    expect(res.headers.get('x-frame-options')).toBe('SAMEORIGIN');
    expect(res.headers.get('x-powered-by')).toBeNull();
    const body = await res.json();
    expect(body.status).toBe('ok');
    expect(body.version).toMatch(/^\d+\.\d+\.\d+/);
    expect(Number.isNaN(Date.parse(body.time))).toBe(false);
  });

  it('answers unknown /api paths with JSON 404 and no stack trace', async () => {
    for (const [method, path] of [
      ['GET', '/api/definitely/not/here'],
      ['POST', '/api/health'],
      ['DELETE', '/api/users'],
    ]) {
      const res = await new ApiClient(srv.url).request(method, path, { body: method === 'GET' ? undefined : {} });
      expect(res.status).toBe(404);
      expect(res.headers.get('content-type')).toMatch(/application\/json/);
      expect(errorBodySchema.parse(res.body).error.code).toBe('not_found');
      expect(res.text).not.toMatch(/at .*\.(ts|js):\d+/);
    }
  });

  it('answers malformed JSON with 400 and no stack trace', async () => {
    const res = await new ApiClient(srv.url).request('POST', '/api/session', { rawBody: '{"email":' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_request');
    expect(res.text).not.toMatch(/at .*\.(ts|js):\d+/);
  });
});

describe('session expiry (store)', () => {
  // 2 h idle and 12 h absolute, the figures agreed for Tocsin; OWASP Session Management Cheat
  // Sheet recommends both an idle and an absolute timeout (values are an application choice).
  it('expires after 2 h idle and after 12 h in any case', async () => {
    let now = Date.UTC(2031, 0, 1);
    const store = new SqliteSessionStore(srv.db, srv.config.session, () => now);
    const get = (sid: string) => new Promise<unknown>((resolve, reject) => store.get(sid, (err, s) => (err ? reject(err) : resolve(s))));
    const sess = { cookie: { originalMaxAge: null }, userId: 1, signedInAt: now } as never;
    store.set('idle-test', sess);
    now += 2 * 3_600_000 - 1000;
    expect(await get('idle-test')).not.toBeNull();
    store.touch('idle-test', sess);
    now += 2 * 3_600_000 - 1000; // active, but idle less than 2 h each time
    expect(await get('idle-test')).not.toBeNull();
    now += 2000 + 2 * 3_600_000;
    expect(await get('idle-test')).toBeNull();

    now = Date.UTC(2031, 0, 2);
    const busy = { cookie: { originalMaxAge: null }, userId: 1, signedInAt: now } as never;
    store.set('absolute-test', busy);
    for (let h = 1; h < 12; h++) {
      now += 3_600_000;
      store.touch('absolute-test', busy);
      expect(await get('absolute-test')).not.toBeNull();
    }
    now += 3_600_000; // 12 h after sign-in although never idle
    expect(await get('absolute-test')).toBeNull();
  });
});
