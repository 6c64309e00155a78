// Orbit-fit jobs as records (issue 8 items 4-5): queue (fix the input: the object's non-excluded observations and
// the observatories they use), read, list, cancel, and adopt a finished fit as the object's next solution version.
// The work is done by the fit runner (fitRunner.ts) on the shared durable job machinery. No Express here.
import crypto from 'node:crypto';
import { EventEmitter } from 'node:events';
import { and, desc, eq, inArray, isNull, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/sqlite-core';
import type { Db } from '../../db/client';
import { orbitFits, orbitSolutions, trackedObjects, users, type OrbitFitRow } from '../../db/schema';
import { conflict, notFound, unprocessable } from '../../errors';
import { fitToSolutionInput } from '../../engine/od';
import { EpochFormatError, parseEpoch, TimeScaleError } from '../../engine/time';
import type { FitSettings, Observatory, OpticalObservation, OrbitDeterminationResult } from '../../../shared/schemas/od';
import type { AdoptFitBody, FitJob } from '../../../shared/schemas/odApi';
import type { JobEvents } from '../jobs/leaseRunner';
import type { ObjectService } from '../objects';
import { opticalOfRow, type AstrometryService } from './astrometry';
import type { ObservatoryService } from './observatories';

/** Fewest observations a fit is queued with (6 unknowns, 2 numbers per observation; Gauss needs 3). */
export const MIN_FIT_OBSERVATIONS = 3;

/** SHA-256 of the fit input as canonical JSON (the observations in input order, then the observatories). */
export function fitInputSha256(observations: readonly OpticalObservation[], observatories: readonly Observatory[]): string {
  return crypto.createHash('sha256').update(JSON.stringify({ observations, observatories })).digest('hex');
}

type FitJoinRow = { f: OrbitFitRow; designation: string; createdByName: string | null; adoptedByName: string | null; adoptedVersion: number | null };

const iso = (d: Date | null) => (d ? d.toISOString() : null);

function toJob(row: FitJoinRow, withResult: boolean): FitJob {
  const { f } = row;
  return {
    id: f.id,
    objectId: f.objectId,
    designation: row.designation,
    status: f.status,
    settings: storedSettings(f.settingsJson),
    progressStage: f.progressStage,
    progressDone: f.progressDone,
    progressTotal: f.progressTotal,
    error: f.error,
    observationCount: f.observationCount,
    observationIds: JSON.parse(f.observationIdsJson) as number[],
    createdAt: f.createdAt.toISOString(),
    createdByName: row.createdByName,
    startedAt: iso(f.startedAt),
    finishedAt: iso(f.finishedAt),
    result: withResult && f.status === 'done' && f.resultJson ? (JSON.parse(f.resultJson) as OrbitDeterminationResult) : null,
    adopted:
      f.adoptedAt && f.adoptedWhich && f.adoptedSolutionId !== null && row.adoptedVersion !== null
        ? { which: f.adoptedWhich, solutionId: f.adoptedSolutionId, solutionVersion: row.adoptedVersion, reason: f.adoptedReason ?? '', byName: row.adoptedByName, at: f.adoptedAt.toISOString() }
        : null,
  };
}

/** Stored settings; fits queued before stationWeights existed read as "no reweighting" (the schema default). */
/** Settings as stored; fields added later get their defaults (fits stored before them ran with those defaults). */
function storedSettings(json: string): FitSettings {
  const raw = JSON.parse(json) as Partial<FitSettings> & Omit<FitSettings, 'stationWeights' | 'ut1MinusUtcSeconds'>;
  return { ...raw, stationWeights: raw.stationWeights ?? [], ut1MinusUtcSeconds: raw.ut1MinusUtcSeconds ?? 0 };
}

function refused(field: string, message: string) {
  return unprocessable(message, { field, issues: [{ in: 'body', path: field, message }] });
}

export function createFitService(db: Db, deps: { objects: ObjectService; astrometry: AstrometryService; observatories: ObservatoryService }) {
  const events = new EventEmitter<JobEvents>();

  function joined(where: SQL | undefined) {
    const adopter = alias(users, 'adopter');
    return db
      .select({ f: orbitFits, designation: trackedObjects.designation, createdByName: users.name, adoptedByName: adopter.name, adoptedVersion: orbitSolutions.version })
      .from(orbitFits)
      .innerJoin(trackedObjects, eq(trackedObjects.id, orbitFits.objectId))
      .leftJoin(users, eq(users.id, orbitFits.createdById))
      .leftJoin(adopter, eq(adopter.id, orbitFits.adoptedById))
      .leftJoin(orbitSolutions, eq(orbitSolutions.id, orbitFits.adoptedSolutionId))
      .where(where);
  }

  function rowById(id: number): FitJoinRow {
    const row = joined(eq(orbitFits.id, id)).get();
    if (!row) throw notFound('No such fit');
    return row;
  }

  return {
    events,

    get(id: number): FitJob {
      return toJob(rowById(id), true);
    },

    list(objectId: number): { fits: FitJob[] } {
      deps.objects.get(objectId);
      return { fits: joined(eq(orbitFits.objectId, objectId)).orderBy(desc(orbitFits.id)).all().map((r) => toJob(r, false)) };
    },

    /**
     * Queue a fit of the object's non-excluded observations with these settings. 404: no such object; 422: fewer
     * than MIN_FIT_OBSERVATIONS usable observations, an initial solution that is not a version of this object, or
     * a reweighted station code that is not in the observatory table.
     */
    create(objectId: number, settings: FitSettings, actorId: number | null, now = new Date()): FitJob {
      deps.objects.get(objectId);
      if (settings.epoch !== null) {
        // The engine reads the epoch when the fit runs; a date it cannot use is refused now, with the reason.
        try {
          parseEpoch(settings.epoch);
        } catch (err) {
          if (err instanceof EpochFormatError || err instanceof TimeScaleError) throw refused('epoch', err.message);
          throw err;
        }
      }
      if (settings.initialSolutionId !== null) {
        const s = db.select({ objectId: orbitSolutions.objectId }).from(orbitSolutions).where(eq(orbitSolutions.id, settings.initialSolutionId)).get();
        if (!s || s.objectId !== objectId) throw refused('initialSolutionId', `Solution ${settings.initialSolutionId} is not a solution version of this object`);
      }
      if (settings.stationWeights.length) {
        // A reweighted station must be in the observatory table (a code with no observations of this object is
        // allowed: the engine names it in the fit's warnings).
        const known = new Set(deps.observatories.byCodes(settings.stationWeights.map((w) => w.stn)).map((o) => o.code));
        const unknown = settings.stationWeights.map((w, i) => ({ stn: w.stn, path: `stationWeights.${i}.stn` })).filter((w) => !known.has(w.stn));
        if (unknown.length) {
          const codes = unknown.map((u) => u.stn).join(', ');
          throw unprocessable(`Unknown observatory code${unknown.length > 1 ? 's' : ''} ${codes} in the station reweighting (not in the observatory table)`, {
            field: 'stationWeights',
            issues: unknown.map((u) => ({ in: 'body', path: u.path, message: `Observatory ${u.stn} is not in the observatory table` })),
          });
        }
      }
      const rows = deps.astrometry.usableRows(objectId);
      if (rows.length < MIN_FIT_OBSERVATIONS) {
        throw refused(
          'observations',
          `A fit needs at least ${MIN_FIT_OBSERVATIONS} observations that are not excluded; this object has ${rows.length}` +
            (rows.length ? '' : ' (upload its astrometry first)'),
        );
      }
      const optical = rows.map(opticalOfRow);
      const observatories = deps.observatories.byCodes([...new Set(optical.map((o) => o.stn))]);
      const id = db
        .insert(orbitFits)
        .values({
          objectId,
          settingsJson: JSON.stringify(settings),
          observationIdsJson: JSON.stringify(rows.map((r) => r.id)),
          observationsSha256: fitInputSha256(optical, observatories),
          observationCount: rows.length,
          observatoriesJson: JSON.stringify(observatories),
          status: 'queued',
          createdById: actorId,
          createdAt: now,
        })
        .returning({ id: orbitFits.id })
        .get().id;
      events.emit('created', id);
      return toJob(rowById(id), true);
    },

    /** Cancel a queued or running fit (the runner aborts its worker on the event). 409 when already finished. */
    cancel(id: number, actorName: string): FitJob {
      const row = rowById(id);
      const changed = db
        .update(orbitFits)
        .set({ status: 'cancelled', error: `cancelled by ${actorName}`, finishedAt: new Date(), leaseOwner: null, leaseExpiresAt: null })
        .where(and(eq(orbitFits.id, id), inArray(orbitFits.status, ['queued', 'running'])))
        .run().changes;
      if (!changed) throw conflict(`The fit has already finished (${row.f.status}) and cannot be cancelled`, { status: row.f.status });
      events.emit('cancelled', id);
      return toJob(rowById(id), true);
    },

    /**
     * Make one of a finished fit's solutions the object's next solution version (source kind 'fit') through the
     * objects service, with the arc, the number of observations used and the RMS filled and the choice and reason
     * in the remark. Once per fit: the adoption is recorded in the same transaction as the new version, so a
     * second adopt (or two at once) gives 409.
     */
    adopt(id: number, body: AdoptFitBody, actorId: number | null): { solutionId: number; version: number } {
      const { f } = rowById(id);
      if (f.status !== 'done' || !f.resultJson) throw conflict(`Only a finished fit can be adopted (this one is ${f.status})`, { status: f.status });
      if (f.adoptedAt) throw conflict('This fit has already been adopted', { solutionId: f.adoptedSolutionId });
      const result = JSON.parse(f.resultJson) as OrbitDeterminationResult;
      const chosen = body.which === 'gravity-only' ? result.gravityOnly : result.nonGrav;
      if (!chosen) throw refused('which', 'This fit has no non-gravitational solution (it was run gravity-only)');
      if (chosen.status === 'failed') throw refused('which', `The ${chosen.label} fit failed${chosen.message ? `: ${chosen.message}` : ''}; it cannot become a solution version`);

      const object = deps.objects.get(f.objectId);
      // Physical parameters the fit does not determine come from the object's latest version, when it has them.
      const latest = object.latestSolutionVersion !== null ? deps.objects.getSolution(f.objectId, object.latestSolutionVersion).orbit : null;
      let input: ReturnType<typeof fitToSolutionInput>;
      try {
        input = fitToSolutionInput(chosen, {
          designation: object.designation,
          name: object.name,
          hMagnitude: latest?.hMagnitude ?? null,
          albedo: latest?.albedo ?? null,
          kind: latest?.kind,
          notes: `Orbit fit #${f.id} (${chosen.label}) of ${result.arc.observations} observations, ${result.arc.firstUtc} to ${result.arc.lastUtc}`,
        });
      } catch (err) {
        throw refused('which', `The ${chosen.label} fit cannot be written as an orbit solution: ${(err as Error).message}`);
      }
      const remark = `adopted from fit #${f.id} (${chosen.label}): ${body.reason}`;
      return db.transaction((tx) => {
        const solution = deps.objects.addSolution(
          f.objectId,
          {
            text: JSON.stringify(input, null, 2),
            sourceKind: 'fit',
            fileName: null,
            fit: { observationArcDays: result.arc.days, observationCount: chosen.observationsUsed, fitRmsArcsec: chosen.rmsArcsec, remark },
          },
          actorId,
        );
        const changed = tx
          .update(orbitFits)
          .set({ adoptedWhich: body.which, adoptedSolutionId: solution.id, adoptedReason: body.reason, adoptedById: actorId, adoptedAt: new Date() })
          .where(and(eq(orbitFits.id, id), eq(orbitFits.status, 'done'), isNull(orbitFits.adoptedAt)))
          .run().changes;
        // Another request adopted it first: roll the new version back with the transaction.
        if (!changed) throw conflict('This fit has already been adopted');
        return { solutionId: solution.id, version: solution.version };
      });
    },
  };
}
export type FitService = ReturnType<typeof createFitService>;
