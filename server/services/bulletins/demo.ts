// Demo scenario for bulletins (issue 6 item 7): stakeholder lists (seeded with the users), and, once the demo
// assessment runs are done (they are computed by the runner after the first start, server/services/runs/demoRuns.ts),
// one bulletin about the demo asteroid that is approved and distributed, and one draft in review about the comet
// (or, when the comet's run has no approach to quote, a second one about the asteroid). Every figure is bound to a
// seeded run; nothing is typed in by hand. Idempotent: a settings key records that the bulletins were made.
import { and, desc, eq, inArray } from 'drizzle-orm';
import type { BulletinDocument, DocNode, FigureQuantity } from '../../../shared/bulletins/document';
import { tryExtractFigure } from '../../../shared/bulletins/figures';
import { safeParseAssessment } from '../../../shared/schemas/assessment';
import type { Db } from '../../db/client';
import { assessmentRuns, settings, stakeholderLists, stakeholderMembers as stakeholderMembersTable, trackedObjects, users } from '../../db/schema';
import type { Services } from '../index';
import type { Actor } from './service';

const DONE_KEY = 'demo.bulletins';

/** The demo's stakeholder lists (invented addresses under .example, RFC 2606). */
export const DEMO_LISTS = [
  {
    name: 'Regional government liaisons',
    kind: 'government' as const,
    description: 'Liaison officers of the regional government and its civil protection desk.',
    userRoles: ['liaison'],
    external: [{ email: 'civil.protection@halden-sound.example', name: 'Halden Sound civil protection desk' }],
  },
  {
    name: 'Partner offices',
    kind: 'partner' as const,
    description: 'Observatories and offices that exchange assessments with us.',
    userRoles: [],
    external: [
      { email: 'duty@northreach-observatory.example', name: 'Northreach Observatory duty astronomer' },
      { email: 'assessments@westmark-office.example', name: 'Westmark assessment office' },
    ],
  },
  {
    name: 'Office staff',
    kind: 'internal' as const,
    description: 'Everyone in the office who needs to see what went out.',
    userRoles: ['analyst', 'reviewer', 'communications'],
    external: [],
  },
];

/** Insert the demo lists that are missing (by name). Returns how many rows were added. */
export function seedDemoStakeholderLists(db: Db, emailDomain: string): number {
  let inserted = 0;
  for (const l of DEMO_LISTS) {
    if (db.select({ id: stakeholderLists.id }).from(stakeholderLists).where(eq(stakeholderLists.name, l.name)).get()) continue;
    db.transaction((tx) => {
      const list = tx.insert(stakeholderLists).values({ name: l.name, kind: l.kind, description: l.description }).returning({ id: stakeholderLists.id }).get();
      inserted++;
      for (const role of l.userRoles) {
        const u = tx.select({ id: users.id }).from(users).where(eq(users.email, `${role}@${emailDomain}`)).get();
        if (u) {
          tx.insert(stakeholderMembersTable).values({ listId: list.id, userId: u.id }).run();
          inserted++;
        }
      }
      for (const e of l.external) {
        tx.insert(stakeholderMembersTable).values({ listId: list.id, email: e.email, name: e.name }).run();
        inserted++;
      }
    });
  }
  return inserted;
}

function latestDoneRun(db: Db, designation: string): { runId: number; objectId: number; result: unknown } | null {
  const obj = db.select({ id: trackedObjects.id }).from(trackedObjects).where(eq(trackedObjects.designation, designation)).get();
  if (!obj) return null;
  const r = db
    .select({ id: assessmentRuns.id, resultJson: assessmentRuns.resultJson, solutionId: assessmentRuns.solutionId })
    .from(assessmentRuns)
    .where(and(eq(assessmentRuns.objectId, obj.id), eq(assessmentRuns.status, 'done')))
    .orderBy(desc(assessmentRuns.id))
    .get();
  if (!r || !r.resultJson) return null;
  return { runId: r.id, objectId: obj.id, result: JSON.parse(r.resultJson) };
}

/** Whether the object has a run queued or running. */
function openRuns(db: Db, designation: string): boolean {
  const obj = db.select({ id: trackedObjects.id }).from(trackedObjects).where(eq(trackedObjects.designation, designation)).get();
  if (!obj) return false;
  return db
    .select({ id: assessmentRuns.id })
    .from(assessmentRuns)
    .where(and(eq(assessmentRuns.objectId, obj.id), inArray(assessmentRuns.status, ['queued', 'running'])))
    .limit(1)
    .all().length > 0;
}

const text = (t: string): DocNode => ({ type: 'text', text: t });
const p = (...content: DocNode[]): DocNode => ({ type: 'paragraph', content });
const h = (t: string): DocNode => ({ type: 'heading', attrs: { level: 2 }, content: [text(t)] });

/**
 * A bulletin body quoting the run's first approach of `body` (Earth): only figures the run actually has are
 * inserted (each via extractFigure's checks), so the demo never shows an empty figure.
 */
function demoDocument(run: { runId: number; result: unknown }, intro: string): BulletinDocument | null {
  const parsed = safeParseAssessment(run.result);
  if (!parsed.ok) return null;
  const a = parsed.value.approaches.find((x) => x.body === 'earth');
  if (!a) return null;
  const ref = { runId: run.runId, solutionId: 0, solutionVersion: 0, inputSha256: '' };
  const fig = (quantity: FigureQuantity, objectLevel = false): DocNode | null => {
    const attrs = { runId: run.runId, quantity, body: objectLevel ? null : a.body, epochTdbJd: objectLevel ? null : a.epochTdbJd };
    return tryExtractFigure(run.result, ref, attrs).value ? { type: 'linkedFigure', attrs } : null;
  };
  const sentence = (before: string, f: DocNode | null, after: string): DocNode[] => (f ? [p(text(before), f, text(after))] : []);
  const content: DocNode[] = [
    h('What is known'),
    p(text(intro)),
    ...sentence('Closest approach: ', fig('encounterDate'), '.'),
    ...sentence('Nominal miss distance from the centre of the Earth: ', fig('missDistance'), '.'),
    ...sentence('Speed relative to the Earth before its pull (v-infinity): ', fig('vInfinity'), '.'),
    ...sentence('Estimated diameter from the absolute magnitude: ', fig('diameter', true), '.'),
    h('Risk'),
    ...sentence('Impact probability for this encounter: ', fig('impactProbability'), '.'),
  ];
  const palermo = fig('palermo');
  const torino = fig('torino');
  if (palermo || torino) {
    const parts: DocNode[] = [];
    if (palermo) parts.push(text('Palermo scale: '), palermo);
    if (torino) parts.push(text(palermo ? '; Torino scale: ' : 'Torino scale: '), torino);
    parts.push(text('.'));
    content.push(p(...parts));
  }
  content.push(...sentence('Impact energy if it struck: ', fig('energy'), '.'));
  content.push({ type: 'riskTable', attrs: { runId: run.runId } });
  content.push({ type: 'plot', attrs: { runId: run.runId, kind: 'bplane', body: a.body, epochTdbJd: a.epochTdbJd } });
  content.push(h('What is not known'));
  content.push(p(text('The orbit rests on a short observation arc. The uncertainty region at the encounter is wide, and the figures above will change as observations are added.')));
  content.push(h('What would change the assessment'));
  content.push(p(text('New astrometry over the coming months, especially observations that lengthen the arc, would shrink the uncertainty region and move the impact probability up or down.')));
  return { type: 'doc', content };
}

/**
 * Make the demo bulletins when their runs are done. Returns 'done' (made now or before, or nothing to wait for), or
 * 'waiting' while the demo runs are still queued or running (call again later).
 */
export async function seedDemoBulletins(services: Services, emailDomain: string): Promise<'done' | 'waiting'> {
  const { db } = services;
  if (db.select().from(settings).where(eq(settings.key, DONE_KEY)).get()) return 'done';
  const nea = latestDoneRun(db, 'HSO-26-N4');
  // No finished run yet: wait while one is queued or running; with none coming (none queued, or it failed), give up
  // for this process (nothing is recorded, so the next start tries again).
  if (!nea) return openRuns(db, 'HSO-26-N4') ? 'waiting' : 'done';
  // Wait while the comet's run is still being computed (it may give the second bulletin its figures).
  const comet = latestDoneRun(db, 'HSO-23-C2');
  if (!comet && openRuns(db, 'HSO-23-C2')) return 'waiting';
  const actor = (role: string): Actor | null => {
    const u = db.select().from(users).where(eq(users.email, `${role}@${emailDomain}`)).get();
    return u ? { id: u.id, role: u.role, name: u.name } : null;
  };
  const analyst = actor('analyst');
  const reviewer = actor('reviewer');
  const comms = actor('communications');
  if (!analyst || !reviewer || !comms) return 'done';
  // Claim the key first, so two processes never make the demo twice.
  if (db.insert(settings).values({ key: DONE_KEY, value: new Date().toISOString() }).onConflictDoNothing().run().changes !== 1) return 'done';

  const neaDoc = demoDocument(nea, 'HSO-26-N4 is an Earth-crossing asteroid found in November 2026. Its orbit brings it close to the Earth in September 2034.');
  if (neaDoc) {
    const b = services.bulletins.create({ objectId: nea.objectId, title: 'HSO-26-N4: close approach to Earth in September 2034', document: neaDoc }, analyst);
    services.bulletins.transition(b.id, { action: 'submit' }, analyst);
    const figures = b.figures.map((f) => ({ index: f.index, runId: f.attrs.runId, quantity: f.attrs.quantity }));
    services.bulletins.transition(b.id, { action: 'approve', comment: 'Figures checked against the run; wording agreed with communications.', confirmedFigures: figures }, reviewer);
    const list = db.select({ id: stakeholderLists.id }).from(stakeholderLists).where(eq(stakeholderLists.name, DEMO_LISTS[0].name)).get();
    if (list) await services.distributions.distribute({ bulletinId: b.id, version: 1, listId: list.id }, comms);
  }

  const second = (comet && demoDocument(comet, 'Comet HSO-23-C2 (Halvard) returns to the inner solar system; this bulletin updates the office on its next pass by the Earth.')) ?? null;
  const target = second ? { run: comet!, doc: second, title: 'HSO-23-C2 (Halvard): next pass by the Earth' } : neaDoc
      ? { run: nea, doc: demoDocument(nea, 'Update on HSO-26-N4: observers have re-measured older images; this draft restates the current assessment while the new orbit solution is prepared.') ?? neaDoc, title: 'HSO-26-N4: update after new observations' }
      : null;
  if (target) {
    const d = services.bulletins.create({ objectId: target.run.objectId, title: target.title, document: target.doc }, analyst);
    services.bulletins.transition(d.id, { action: 'submit' }, analyst);
  }
  return 'done';
}
