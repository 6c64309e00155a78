// The office's observatory table (issue 8 item 1; METHODS.md §9.4): administrators add, change and remove
// observatories; an observatory that observations name cannot be removed (409), and its code cannot change (the
// stored observations refer to it). Field checks are shared/schemas/od.ts observatorySchema, answered 422 with
// zod's messages. No Express here.
import { asc, eq, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { Db } from '../../db/client';
import { observations, observatories, type ObservatoryRow } from '../../db/schema';
import { conflict, notFound, unprocessable } from '../../errors';
import { observatorySchema, type Observatory } from '../../../shared/schemas/od';
import type { ObservatoryRow as ObservatoryApiRow } from '../../../shared/schemas/odApi';

/** The engine's Observatory from a stored row. */
export function observatoryOfRow(r: ObservatoryRow): Observatory {
  return {
    code: r.code,
    name: r.name,
    longitudeDeg: r.longitudeDeg,
    rhoCosPhi: r.rhoCosPhi,
    rhoSinPhi: r.rhoSinPhi,
    geodeticLatitudeDeg: r.geodeticLatitudeDeg,
    heightM: r.heightM,
  };
}

/** Validate a body with observatorySchema; 422 listing every field zod refused. */
export function parseObservatory(body: unknown): Observatory {
  const parsed = observatorySchema.safeParse(body ?? {});
  if (parsed.success) return parsed.data;
  throw unprocessable('The observatory was not saved: some fields are not valid', {
    issues: parsed.error.issues.map((i: z.core.$ZodIssue) => ({ in: 'body', path: i.path.map(String).join('.'), message: i.message })),
  });
}

export function createObservatoryService(db: Db) {
  function counted() {
    return db
      .select({ o: observatories, n: sql<number>`(select count(*) from ${observations} where ${observations.stn} = ${observatories.code})` })
      .from(observatories);
  }
  const toApi = ({ o, n }: { o: ObservatoryRow; n: number }): ObservatoryApiRow => ({ ...observatoryOfRow(o), observationCount: n, updatedAt: o.updatedAt.toISOString() });

  function one(code: string): ObservatoryApiRow {
    const row = counted().where(eq(observatories.code, code)).get();
    if (!row) throw notFound(`There is no observatory with code ${code}`);
    return toApi(row);
  }

  return {
    list(): { observatories: ObservatoryApiRow[] } {
      return { observatories: counted().orderBy(asc(observatories.code)).all().map(toApi) };
    },

    get: one,

    /** The engine's observatories for these codes (those that exist). */
    byCodes(codes: readonly string[]): Observatory[] {
      if (!codes.length) return [];
      const wanted = new Set(codes);
      return db.select().from(observatories).orderBy(asc(observatories.code)).all().filter((r) => wanted.has(r.code)).map(observatoryOfRow);
    },

    create(o: Observatory, actorId: number | null): ObservatoryApiRow {
      const clash = db.select({ code: observatories.code }).from(observatories).where(sql`upper(${observatories.code}) = upper(${o.code})`).get();
      if (clash) throw conflict(`An observatory with code ${clash.code} already exists`, { field: 'code' });
      const now = new Date();
      db.insert(observatories).values({ ...o, createdAt: now, updatedAt: now, updatedById: actorId }).run();
      return one(o.code);
    },

    /** Replace name and position. The code in the body must be the one in the path (observations refer to it). */
    update(code: string, o: Observatory, actorId: number | null): ObservatoryApiRow {
      one(code);
      if (o.code !== code) {
        throw unprocessable(`The code of an observatory cannot change (${code} in the address, ${o.code} in the body)`, {
          issues: [{ in: 'body', path: 'code', message: `must be ${code}` }],
        });
      }
      const { code: _code, ...fields } = o;
      db.update(observatories).set({ ...fields, updatedAt: new Date(), updatedById: actorId }).where(eq(observatories.code, code)).run();
      return one(code);
    },

    remove(code: string): void {
      const { observationCount } = one(code);
      if (observationCount > 0) {
        throw conflict(`Observatory ${code} cannot be removed: ${observationCount} stored observation${observationCount === 1 ? '' : 's'} use it`, { observationCount });
      }
      try {
        db.delete(observatories).where(eq(observatories.code, code)).run();
      } catch (err) {
        // observations added by another process since the count (the foreign key refuses the delete)
        if ((err as { code?: string }).code === 'SQLITE_CONSTRAINT_FOREIGNKEY') throw conflict(`Observatory ${code} cannot be removed: stored observations use it`);
        throw err;
      }
    },
  };
}
export type ObservatoryService = ReturnType<typeof createObservatoryService>;
