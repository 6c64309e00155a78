// Tracked objects and their orbit-solution versions. No Express here.
// A solution is read by the engine's input layer (server/engine/input/solution.ts); a refused input stores
// nothing and comes back as 422 with the engine's line- or field-precise issues. Versions are only ever
// inserted (1, 2, 3 ... per object, in one transaction with the object's summary columns), never updated.
import { and, asc, desc, eq, sql, type SQL } from 'drizzle-orm';
import type { Db } from '../db/client';
import { orbitSolutions, trackedObjects, users, type OrbitSolutionRow, type TrackedObjectRow } from '../db/schema';
import { conflict, notFound, unprocessable } from '../errors';
import { loadOrbitSolution, OrbitInputError, solutionFromTocsinJson } from '../engine/input/solution';
import { utcFromTdbDays } from '../engine/time';
import type { NormalizedOrbit } from '../../shared/schemas/orbit';
import type {
  ClassificationSummary,
  CompareResponse,
  CompareRow,
  CreateObjectBody,
  ObjectListParams,
  ObjectListResponse,
  ObjectSortColumn,
  Solution,
  SolutionFitFields,
  SolutionSummary,
  TrackedObject,
  UpdateObjectBody,
  UploadIssue,
} from '../../shared/schemas/objects';
import {
  classifySolution,
  ELEMENT_INFO,
  ELEMENT_KEYS,
  ELEMENTS_METHOD,
  elementsWithSigma,
  nonGravTerms,
  nonGravWithSigma,
} from './orbitElements';

/** Largest accepted solution file (also the multer limit in routes/objects.ts). */
export const MAX_SOLUTION_FILE_BYTES = 256 * 1024;

const SORT_COLUMNS = {
  designation: trackedObjects.designation,
  name: trackedObjects.name,
  kind: trackedObjects.kind,
  createdAt: trackedObjects.createdAt,
  latestSolutionAt: trackedObjects.latestSolutionAt,
  nextCloseApproachAt: trackedObjects.nextCloseApproachAt,
  maxImpactProbability: trackedObjects.maxImpactProbability,
  cumulativePalermo: trackedObjects.cumulativePalermo,
  maxTorino: trackedObjects.maxTorino,
  lastRunAt: trackedObjects.lastRunAt,
} satisfies Record<ObjectSortColumn, unknown>;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

type ObjectJoinRow = { o: TrackedObjectRow; createdByName: string | null };

function toTrackedObject({ o, createdByName }: ObjectJoinRow): TrackedObject {
  return {
    id: o.id,
    designation: o.designation,
    name: o.name,
    kind: o.kind,
    notes: o.notes,
    watch: o.watch,
    createdBy: o.createdById !== null ? { id: o.createdById, name: createdByName ?? '' } : null,
    createdAt: o.createdAt.toISOString(),
    updatedAt: o.updatedAt.toISOString(),
    solutionCount: o.solutionCount,
    latestSolutionVersion: o.latestSolutionVersion,
    latestSolutionAt: iso(o.latestSolutionAt),
    nextCloseApproachAt: iso(o.nextCloseApproachAt),
    maxImpactProbability: o.maxImpactProbability,
    cumulativePalermo: o.cumulativePalermo,
    maxTorino: o.maxTorino,
    lastRunAt: iso(o.lastRunAt),
  };
}

type SolutionJoinRow = { s: OrbitSolutionRow; createdByName: string | null };

function toSolutionSummary({ s, createdByName }: SolutionJoinRow): SolutionSummary {
  return {
    id: s.id,
    objectId: s.objectId,
    version: s.version,
    sourceKind: s.sourceKind,
    fileName: s.fileName,
    inputSha256: s.inputSha256,
    epochTdbDays: s.epochTdbDays,
    epochUtc: utcFromTdbDays(s.epochTdbDays).utc,
    observationArcDays: s.observationArcDays,
    observationCount: s.observationCount,
    fitRmsArcsec: s.fitRmsArcsec,
    forceModel: s.forceModel,
    nonGravTerms: s.nonGravTerms ? (s.nonGravTerms.split(',') as SolutionSummary['nonGravTerms']) : [],
    remark: s.remark,
    classification: JSON.parse(s.classificationJson) as ClassificationSummary,
    createdBy: s.createdById !== null ? { id: s.createdById, name: createdByName ?? '' } : null,
    createdAt: s.createdAt.toISOString(),
  };
}

const NON_GRAV_LABELS = { a1: 'A1 (radial)', a2: 'A2 (transverse)', a3: 'A3 (normal)' } as const;

function toSolution(row: SolutionJoinRow): Solution {
  const orbit = JSON.parse(row.s.orbitJson) as NormalizedOrbit;
  const el = elementsWithSigma(orbit);
  const ng = nonGravWithSigma(orbit);
  return {
    ...toSolutionSummary(row),
    orbit,
    rawText: row.s.rawText,
    elements: ELEMENT_KEYS.map((key) => ({ key, label: ELEMENT_INFO[key].label, unit: ELEMENT_INFO[key].unit, ...el[key] })),
    nonGrav: (['a1', 'a2', 'a3'] as const).map((key) => ({ key, label: NON_GRAV_LABELS[key], unit: 'AU/d²', ...ng[key] })),
  };
}

/** Designations compare without case and with runs of spaces collapsed ("hs 2026 qa" = "HS  2026 QA"). */
export function sameDesignation(a: string, b: string): boolean {
  const norm = (s: string) => s.trim().replace(/\s+/g, ' ').toUpperCase();
  return norm(a) === norm(b);
}

function refused(issues: UploadIssue[]): never {
  throw unprocessable('The orbit solution was refused: nothing was stored', { issues });
}

/** Decode an uploaded file as UTF-8 text, refusing binary content. */
export function textOfUpload(buffer: Buffer): string {
  if (buffer.length === 0) refused([{ where: 'file', message: 'the file is empty' }]);
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buffer);
  } catch {
    refused([{ where: 'file', message: 'the file is not UTF-8 text (CCSDS OPM KVN or Tocsin JSON expected)' }]);
  }
  if (text.includes('\u0000')) refused([{ where: 'file', message: 'the file contains NUL bytes: not a text file' }]);
  if (!text.trim()) refused([{ where: 'file', message: 'the file contains only white space' }]);
  return text;
}

export interface SolutionInput {
  text: string;
  /** 'fit': Tocsin JSON written from an orbit fit (server/services/od/fits.ts adopt). */
  sourceKind: 'opm' | 'json' | 'form' | 'fit';
  fileName: string | null;
  fit: SolutionFitFields;
}

export function createObjectService(db: Db) {
  function objectRow(id: number): TrackedObjectRow {
    const found = db.select().from(trackedObjects).where(eq(trackedObjects.id, id)).get();
    if (!found) throw notFound('No such object');
    return found;
  }

  function objectById(id: number): TrackedObject {
    const row = db
      .select({ o: trackedObjects, createdByName: users.name })
      .from(trackedObjects)
      .leftJoin(users, eq(users.id, trackedObjects.createdById))
      .where(eq(trackedObjects.id, id))
      .get();
    if (!row) throw notFound('No such object');
    return toTrackedObject(row);
  }

  function whereOf(p: ObjectListParams): SQL | undefined {
    const conds: SQL[] = [];
    if (p.q) {
      const pattern = `%${p.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
      conds.push(sql`(${trackedObjects.designation} like ${pattern} escape '\\' or ${trackedObjects.name} like ${pattern} escape '\\')`);
    }
    if (p.kind) conds.push(eq(trackedObjects.kind, p.kind));
    if (p.watch !== undefined) conds.push(eq(trackedObjects.watch, p.watch));
    return conds.length ? and(...conds) : undefined;
  }

  /** The page query (exported so tests can EXPLAIN it). */
  function pageQuery(p: ObjectListParams) {
    const descending = p.sort.startsWith('-');
    const column = SORT_COLUMNS[(descending ? p.sort.slice(1) : p.sort) as ObjectSortColumn];
    const dir = descending ? desc : asc;
    return db
      .select({ o: trackedObjects, createdByName: users.name })
      .from(trackedObjects)
      .leftJoin(users, eq(users.id, trackedObjects.createdById))
      .where(whereOf(p))
      .orderBy(dir(column), dir(trackedObjects.id))
      .limit(p.pageSize)
      .offset((p.page - 1) * p.pageSize);
  }

  function solutionRow(objectId: number, version: number): SolutionJoinRow {
    const row = db
      .select({ s: orbitSolutions, createdByName: users.name })
      .from(orbitSolutions)
      .leftJoin(users, eq(users.id, orbitSolutions.createdById))
      .where(and(eq(orbitSolutions.objectId, objectId), eq(orbitSolutions.version, version)))
      .get();
    if (!row) {
      objectRow(objectId);
      throw notFound(`This object has no solution version ${version}`);
    }
    return row;
  }

  return {
    pageQuery,

    list(p: ObjectListParams): ObjectListResponse {
      const items = pageQuery(p).all().map(toTrackedObject);
      const total = db.select({ n: sql<number>`count(*)` }).from(trackedObjects).where(whereOf(p)).get()!.n;
      return { items, total, page: p.page, pageSize: p.pageSize, sort: p.sort };
    },

    get: objectById,

    create(body: CreateObjectBody, actorId: number | null): TrackedObject {
      const designation = body.designation.replace(/\s+/g, ' ');
      const clash = db
        .select({ id: trackedObjects.id, designation: trackedObjects.designation })
        .from(trackedObjects)
        .where(sql`upper(${trackedObjects.designation}) = upper(${designation})`)
        .get();
      if (clash) throw conflict(`An object with the designation ${clash.designation} already exists`, { field: 'designation', id: clash.id });
      let id: number;
      try {
        id = db
          .insert(trackedObjects)
          .values({
            designation,
            name: body.name ? body.name : null,
            kind: body.kind,
            notes: body.notes ?? '',
            watch: body.watch ?? false,
            createdById: actorId,
          })
          .returning({ id: trackedObjects.id })
          .get().id;
      } catch (err) {
        if (String((err as Error).message).includes('UNIQUE')) throw conflict('An object with this designation already exists', { field: 'designation' });
        throw err;
      }
      return objectById(id);
    },

    update(id: number, body: UpdateObjectBody): TrackedObject {
      objectRow(id);
      db.update(trackedObjects)
        .set({
          ...(body.name !== undefined ? { name: body.name ? body.name : null } : {}),
          ...(body.notes !== undefined ? { notes: body.notes } : {}),
          ...(body.watch !== undefined ? { watch: body.watch } : {}),
          updatedAt: new Date(),
        })
        .where(eq(trackedObjects.id, id))
        .run();
      return objectById(id);
    },

    listSolutions(objectId: number): SolutionSummary[] {
      objectRow(objectId);
      return db
        .select({ s: orbitSolutions, createdByName: users.name })
        .from(orbitSolutions)
        .leftJoin(users, eq(users.id, orbitSolutions.createdById))
        .where(eq(orbitSolutions.objectId, objectId))
        .orderBy(desc(orbitSolutions.version))
        .all()
        .map(toSolutionSummary);
    },

    getSolution(objectId: number, version: number): Solution {
      return toSolution(solutionRow(objectId, version));
    },

    /**
     * Read, check and store a new version. Refusals (422, nothing stored): the engine's issues; a designation
     * that is not the object's; an orbit whose elements cannot be formed.
     */
    addSolution(objectId: number, input: SolutionInput, actorId: number | null): Solution {
      const object = objectRow(objectId);
      let orbit: NormalizedOrbit;
      try {
        orbit = input.sourceKind === 'form' || input.sourceKind === 'fit' ? solutionFromTocsinJson(input.text) : loadOrbitSolution(input.text);
      } catch (err) {
        if (err instanceof OrbitInputError) refused(err.issues);
        throw err;
      }
      const sourceKind = input.sourceKind === 'form' || input.sourceKind === 'fit' ? input.sourceKind : orbit.source.format === 'ccsds-opm-kvn' ? 'opm' : 'json';
      if (!sameDesignation(orbit.designation, object.designation)) {
        const lines = input.text.split(/\r\n|\r|\n/);
        const opmLine = lines.findIndex((l) => /^\s*OBJECT_ID\s*=/.test(l)) + 1;
        refused([
          {
            where: sourceKind === 'opm' ? (opmLine > 0 ? `line ${opmLine}` : 'OBJECT_ID') : 'field designation',
            message: `designation "${orbit.designation}" is not this object's (${object.designation})`,
          },
        ]);
      }
      let classification: ClassificationSummary;
      try {
        classification = classifySolution(orbit);
      } catch (err) {
        refused([{ where: 'state', message: `no orbital elements can be formed: ${(err as Error).message}` }]);
      }
      const terms = nonGravTerms(orbit);
      const now = new Date();
      const id = db.transaction((tx) => {
        const last = tx
          .select({ v: sql<number | null>`max(${orbitSolutions.version})` })
          .from(orbitSolutions)
          .where(eq(orbitSolutions.objectId, objectId))
          .get();
        const version = (last?.v ?? 0) + 1;
        const inserted = tx
          .insert(orbitSolutions)
          .values({
            objectId,
            version,
            sourceKind,
            fileName: input.fileName,
            rawText: input.text,
            inputSha256: orbit.source.inputSha256,
            epochTdbDays: orbit.epochTdbDays,
            observationArcDays: input.fit.observationArcDays ?? null,
            observationCount: input.fit.observationCount ?? null,
            fitRmsArcsec: input.fit.fitRmsArcsec ?? null,
            forceModel: terms.length ? 'non-gravitational' : 'gravity-only',
            nonGravTerms: terms.join(','),
            remark: input.fit.remark ? input.fit.remark : null,
            orbitJson: JSON.stringify(orbit),
            classificationJson: JSON.stringify(classification),
            createdById: actorId,
            createdAt: now,
          })
          .returning({ id: orbitSolutions.id, version: orbitSolutions.version })
          .get();
        tx.update(trackedObjects)
          .set({ solutionCount: version, latestSolutionVersion: version, latestSolutionAt: now, updatedAt: now })
          .where(eq(trackedObjects.id, objectId))
          .run();
        return inserted.version;
      });
      return toSolution(solutionRow(objectId, id));
    },

    /** Side-by-side comparison of two versions: elements and non-grav terms with 1σ and σ(b)/σ(a). */
    compare(objectId: number, a: number, b: number): CompareResponse {
      const ra = solutionRow(objectId, a);
      const rb = solutionRow(objectId, b);
      const oa = JSON.parse(ra.s.orbitJson) as NormalizedOrbit;
      const ob = JSON.parse(rb.s.orbitJson) as NormalizedOrbit;
      const ratio = (sa: number | null, sb: number | null) => (sa !== null && sb !== null && sa > 0 ? sb / sa : null);
      const ea = elementsWithSigma(oa);
      const eb = elementsWithSigma(ob);
      const elements: CompareRow[] = ELEMENT_KEYS.map((key) => ({
        key,
        label: ELEMENT_INFO[key].label,
        unit: ELEMENT_INFO[key].unit,
        a: ea[key],
        b: eb[key],
        sigmaRatio: ratio(ea[key].sigma, eb[key].sigma),
      }));
      const na = nonGravWithSigma(oa);
      const nb = nonGravWithSigma(ob);
      const nonGrav: CompareRow[] = (['a1', 'a2', 'a3'] as const).map((key) => ({
        key,
        label: NON_GRAV_LABELS[key],
        unit: 'AU/d²',
        a: na[key],
        b: nb[key],
        sigmaRatio: ratio(na[key].sigma, nb[key].sigma),
      }));
      const ratios = elements.map((r) => r.sigmaRatio).filter((r): r is number => r !== null && r > 0);
      return {
        objectId,
        a: toSolutionSummary(ra),
        b: toSolutionSummary(rb),
        elements,
        nonGrav,
        summary: {
          widened: elements.filter((r) => r.sigmaRatio !== null && r.sigmaRatio > 1.1).map((r) => r.key),
          narrowed: elements.filter((r) => r.sigmaRatio !== null && r.sigmaRatio < 1 / 1.1).map((r) => r.key),
          meanSigmaRatio: ratios.length ? Math.exp(ratios.reduce((s, r) => s + Math.log(r), 0) / ratios.length) : null,
        },
        method: `${ELEMENTS_METHOD} Ratios are σ(version ${b}) / σ(version ${a}); each version at its own epoch.`,
      };
    },
  };
}
export type ObjectService = ReturnType<typeof createObjectService>;
