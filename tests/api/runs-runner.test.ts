// The run queue's guarantees with two runners on one SQLite database (as two processes on one file would be):
// every run is claimed by exactly one runner and finishes exactly once; a runner that lost its lease (it stopped
// heartbeating and another runner took the run over) cannot write its late answer.
// The engine is replaced here by a test executor that waits and answers a small JSON naming the runner: these
// tests are about the queue (claim, lease, fencing), which does not depend on what the work computes. The real
// engine path is covered by tests/api/runs.test.ts and by the demo runs below (real engine).
// Source: common practice for lease-based job queues (atomic claim, heartbeat, fencing on the lease owner), no source.
import { spawn } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { assessmentRuns, orbitSolutions, trackedObjects } from '../../server/db/schema';
import type { Executor } from '../../server/services/runs/executor';
import { queueDemoRuns } from '../../server/services/runs/demoRuns';
import { createRunner, type Runner } from '../../server/services/runs/runner';
import { startTestServer, type TestServer } from '../helpers/testServer';

let srv: TestServer;
let solutionId: number;
beforeAll(async () => {
  srv = await startTestServer();
  solutionId = srv.db.select({ id: orbitSolutions.id }).from(orbitSolutions).where(eq(orbitSolutions.version, 1)).limit(1).get()!.id;
});
afterAll(() => srv?.close());

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A stand-in for the engine: waits `ms` (or until aborted) and answers JSON naming who ran it. */
function waitingExecutor(name: string, ms: number, log: { name: string; runId: number; event: 'start' | 'end' | 'abort' }[]): Executor {
  return (job, { signal }) =>
    new Promise((resolve, reject) => {
      log.push({ name, runId: job.runId, event: 'start' });
      const t = setTimeout(() => {
        log.push({ name, runId: job.runId, event: 'end' });
        resolve(JSON.stringify({ object: 'test', ranBy: name, analysisDateUtc: '2026-12-01T00:00:00Z', approaches: [], provenance: {}, palermoCumulative: null, torinoMax: null }));
      }, ms);
      signal.addEventListener('abort', () => {
        clearTimeout(t);
        log.push({ name, runId: job.runId, event: 'abort' });
        reject(new Error('aborted'));
      });
    });
}

const queue = (n: number) => Array.from({ length: n }, () => srv.services.runs.create({ solutionId, until: '2030-01-01T00:00:00Z', methods: ['linear'], clones: 1, seed: 1, bodies: ['earth'], maxAu: 0.05 }, null).id);
const rowOf = (id: number) => srv.db.select().from(assessmentRuns).where(eq(assessmentRuns.id, id)).get()!;

describe('two runners on one database', () => {
  it('claim every run exactly once and finish it once', async () => {
    const log: { name: string; runId: number; event: 'start' | 'end' | 'abort' }[] = [];
    const runners: Runner[] = ['A', 'B'].map((name) =>
      createRunner(srv.db, srv.services.runs, { owner: `test-${name}`, concurrency: 2, pollMs: 20, leaseMs: 5000, executor: waitingExecutor(name, 60, log), log: () => undefined }),
    );
    const ids = queue(12);
    for (const r of runners) r.start();
    await expect.poll(() => ids.every((id) => rowOf(id).status === 'done'), { timeout: 15_000, interval: 50 }).toBe(true);
    for (const r of runners) await r.stop();

    for (const id of ids) {
      const starts = log.filter((e) => e.runId === id && e.event === 'start');
      expect(starts.length, `run ${id}`).toBe(1);
      const row = rowOf(id);
      expect(row.attempts).toBe(1);
      expect(JSON.parse(row.resultJson!).ranBy).toBe(starts[0].name);
      expect(row.leaseOwner).toBeNull();
    }
    // both runners took part (each can hold 2 of the 12 at a time)
    expect(new Set(log.map((e) => e.name)).size).toBe(2);
  });

  it('a runner whose lease ran out cannot store its late answer; the runner that took over does', async () => {
    const log: { name: string; runId: number; event: 'start' | 'end' | 'abort' }[] = [];
    // A: slow, and its heartbeat is far apart, so its 300 ms lease runs out while it works (a stalled process).
    const a = createRunner(srv.db, srv.services.runs, { owner: 'test-slow', leaseMs: 300, heartbeatMs: 60_000, pollMs: 60_000, executor: waitingExecutor('slow', 1500, log), log: () => undefined });
    const [id] = queue(1);
    a.start();
    await expect.poll(() => rowOf(id).leaseOwner, { timeout: 5000, interval: 20 }).toBe('test-slow');
    // B arrives later: requeues the expired run and finishes it quickly.
    await sleep(400);
    const b = createRunner(srv.db, srv.services.runs, { owner: 'test-quick', leaseMs: 5000, pollMs: 20, executor: waitingExecutor('quick', 50, log), log: () => undefined });
    b.start();
    await expect.poll(() => rowOf(id).status, { timeout: 5000, interval: 20 }).toBe('done');
    expect(JSON.parse(rowOf(id).resultJson!).ranBy).toBe('quick');
    expect(rowOf(id).attempts).toBe(2);
    // A finishes its work after B; its 'done' write is refused by the lease condition
    await expect.poll(() => log.some((e) => e.name === 'slow' && e.runId === id && e.event === 'end'), { timeout: 5000, interval: 50 }).toBe(true);
    await sleep(100);
    expect(JSON.parse(rowOf(id).resultJson!).ranBy).toBe('quick');
    expect(rowOf(id).status).toBe('done');
    await a.stop();
    await b.stop();
  });

  it('gives up on a run interrupted maxAttempts times and says why', async () => {
    const [id] = queue(1);
    // three claims by runners that die without a word (lease already expired when the next one looks)
    for (let i = 0; i < 3; i++) {
      srv.db.update(assessmentRuns).set({ status: 'running', attempts: i + 1, leaseOwner: `gone-${i}`, leaseExpiresAt: new Date(Date.now() - 1000) }).where(eq(assessmentRuns.id, id)).run();
    }
    const log: { name: string; runId: number; event: 'start' | 'end' | 'abort' }[] = [];
    const r = createRunner(srv.db, srv.services.runs, { owner: 'test-last', pollMs: 20, maxAttempts: 3, executor: waitingExecutor('last', 10, log), log: () => undefined });
    r.start();
    await expect.poll(() => rowOf(id).status, { timeout: 5000, interval: 20 }).toBe('failed');
    await r.stop();
    expect(rowOf(id).error).toMatch(/interrupted 3 times/);
    expect(log.filter((e) => e.runId === id)).toEqual([]);
  });
});

describe('demo runs', () => {
  it('queues one run per demo object on first start only, and the real engine completes them', async () => {
    const demo = await startTestServer({ runner: { pollMs: 100 } });
    try {
      const analystEmail = 'analyst@hspdo.example';
      const ids = queueDemoRuns(demo.db, demo.services.runs, analystEmail);
      expect(ids.length).toBe(3);
      expect(queueDemoRuns(demo.db, demo.services.runs, analystEmail)).toEqual([]); // a restart queues nothing new
      await expect.poll(() => ids.map((id) => demo.services.runs.get(id).status), { timeout: 120_000, interval: 200 }).toEqual(['done', 'done', 'done']);
      // the asteroid's run finds its designed 2034 encounter (server/db/demo/make-nea.ts) and fills the summary
      const nea = demo.services.objects.list({ page: 1, pageSize: 10, sort: 'designation', q: 'HSO-26-N4' }).items[0];
      expect(nea.nextCloseApproachAt?.slice(0, 10)).toBe('2034-09-17');
      expect(nea.maxImpactProbability).toBeGreaterThan(0);
      expect(nea.lastRunAt).not.toBeNull();
      for (const o of demo.services.objects.list({ page: 1, pageSize: 10, sort: 'designation' }).items) expect(o.lastRunAt, o.designation).not.toBeNull();
    } finally {
      await demo.close();
    }
  }, 150_000);
});

describe('a runner process killed in the middle of a run', () => {
  it('leaves the run to the next start, which takes it over at once (its owner process is gone) and finishes it', async () => {
    const crash = await startTestServer({ runner: false });
    try {
      const neaSolution = crash.db
        .select({ id: orbitSolutions.id })
        .from(orbitSolutions)
        .innerJoin(trackedObjects, eq(trackedObjects.id, orbitSolutions.objectId))
        .where(eq(trackedObjects.designation, 'HSO-26-N4'))
        .get()!.id;
      const id = crash.services.runs.create({ solutionId: neaSolution, until: '2035-01-01T00:00:00Z', methods: ['linear', 'lov'], clones: 1, seed: 1, bodies: ['earth'], maxAu: 0.05 }, null).id;
      const child = spawn(process.execPath, ['--import', 'tsx', 'tests/helpers/runnerProcess.ts', crash.databaseFile], { stdio: ['ignore', 'pipe', 'pipe'] });
      let stderr = '';
      child.stderr.on('data', (d) => (stderr += d));
      const exited = new Promise<void>((resolve) => child.on('exit', () => resolve()));
      const row = () => crash.db.select().from(assessmentRuns).where(eq(assessmentRuns.id, id)).get()!;
      // the child claims the run and gets into the line of variations
      await expect.poll(() => { const r = row(); return r.status === 'running' && r.progressStage === 'lov' && r.progressDone > 0; }, { timeout: 90_000, interval: 50 }).toBe(true);
      const owner = row().leaseOwner!;
      expect(owner.split('/')[1]).toBe(String(child.pid));
      child.kill('SIGKILL');
      await exited;
      // as the crash left it: still 'running', owned by the dead process, lease good for about a minute more
      expect(row()).toMatchObject({ status: 'running', attempts: 1, leaseOwner: owner });
      const leaseEndAtCrash = row().leaseExpiresAt!.getTime();
      expect(leaseEndAtCrash).toBeGreaterThan(Date.now() + 30_000);

      const next = createRunner(crash.db, crash.services.runs, { leaseMs: 60_000, pollMs: 100, log: () => undefined });
      next.start();
      try {
        await expect.poll(() => row().status, { timeout: 90_000, interval: 100 }).toBe('done');
      } finally {
        await next.stop();
      }
      // finished well before the dead owner's lease would have run out: taken over because its process is gone
      expect(row().finishedAt!.getTime()).toBeLessThan(leaseEndAtCrash);
      expect(row()).toMatchObject({ status: 'done', attempts: 2, leaseOwner: null });
      expect(JSON.parse(row().resultJson!).object).toBe('HSO-26-N4');
      expect(stderr).toContain(`run ${id}: claimed by ${owner}`);
    } finally {
      await crash.close();
    }
  }, 240_000);
});
