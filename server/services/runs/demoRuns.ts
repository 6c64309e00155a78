// Demo scenario (issue 5 item 5): each demo object gets an assessment run of its latest solution version on the
// first start, so the screens have results. The runs are queued here and computed by the runner like any other
// (a few seconds each); an object that has any run already is left alone, so a restart queues nothing new.
// Called by server/index.ts only (test servers start without demo runs).
import { eq, sql } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { DEMO_OBJECTS } from '../../db/demo';
import { assessmentRuns, orbitSolutions, trackedObjects, users } from '../../db/schema';
import type { CreateRunParams } from '../../../shared/schemas/runs';
import type { RunService } from './service';

type DemoRunOptions = Omit<CreateRunParams, 'solutionId'>;

/** Windows chosen to include the scenario's events (the asteroid's 2034 encounter) while staying quick. */
const DEMO_RUN_OPTIONS: Record<string, DemoRunOptions> = {
  'HSO-26-N4': { until: '2035-01-01T00:00:00Z', methods: ['linear', 'lov'], clones: 1000, seed: 1, bodies: ['earth'], maxAu: 0.05 },
  'HSO-26-U1': { until: '2030-01-01T00:00:00Z', methods: ['linear', 'lov'], clones: 1000, seed: 1, bodies: ['earth'], maxAu: 0.05 },
  'HSO-23-C2': { until: '2036-01-01T00:00:00Z', methods: ['linear', 'lov'], clones: 1000, seed: 1, bodies: ['earth'], maxAu: 0.05 },
};

/** Queue the demo runs that are missing. Returns the ids queued. */
export function queueDemoRuns(db: Db, runs: RunService, analystEmail: string): number[] {
  const analyst = db.select({ id: users.id }).from(users).where(eq(users.email, analystEmail)).get();
  const queued: number[] = [];
  for (const demo of DEMO_OBJECTS) {
    const options = DEMO_RUN_OPTIONS[demo.object.designation];
    if (!options) continue;
    const object = db.select({ id: trackedObjects.id, latest: trackedObjects.latestSolutionVersion }).from(trackedObjects).where(eq(trackedObjects.designation, demo.object.designation)).get();
    if (!object || object.latest === null) continue;
    const hasRun = db.select({ n: sql<number>`count(*)` }).from(assessmentRuns).where(eq(assessmentRuns.objectId, object.id)).get()!.n > 0;
    if (hasRun) continue;
    const solution = db
      .select({ id: orbitSolutions.id })
      .from(orbitSolutions)
      .where(sql`${orbitSolutions.objectId} = ${object.id} and ${orbitSolutions.version} = ${object.latest}`)
      .get();
    if (!solution) continue;
    queued.push(runs.create({ ...options, solutionId: solution.id }, analyst?.id ?? null).id);
  }
  return queued;
}
