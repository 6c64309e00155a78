// Demo scenario for press releases (issue 7 item 6): a press list, and, once the demo bulletin has an approved or
// distributed version (server/services/bulletins/demo.ts), one release from it that is published and one scheduled
// for a future time (embargoed). Everything goes through the release service (workflow, copy of the figures, the
// scheduler's own publication path). Idempotent: a settings key, claimed first, records that it was done.
import { asc, eq, inArray } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { bulletinVersions, settings, stakeholderLists, stakeholderMembers, users } from '../../db/schema';
import type { Actor } from '../bulletins/service';
import type { Services } from '../index';

const DONE_KEY = 'demo.releases';

/** The demo press list (invented newsrooms under .example, RFC 2606). */
export const DEMO_PRESS_LIST = {
  name: 'Press desk',
  kind: 'press' as const,
  description: 'Newsrooms that receive every press release when it is published.',
  external: [
    { email: 'newsdesk@halden-sound-herald.example', name: 'Halden Sound Herald news desk' },
    { email: 'science@coastal-broadcasting.example', name: 'Coastal Broadcasting science desk' },
  ],
};

export function seedDemoPressList(db: Db): number {
  if (db.select({ id: stakeholderLists.id }).from(stakeholderLists).where(eq(stakeholderLists.name, DEMO_PRESS_LIST.name)).get()) return 0;
  return db.transaction((tx) => {
    const list = tx.insert(stakeholderLists).values({ name: DEMO_PRESS_LIST.name, kind: DEMO_PRESS_LIST.kind, description: DEMO_PRESS_LIST.description }).returning({ id: stakeholderLists.id }).get();
    for (const e of DEMO_PRESS_LIST.external) tx.insert(stakeholderMembers).values({ listId: list.id, email: e.email, name: e.name }).run();
    return 1 + DEMO_PRESS_LIST.external.length;
  });
}

/** 09:00 UTC on the day `days` after `nowMs`. */
export function demoFutureTime(nowMs: number, days = 3): Date {
  const d = new Date(nowMs + days * 86_400_000);
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), 9, 0, 0));
}

/**
 * Make the demo releases once an approved (or distributed) bulletin version exists. Returns 'done' (made now or
 * before) or 'waiting' (no approved bulletin version yet; call again later).
 */
export function seedDemoReleases(services: Services, emailDomain: string, nowMs = Date.now()): 'done' | 'waiting' {
  const { db } = services;
  if (db.select().from(settings).where(eq(settings.key, DONE_KEY)).get()) return 'done';
  const source = db
    .select({ bulletinId: bulletinVersions.bulletinId, version: bulletinVersions.version })
    .from(bulletinVersions)
    .where(inArray(bulletinVersions.status, ['approved', 'distributed']))
    .orderBy(asc(bulletinVersions.id))
    .get();
  if (!source) return 'waiting';
  const actor = (role: string): Actor | null => {
    const u = db.select().from(users).where(eq(users.email, `${role}@${emailDomain}`)).get();
    return u ? { id: u.id, role: u.role, name: u.name } : null;
  };
  const comms = actor('communications');
  const reviewer = actor('reviewer');
  if (!comms || !reviewer) return 'done';
  if (db.insert(settings).values({ key: DONE_KEY, value: new Date(nowMs).toISOString() }).onConflictDoNothing().run().changes !== 1) return 'done';
  seedDemoPressList(db);

  const r = services.releases;
  const approved = (title: string, lead: string) => {
    const created = r.create({ bulletinId: source.bulletinId, version: source.version, title }, comms);
    // The lead sentence, then the generated summary with the odds as the bulletin states them.
    r.update(created.id, { revision: created.revision, summary: `${lead} ${created.summary}`.trim() }, comms);
    r.transition(created.id, { action: 'submit' }, comms, nowMs);
    r.transition(created.id, { action: 'approve', comment: 'Wording matches the approved bulletin.' }, reviewer, nowMs);
    return created.id;
  };

  // Published: scheduled for now, then published through the scheduler's own path (once; press e-mail sent).
  const published = approved('Asteroid HSO-26-N4 will pass the Earth in 2034', 'Our office has assessed the orbit of a newly found asteroid that passes the Earth in September 2034.');
  r.transition(published, { action: 'schedule', publishAt: new Date(nowMs).toISOString(), timeZone: 'UTC' }, comms, nowMs);
  r.publishDue(nowMs);

  // Scheduled (embargoed) for 09:00 UTC three days from now.
  const scheduled = approved('Update on asteroid HSO-26-N4', 'An update on the 2034 close approach of asteroid HSO-26-N4, agreed with the regional government.');
  r.transition(scheduled, { action: 'schedule', publishAt: demoFutureTime(nowMs).toISOString(), timeZone: 'UTC' }, comms, nowMs);
  return 'done';
}
