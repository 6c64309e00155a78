// One origin for API and client: the built client with SPA fallback, a clear notice when the
// client is not built, and /api never falling through to the client. (Common practice, no source.)
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ensureClientBuilt } from '../../server/clientBuild';
import { startTestServer, type TestServer } from '../helpers/testServer';

const servers: TestServer[] = [];
const dirs: string[] = [];
afterAll(async () => {
  for (const s of servers) await s.close();
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
});

describe('client serving', () => {
  it('serves index.html for deep links, static files as they are, and JSON 404 under /api', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tocsin-client-'));
    dirs.push(dir);
    fs.writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>fake client</title><div id="root"></div>');
    fs.mkdirSync(path.join(dir, 'assets'));
    fs.writeFileSync(path.join(dir, 'assets/app.js'), 'console.log(1)');
    const srv = await startTestServer({ seed: false, clientDir: dir });
    servers.push(srv);

    for (const p of ['/', '/admin/users', '/invite/abc']) {
      const res = await fetch(srv.url + p, { headers: { accept: 'text/html' } });
      expect(res.status).toBe(200);
      expect(await res.text()).toContain('fake client');
    }
    const js = await fetch(`${srv.url}/assets/app.js`);
    expect(js.headers.get('content-type')).toMatch(/javascript/);
    const api = await fetch(`${srv.url}/api/admin/users`);
    expect(api.status).toBe(404);
    expect(api.headers.get('content-type')).toMatch(/json/);
  });

  it('says clearly that the client is not built, while the API works', async () => {
    const srv = await startTestServer({ seed: false, clientDir: path.join(os.tmpdir(), 'tocsin-no-such-client-dir') });
    servers.push(srv);
    const res = await fetch(`${srv.url}/`);
    expect(res.status).toBe(503);
    expect(await res.text()).toMatch(/client not built/i);
    expect((await fetch(`${srv.url}/api/health`)).status).toBe(200);
  });

  it('reports a missing client source instead of failing the start', async () => {
    const root = fs.mkdtempSync(path.join(os.tmpdir(), 'tocsin-root-'));
    dirs.push(root);
    const result = await ensureClientBuilt(root);
    expect(result.built).toBe(false);
    expect(result.problem).toMatch(/src\/ or index.html is missing/);
  });
});
