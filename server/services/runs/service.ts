// Assessment runs as records: request (validate against the solution, store 'queued'), read, list, cancel.
// The work itself is done by the runner (runner.ts), which this service wakes through its events.
// No Express here.
import { EventEmitter } from 'node:events';
import { and, desc, eq, inArray, sql, type SQL } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { assessmentRuns, orbitSolutions, trackedObjects, users, type AssessmentRunRow } from '../../db/schema';
import { conflict, HttpError, notFound, unprocessable } from '../../errors';
import { EpochFormatError, parseEpoch, TimeScaleError, utcFromTdbDays } from '../../engine/time';
import type { NormalizedOrbit } from '../../../shared/schemas/orbit';
import type { CreateRunParams, Run, RunListResponse, RunOptions, RunProvenance, RunSummary } from '../../../shared/schemas/runs';
import { runListQuerySchema } from '../../../shared/schemas/runs';
import type { z } from 'zod';

/**
 * Longest window a run may ask for, in years after the solution epoch (Tocsin policy: impact monitoring looks about
 * a century ahead, common practice, no source; the engine's ephemeris and time scales are built for that span).
 */
export const MAX_WINDOW_YEARS = 100;

type RunJoinRow = { r: AssessmentRunRow; designation: string; createdByName: string | null };

const iso = (d: Date | null) => (d ? d.toISOString() : null);

function toSummary({ r, designation, createdByName }: RunJoinRow): RunSummary {
  return {
    id: r.id,
    objectId: r.objectId,
    objectDesignation: designation,
    solutionId: r.solutionId,
    solutionVersion: r.solutionVersion,
    inputSha256: r.inputSha256,
    options: JSON.parse(r.optionsJson) as RunOptions,
    status: r.status,
    progress: { stage: r.progressStage, done: r.progressDone, total: r.progressTotal, rateClonesPerS: r.rateClonesPerS, etaS: r.etaS },
    error: r.error,
    attempts: r.attempts,
    createdBy: r.createdById !== null ? { id: r.createdById, name: createdByName ?? '' } : null,
    createdAt: r.createdAt.toISOString(),
    startedAt: iso(r.startedAt),
    finishedAt: iso(r.finishedAt),
  };
}

function toRun(row: RunJoinRow): Run {
  return {
    ...toSummary(row),
    provenance: row.r.provenanceJson ? (JSON.parse(row.r.provenanceJson) as RunProvenance) : null,
    result: row.r.status === 'done' && row.r.resultJson ? (JSON.parse(row.r.resultJson) as Record<string, unknown>) : null,
  };
}

function bodyIssue(path: string, message: string): HttpError {
  return new HttpError(400, 'validation', 'Some fields are not valid', { issues: [{ in: 'body', path, message }] });
}

/** 422 for a well-formed request that cannot be run; details say which field. */
function refused(field: string, message: string): HttpError {
  return unprocessable(message, { field, issues: [{ in: 'body', path: field, message }] });
}

/** The current time as a TDB epoch (analysis date of Palermo's Delta T). */
function nowEpoch(now: Date): { utc: string; tdbDays: number } {
  const utc = now.toISOString().replace(/\.\d+Z$/, 'Z');
  return { utc, tdbDays: parseEpoch(utc).tdbDays };
}

export interface RunEvents {
  created: [runId: number];
  cancelled: [runId: number];
}

export function createRunService(db: Db) {
  const events = new EventEmitter<RunEvents>();

  function joined(where: SQL | undefined) {
    return db
      .select({ r: assessmentRuns, designation: trackedObjects.designation, createdByName: users.name })
      .from(assessmentRuns)
      .innerJoin(trackedObjects, eq(trackedObjects.id, assessmentRuns.objectId))
      .leftJoin(users, eq(users.id, assessmentRuns.createdById))
      .where(where);
  }

  function rowById(id: number): RunJoinRow {
    const row = joined(eq(assessmentRuns.id, id)).get();
    if (!row) throw notFound('No such run');
    return row;
  }

  return {
    events,

    get(id: number): Run {
      return toRun(rowById(id));
    },

    list(query: z.output<typeof runListQuerySchema>): RunListResponse {
      const conds: SQL[] = [];
      if (query.objectId !== undefined) conds.push(eq(assessmentRuns.objectId, query.objectId));
      if (query.solutionId !== undefined) conds.push(eq(assessmentRuns.solutionId, query.solutionId));
      if (query.status !== undefined) conds.push(eq(assessmentRuns.status, query.status));
      const rows = joined(conds.length ? and(...conds) : undefined)
        .orderBy(desc(assessmentRuns.id))
        .limit(query.limit)
        .all();
      return { runs: rows.map(toSummary) };
    },

    /**
     * Check the request against its solution and store it 'queued' (the runner picks it up).
     * 400: `until` is not an epoch; 422: no such solution, window not after the epoch or too long, a method that
     * needs a covariance the solution does not have.
     */
    create(body: CreateRunParams, actorId: number | null, now = new Date()): Run {
      const solution = db
        .select({ id: orbitSolutions.id, objectId: orbitSolutions.objectId, version: orbitSolutions.version, inputSha256: orbitSolutions.inputSha256, orbitJson: orbitSolutions.orbitJson })
        .from(orbitSolutions)
        .where(eq(orbitSolutions.id, body.solutionId))
        .get();
      if (!solution) throw refused('solutionId', `There is no orbit solution with id ${body.solutionId}`);
      const orbit = JSON.parse(solution.orbitJson) as NormalizedOrbit;

      let untilTdbDays: number;
      try {
        untilTdbDays = parseEpoch(body.until).tdbDays;
      } catch (err) {
        if (err instanceof EpochFormatError) throw bodyIssue('until', err.message);
        if (err instanceof TimeScaleError) throw refused('until', err.message);
        throw err;
      }
      const epochUtc = utcFromTdbDays(orbit.epochTdbDays).utc;
      if (!(untilTdbDays > orbit.epochTdbDays)) {
        throw refused('until', `The window must end after the solution epoch (${epochUtc}, version ${solution.version})`);
      }
      if (untilTdbDays - orbit.epochTdbDays > MAX_WINDOW_YEARS * 365.25) {
        throw refused('until', `The window may reach at most ${MAX_WINDOW_YEARS} years past the solution epoch (${epochUtc})`);
      }
      const needCov = body.methods.filter((m) => m === 'lov' || m === 'mc');
      if (needCov.length && !orbit.covariance) {
        throw refused('methods', `${needCov.join(' and ')} need a covariance, and solution version ${solution.version} has none`);
      }

      const analysis = nowEpoch(now);
      const options: RunOptions = {
        until: body.until,
        untilTdbDays,
        methods: body.methods,
        clones: body.clones,
        seed: body.seed,
        bodies: body.bodies,
        maxAu: body.maxAu,
        analysisUtc: analysis.utc,
        analysisTdbDays: analysis.tdbDays,
      };
      const id = db
        .insert(assessmentRuns)
        .values({
          objectId: solution.objectId,
          solutionId: solution.id,
          solutionVersion: solution.version,
          inputSha256: solution.inputSha256,
          optionsJson: JSON.stringify(options),
          status: 'queued',
          createdById: actorId,
          createdAt: now,
        })
        .returning({ id: assessmentRuns.id })
        .get().id;
      events.emit('created', id);
      return toRun(rowById(id));
    },

    /**
     * Cancel a queued or running run (the runner aborts its engine work on the 'cancelled' event, and its lease
     * heartbeat would notice the status change too). 409 when the run has already finished.
     */
    cancel(id: number, actorName: string): Run {
      const row = rowById(id);
      const changed = db
        .update(assessmentRuns)
        .set({
          status: 'cancelled',
          error: `cancelled by ${actorName}`,
          finishedAt: new Date(),
          leaseOwner: null,
          leaseExpiresAt: null,
          etaS: null,
        })
        .where(and(eq(assessmentRuns.id, id), inArray(assessmentRuns.status, ['queued', 'running'])))
        .run().changes;
      if (!changed) throw conflict(`The run has already finished (${row.r.status}) and cannot be cancelled`, { status: row.r.status });
      events.emit('cancelled', id);
      return toRun(rowById(id));
    },

    /** Number of runs per status (for the runner's log and tests). */
    countByStatus(): Record<string, number> {
      const rows = db.select({ status: assessmentRuns.status, n: sql<number>`count(*)` }).from(assessmentRuns).groupBy(assessmentRuns.status).all();
      return Object.fromEntries(rows.map((r) => [r.status, r.n]));
    },
  };
}
export type RunService = ReturnType<typeof createRunService>;
