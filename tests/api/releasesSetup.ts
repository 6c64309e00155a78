// Shared setup of the release API tests: an approved bulletin version to start from, a press list, a release driven
// to 'approved', and the public routes read without a session.
import { expect } from 'vitest';
import { releaseSchema, type Release } from '../../shared/schemas/releases';
import type { TestServer } from '../helpers/testServer';
import type { ApiClient } from './apiClient';
import { approvedBulletin, insertRun, neaIds } from './bulletinsSetup';

export const PRESS_ADDRESS = 'newsdesk@harbour-gazette.example';

/** An approved bulletin (version 1) with Palermo and impact-probability figures, and a press list. */
export async function releaseFixture(srv: TestServer, as: Record<string, ApiClient>): Promise<{ bulletinId: number }> {
  const { objectId } = neaIds(srv);
  const run = insertRun(srv, 0, new Date('2026-12-01T01:00:00Z'));
  const b = await approvedBulletin(as, objectId, run);
  const lists = (await as.communications.get('/api/stakeholder-lists')).body.lists as { kind: string }[];
  if (!lists.some((l) => l.kind === 'press')) {
    const res = await as.communications.request('POST', '/api/stakeholder-lists', {
      body: { name: 'Press desk', kind: 'press', description: 'Newsrooms', members: [{ email: PRESS_ADDRESS, name: 'Harbour Gazette news desk' }] },
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
  }
  return { bulletinId: b.id };
}

export async function createRelease(as: Record<string, ApiClient>, bulletinId: number, title?: string): Promise<Release> {
  const res = await as.communications.request('POST', '/api/releases', { body: { bulletinId, version: 1, ...(title ? { title } : {}) } });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return releaseSchema.parse(res.body);
}

export async function act(client: ApiClient, id: number, body: Record<string, unknown>) {
  return client.request('POST', `/api/releases/${id}/transitions`, { body });
}

/** Create, submit (communications) and approve (reviewer): the wording locked as version 1. */
export async function approvedRelease(as: Record<string, ApiClient>, bulletinId: number, title: string): Promise<Release> {
  const r = await createRelease(as, bulletinId, title);
  expect((await act(as.communications, r.id, { action: 'submit' })).status).toBe(200);
  const res = await act(as.reviewer, r.id, { action: 'approve' });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return releaseSchema.parse(res.body);
}

/** An ISO time with an explicit zone offset (minutes east of UTC), as a client converting a local time sends it. */
export function isoWithOffset(ms: number, offsetMin: number): string {
  const local = new Date(ms + offsetMin * 60_000).toISOString().slice(0, 23);
  const sign = offsetMin < 0 ? '-' : '+';
  const a = Math.abs(offsetMin);
  return `${local}${sign}${String(Math.floor(a / 60)).padStart(2, '0')}:${String(a % 60).padStart(2, '0')}`;
}

export async function schedule(client: ApiClient, id: number, publishAt: string, timeZone?: string) {
  return client.request('POST', `/api/releases/${id}/schedule`, { body: { publishAt, ...(timeZone ? { timeZone } : {}) } });
}

/** Everything the public can see, fetched without a session: JSON list and item, pages, feed. */
export async function publicView(url: string, slug: string): Promise<{ list: string; item: number; itemBody: string; listPage: string; page: number; pageBody: string; feed: string }> {
  const get = (p: string) => fetch(url + p, { redirect: 'manual' });
  const [list, item, listPage, page, feed] = await Promise.all([get('/api/public/releases'), get(`/api/public/releases/${slug}`), get('/public'), get(`/public/releases/${slug}`), get('/public/feed.atom')]);
  return { list: await list.text(), item: item.status, itemBody: await item.text(), listPage: await listPage.text(), page: page.status, pageBody: await page.text(), feed: await feed.text() };
}

/** Poll until `pred` holds (generous limit: the machine is loaded). */
export async function until<T>(what: string, fn: () => Promise<T>, pred: (v: T) => boolean, timeoutMs = 60_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (pred(v)) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}: ${JSON.stringify(v).slice(0, 500)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
