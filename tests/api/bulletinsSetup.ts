// Shared setup of the bulletin API tests: signed-in clients per role, assessment runs stored directly from the
// real engine-run fixture (tests/api/fixtures/bulletin-runs.json, made by make-bulletin-runs.ts), and documents
// with linked figures.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { eq } from 'drizzle-orm';
import { expect } from 'vitest';
import { assessmentRuns, orbitSolutions, trackedObjects } from '../../server/db/schema';
import type { BulletinDocument, FigureQuantity } from '../../shared/bulletins/document';
import { bulletinSchema, type Bulletin } from '../../shared/schemas/bulletins';
import type { TestServer } from '../helpers/testServer';
import { ApiClient } from './apiClient';

const here = path.dirname(fileURLToPath(import.meta.url));

export interface FixtureRun {
  analysisUtc: string;
  untilUtc: string;
  solutionVersion: number;
  inputSha256: string;
  result: {
    approaches: { body: string; epochTdbJd: number; palermo: number | null; torino: number | null; distanceKm: number; impactProbability: { linear: number | null } }[];
    provenance: { engineVersion: string };
    palermoCumulative: number | null;
  } & Record<string, unknown>;
}

export const FIXTURE_RUNS = JSON.parse(fs.readFileSync(path.join(here, 'fixtures/bulletin-runs.json'), 'utf8')) as FixtureRun[];

export const NEA = 'HSO-26-N4';

export { signedIn } from './signedIn';

export function neaIds(srv: TestServer): { objectId: number; solutionId: number } {
  const obj = srv.db.select().from(trackedObjects).where(eq(trackedObjects.designation, NEA)).get()!;
  const sol = srv.db.select().from(orbitSolutions).where(eq(orbitSolutions.objectId, obj.id)).get()!;
  return { objectId: obj.id, solutionId: sol.id };
}

/** Store a finished run of the demo NEA with the fixture's result (index 0 or 1), finished at `finishedAt`. */
export function insertRun(srv: TestServer, fixtureIndex: number, finishedAt: Date): number {
  const { objectId, solutionId } = neaIds(srv);
  const f = FIXTURE_RUNS[fixtureIndex];
  const sol = srv.db.select().from(orbitSolutions).where(eq(orbitSolutions.id, solutionId)).get()!;
  return srv.db
    .insert(assessmentRuns)
    .values({
      objectId,
      solutionId,
      solutionVersion: sol.version,
      inputSha256: sol.inputSha256,
      optionsJson: JSON.stringify({ until: f.untilUtc, methods: ['linear'], clones: 1, seed: 1, bodies: ['earth'], maxAu: 0.05, analysisUtc: f.analysisUtc }),
      status: 'done',
      progressDone: 1,
      progressTotal: 1,
      attempts: 1,
      createdAt: new Date(finishedAt.getTime() - 5000),
      startedAt: new Date(finishedAt.getTime() - 4000),
      finishedAt,
      provenanceJson: JSON.stringify({ objectId, designation: NEA, solutionId, solutionVersion: sol.version, inputSha256: sol.inputSha256, methods: ['linear'], clones: null, seed: null }),
      resultJson: JSON.stringify(f.result),
    })
    .returning({ id: assessmentRuns.id })
    .get().id;
}

/** The 2034 Earth encounter of the fixture (the only approach in the window). */
export const ENCOUNTER = { body: FIXTURE_RUNS[0].result.approaches[0].body, epochTdbJd: FIXTURE_RUNS[0].result.approaches[0].epochTdbJd };

export function figure(runId: number, quantity: FigureQuantity, objectLevel = false) {
  return { type: 'linkedFigure' as const, attrs: { runId, quantity, body: objectLevel ? null : ENCOUNTER.body, epochTdbJd: objectLevel ? null : ENCOUNTER.epochTdbJd } };
}

/** A short document: a heading, a paragraph with the Palermo figure, a paragraph with the impact probability. */
export function docWithFigures(runId: number, lead = 'The asteroid passes Earth in September 2034.'): BulletinDocument {
  return {
    type: 'doc',
    content: [
      { type: 'heading', attrs: { level: 2 }, content: [{ type: 'text', text: 'Assessment' }] },
      { type: 'paragraph', content: [{ type: 'text', text: lead }] },
      { type: 'paragraph', content: [{ type: 'text', text: 'Palermo scale: ' }, figure(runId, 'palermo'), { type: 'text', text: '.' }] },
      { type: 'paragraph', content: [{ type: 'text', text: 'Impact probability: ' }, figure(runId, 'impactProbability'), { type: 'text', text: '.' }] },
    ],
  };
}

export async function createBulletin(analyst: ApiClient, objectId: number, document: BulletinDocument, title = 'HSO-26-N4: September 2034 encounter'): Promise<Bulletin> {
  const res = await analyst.request('POST', '/api/bulletins', { body: { objectId, title, document } });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return bulletinSchema.parse(res.body);
}

/** Every figure of a bulletin as the sign-off confirms it. */
export function confirmAll(b: Bulletin) {
  return b.figures.map((f) => ({ index: f.index, runId: f.attrs.runId, quantity: f.attrs.quantity }));
}

export async function transition(client: ApiClient, b: Pick<Bulletin, 'id'>, body: Record<string, unknown>) {
  return client.request('POST', `/api/bulletins/${b.id}/transitions`, { body });
}

/** Drive a new bulletin through submit and approve; returns it approved (version 1). */
export async function approvedBulletin(as: Record<string, ApiClient>, objectId: number, runId: number): Promise<Bulletin> {
  const b = await createBulletin(as.analyst, objectId, docWithFigures(runId));
  expect((await transition(as.analyst, b, { action: 'submit' })).status).toBe(200);
  const res = await transition(as.reviewer, b, { action: 'approve', comment: 'Figures checked against the run.', confirmedFigures: confirmAll(b) });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return bulletinSchema.parse(res.body);
}
