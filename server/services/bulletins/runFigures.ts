// Figures of a draft against the runs in the database: the value from the bound run, and staleness: a figure is
// out of date when it is bound to a run other than the object's latest completed run (whose value is shown beside
// it), or to a run of an older solution version than the object's latest (a newer solution without a run yet). Synchronous (better-sqlite3), so it can run inside a transaction.
import { and, desc, eq, inArray } from 'drizzle-orm';
import { linkedFigures, type BulletinDocument } from '../../../shared/bulletins/document';
import { tryExtractFigure, type RunRef } from '../../../shared/bulletins/figures';
import type { FigureSnapshot, FigureStatus } from '../../../shared/schemas/bulletins';
import type { Db } from '../../db/client';
import { assessmentRuns, trackedObjects } from '../../db/schema';

export interface LoadedRun {
  ref: RunRef;
  objectId: number;
  status: string;
  result: unknown;
}

type Reader = Pick<Db, 'select'>;

/** Runs by id (result parsed once per call). */
export function loadRuns(db: Reader, ids: readonly number[]): Map<number, LoadedRun> {
  const out = new Map<number, LoadedRun>();
  if (ids.length === 0) return out;
  const rows = db
    .select({
      id: assessmentRuns.id,
      objectId: assessmentRuns.objectId,
      solutionId: assessmentRuns.solutionId,
      solutionVersion: assessmentRuns.solutionVersion,
      inputSha256: assessmentRuns.inputSha256,
      status: assessmentRuns.status,
      resultJson: assessmentRuns.resultJson,
    })
    .from(assessmentRuns)
    .where(inArray(assessmentRuns.id, [...ids]))
    .all();
  for (const r of rows) {
    out.set(r.id, {
      ref: { runId: r.id, solutionId: r.solutionId, solutionVersion: r.solutionVersion, inputSha256: r.inputSha256 },
      objectId: r.objectId,
      status: r.status,
      result: r.status === 'done' && r.resultJson ? JSON.parse(r.resultJson) : null,
    });
  }
  return out;
}

/**
 * The object's latest completed run: status 'done', newest solution version first, then the latest to finish
 * (then the highest id). Null when the object has no completed run.
 */
export function latestCompletedRunId(db: Reader, objectId: number): number | null {
  const row = db
    .select({ id: assessmentRuns.id })
    .from(assessmentRuns)
    .where(and(eq(assessmentRuns.objectId, objectId), eq(assessmentRuns.status, 'done')))
    .orderBy(desc(assessmentRuns.solutionVersion), desc(assessmentRuns.finishedAt), desc(assessmentRuns.id))
    .limit(1)
    .get();
  return row?.id ?? null;
}

/** Every linked figure of a document with its value, staleness and the latest run's value. */
export function figureStatuses(db: Reader, objectId: number, document: BulletinDocument): FigureStatus[] {
  const figures = linkedFigures(document);
  if (figures.length === 0) return [];
  const latestId = latestCompletedRunId(db, objectId);
  const runs = loadRuns(db, [...new Set([...figures.map((f) => f.attrs.runId), ...(latestId !== null ? [latestId] : [])])]);
  const latest = latestId !== null ? runs.get(latestId)! : null;
  const latestSolutionVersion = db.select({ v: trackedObjects.latestSolutionVersion }).from(trackedObjects).where(eq(trackedObjects.id, objectId)).get()?.v ?? null;
  return figures.map(({ index, attrs }) => {
    const run = runs.get(attrs.runId);
    let value: FigureStatus['value'] = null;
    let problem: string | null = null;
    if (!run) problem = `run ${attrs.runId} does not exist`;
    else if (run.objectId !== objectId) problem = `run ${attrs.runId} is a run of another object`;
    else if (run.status !== 'done') problem = `run ${attrs.runId} is ${run.status}, not done`;
    else {
      const r = tryExtractFigure(run.result, run.ref, attrs);
      value = r.value;
      problem = r.problem;
    }
    const newerRun = latest !== null && latest.ref.runId !== attrs.runId;
    const newerSolution = run !== undefined && latestSolutionVersion !== null && run.ref.solutionVersion < latestSolutionVersion;
    const stale = newerRun || newerSolution;
    const latestValue = newerRun && latest ? tryExtractFigure(latest.result, latest.ref, attrs).value : null;
    const staleBecause = newerRun ? ('newerRun' as const) : newerSolution ? ('newerSolution' as const) : null;
    return { index, attrs, value, problem, stale, staleBecause, latestRunId: latestId, latestValue };
  });
}

/** Snapshots for a locked version; null with the problems when a figure has no value. */
export function snapshotFigures(statuses: FigureStatus[]): { snapshots: FigureSnapshot[]; problems: string[] } {
  const problems: string[] = [];
  const snapshots: FigureSnapshot[] = [];
  for (const s of statuses) {
    if (!s.value) problems.push(`figure ${s.index + 1}: ${s.problem ?? 'no value'}`);
    else snapshots.push({ index: s.index, attrs: s.attrs, value: s.value });
  }
  return { snapshots, problems };
}
