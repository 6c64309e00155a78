// Optical astrometry per object (issue 8 item 1): upload ADES PSV, list, exclude by hand. No Express here.
//
// An upload is all or nothing: the engine's parser (server/engine/od/ades.ts) reports every malformed line, and
// this service adds the office's own checks (observatory codes in the table, the object's designation); any issue
// refuses the whole file (422 INVALID_ASTROMETRY, nothing stored). Lines that repeat an observation the object
// already has (same station and instant: the engine's observationKey) are skipped and listed, not refused, so a
// file can be uploaded again with new nights appended. Batch and observations are written in one transaction.
import crypto from 'node:crypto';
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { astrometryBatches, observations, observatories, trackedObjects, users, type ObservationRow } from '../../db/schema';
import { HttpError, notFound } from '../../errors';
import { observationKey, parseAdesPsv } from '../../engine/od';
import type { AdesIssue, OpticalObservation } from '../../../shared/schemas/od';
import type { AstrometryBatch, AstrometryList, StoredObservation, UploadAstrometryResult } from '../../../shared/schemas/odApi';
import { sameDesignation } from '../objects';

/** Largest accepted ADES file (multer limit and the JSON body's text limit of shared/schemas/odApi.ts). */
export const MAX_ASTROMETRY_FILE_BYTES = 5_000_000;

/** A refused file: answered 422 {error: {code: 'INVALID_ASTROMETRY', message, issues}} by the route. */
export class AstrometryRefusedError extends HttpError {
  constructor(readonly issues: AdesIssue[]) {
    const first = issues
      .slice(0, 3)
      .map((i) => (i.line > 0 ? `line ${i.line}: ${i.message}` : i.message))
      .join('; ');
    super(
      422,
      'INVALID_ASTROMETRY',
      `The astrometry file was refused (${issues.length} problem${issues.length === 1 ? '' : 's'}; nothing was stored): ${first}${issues.length > 3 ? '; …' : ''}`,
      { issues },
    );
  }
}

/** Decode an uploaded file as UTF-8 text (422 INVALID_ASTROMETRY when it is not). */
export function astrometryTextOfUpload(buffer: Buffer): string {
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buffer);
  } catch {
    throw new AstrometryRefusedError([{ line: 0, field: null, message: 'The file is not UTF-8 text (IAU ADES PSV expected)' }]);
  }
  if (text.includes('\u0000')) throw new AstrometryRefusedError([{ line: 0, field: null, message: 'The file contains NUL bytes: not a text file' }]);
  if (!text.trim()) throw new AstrometryRefusedError([{ line: 0, field: null, message: 'The file is empty' }]);
  return text;
}

/** The engine's OpticalObservation of a stored row. */
export function opticalOfRow(r: ObservationRow): OpticalObservation {
  return {
    line: r.line,
    permID: r.permId,
    provID: r.provId,
    trkSub: r.trkSub,
    mode: r.mode,
    stn: r.stn,
    obsTime: r.obsTime,
    obsTimeTdbDays: r.obsTimeTdbDays,
    raDeg: r.raDeg,
    decDeg: r.decDeg,
    rmsRaArcsec: r.rmsRaArcsec,
    rmsDecArcsec: r.rmsDecArcsec,
    rmsCorr: r.rmsCorr,
    astCat: r.astCat,
    mag: r.mag,
    band: r.band,
    remarks: r.remarks,
  };
}

function storedOfRow(r: ObservationRow): StoredObservation {
  return { ...opticalOfRow(r), id: r.id, batchId: r.batchId, excluded: r.excluded, excludedReason: r.excludedReason };
}

export function createAstrometryService(db: Db) {
  function objectRow(objectId: number) {
    const o = db.select({ id: trackedObjects.id, designation: trackedObjects.designation }).from(trackedObjects).where(eq(trackedObjects.id, objectId)).get();
    if (!o) throw notFound('No such object');
    return o;
  }

  function batches(objectId: number, batchId?: number): AstrometryBatch[] {
    return db
      .select({ b: astrometryBatches, createdByName: users.name })
      .from(astrometryBatches)
      .leftJoin(users, eq(users.id, astrometryBatches.createdById))
      .where(batchId === undefined ? eq(astrometryBatches.objectId, objectId) : eq(astrometryBatches.id, batchId))
      .orderBy(desc(astrometryBatches.id))
      .all()
      .map(({ b, createdByName }) => ({
        id: b.id,
        fileName: b.fileName,
        sha256: b.sha256,
        observationCount: b.observationCount,
        duplicatesSkipped: b.duplicatesSkipped,
        createdAt: b.createdAt.toISOString(),
        createdByName,
      }));
  }

  /** The office's checks on top of the parser's: known observatory, the object's own designation. */
  function officeIssues(parsed: OpticalObservation[], designation: string): AdesIssue[] {
    const codes = [...new Set(parsed.map((o) => o.stn))];
    const known = new Set(codes.length ? db.select({ code: observatories.code }).from(observatories).where(inArray(observatories.code, codes)).all().map((r) => r.code) : []);
    const issues: AdesIssue[] = [];
    for (const o of parsed) {
      if (!known.has(o.stn)) issues.push({ line: o.line, field: 'stn', message: `Observatory '${o.stn}' is not in the office's table (an administrator adds it under Observatories)` });
      // permID / provID name the object; trkSub is the observer's own tracklet label and is not checked.
      const ids = [o.permID, o.provID].filter((v): v is string => v !== null && v !== '');
      if (ids.length && !ids.some((id) => sameDesignation(id, designation))) {
        issues.push({ line: o.line, field: o.provID ? 'provID' : 'permID', message: `Designation '${ids.join("' / '")}' is not this object's (${designation})` });
      }
    }
    return issues;
  }

  return {
    list(objectId: number): AstrometryList {
      objectRow(objectId);
      const rows = db.select().from(observations).where(eq(observations.objectId, objectId)).orderBy(asc(observations.obsTimeTdbDays), asc(observations.id)).all();
      return { batches: batches(objectId), observations: rows.map(storedOfRow) };
    },

    /** Non-excluded observations of an object in time order, as stored rows (the input of a fit). */
    usableRows(objectId: number): ObservationRow[] {
      return db
        .select()
        .from(observations)
        .where(and(eq(observations.objectId, objectId), eq(observations.excluded, false)))
        .orderBy(asc(observations.obsTimeTdbDays), asc(observations.id))
        .all();
    },

    upload(objectId: number, input: { fileName: string | null; text: string }, actorId: number | null): UploadAstrometryResult {
      const object = objectRow(objectId);
      const parsed = parseAdesPsv(input.text);
      const issues = [...parsed.issues, ...officeIssues(parsed.observations, object.designation)].sort((a, b) => a.line - b.line);
      if (issues.length) throw new AstrometryRefusedError(issues);

      const sha256 = crypto.createHash('sha256').update(input.text, 'utf8').digest('hex');
      const keyed = parsed.observations.map((o) => ({ o, key: observationKey(o) }));
      const now = new Date();
      const result = db.transaction((tx) => {
        // Existing observations of this object with the same keys (read inside the transaction: a concurrent
        // upload of the same lines cannot slip between the check and the insert).
        const existing = new Map<string, number>();
        const keys = keyed.map((k) => k.key);
        for (let i = 0; i < keys.length; i += 500) {
          const chunk = keys.slice(i, i + 500);
          for (const r of tx
            .select({ id: observations.id, key: observations.obsKey })
            .from(observations)
            .where(and(eq(observations.objectId, objectId), inArray(observations.obsKey, chunk)))
            .all())
            existing.set(r.key, r.id);
        }
        const fresh = keyed.filter((k) => !existing.has(k.key));
        const duplicates = keyed.filter((k) => existing.has(k.key)).map((k) => ({ line: k.o.line, stn: k.o.stn, obsTime: k.o.obsTime, existingId: existing.get(k.key)! }));
        const batchId = tx
          .insert(astrometryBatches)
          .values({
            objectId,
            fileName: input.fileName,
            rawText: input.text,
            sha256,
            observationCount: fresh.length,
            duplicatesSkipped: duplicates.length,
            createdById: actorId,
            createdAt: now,
          })
          .returning({ id: astrometryBatches.id })
          .get().id;
        for (const { o, key } of fresh) {
          tx.insert(observations)
            .values({
              objectId,
              batchId,
              line: o.line,
              permId: o.permID,
              provId: o.provID,
              trkSub: o.trkSub,
              mode: o.mode,
              stn: o.stn,
              obsTime: o.obsTime,
              obsTimeTdbDays: o.obsTimeTdbDays,
              raDeg: o.raDeg,
              decDeg: o.decDeg,
              rmsRaArcsec: o.rmsRaArcsec,
              rmsDecArcsec: o.rmsDecArcsec,
              rmsCorr: o.rmsCorr,
              astCat: o.astCat,
              mag: o.mag,
              band: o.band,
              remarks: o.remarks,
              obsKey: key,
            })
            .run();
        }
        return { batchId, added: fresh.length, duplicates };
      });
      return { batch: batches(objectId, result.batchId)[0], added: result.added, duplicates: result.duplicates };
    },

    /** Exclude an observation from every later fit (with the reason), or take it back. */
    setExcluded(objectId: number, observationId: number, body: { excluded: boolean; reason?: string }, actorId: number | null): StoredObservation {
      objectRow(objectId);
      const row = db.select().from(observations).where(and(eq(observations.id, observationId), eq(observations.objectId, objectId))).get();
      if (!row) throw notFound(`This object has no observation ${observationId}`);
      if (body.excluded && !body.reason) {
        throw new HttpError(422, 'unprocessable', 'Give the reason for excluding this observation', { issues: [{ in: 'body', path: 'reason', message: 'Give the reason for excluding this observation' }] });
      }
      db.update(observations)
        .set(
          body.excluded
            ? { excluded: true, excludedReason: body.reason!, excludedById: actorId, excludedAt: new Date() }
            : { excluded: false, excludedReason: null, excludedById: actorId, excludedAt: new Date() },
        )
        .where(eq(observations.id, observationId))
        .run();
      return storedOfRow(db.select().from(observations).where(eq(observations.id, observationId)).get()!);
    },
  };
}
export type AstrometryService = ReturnType<typeof createAstrometryService>;
