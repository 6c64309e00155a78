// The office's observatory table (issue 8 item 1; METHODS.md §9.4): administrators add, change and remove
// observatories; an observatory that observations name cannot be removed (409), and its code cannot change (the
// stored observations refer to it). Field checks are shared/schemas/od.ts observatorySchema, answered 422 with
// zod's messages. No Express here.
import { asc, eq, sql } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '../../db/client';
import { observations, observatories, type ObservatoryRow } from '../../db/schema';
import { conflict, notFound, unprocessable } from '../../errors';
import { observatoryFileSchema, observatorySchema, type Observatory } from '../../../shared/schemas/od';
import type {
  ImportObservatoriesResult,
  ObservatoryImportIssue,
  ObservatoryImportMode,
  ObservatoryRow as ObservatoryApiRow,
} from '../../../shared/schemas/odApi';

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

/** "entry 3 (code HSX): rho cos phi' must be in [0, 1.001]" (or the message alone for the file as a whole). */
export function observatoryImportIssueText(i: ObservatoryImportIssue): string {
  if (i.entry === null) return i.message;
  return `entry ${i.entry}${i.code ? ` (code ${i.code})` : ''}: ${i.message}`;
}

/** 422 for a refused observatory file: one issue per entry and field, nothing stored. */
export function observatoryFileRefused(issues: ObservatoryImportIssue[]) {
  const first = issues.slice(0, 3).map(observatoryImportIssueText).join('; ');
  return unprocessable(
    `The observatory file was refused (${issues.length} problem${issues.length === 1 ? '' : 's'}; nothing was stored): ${first}${issues.length > 3 ? '; …' : ''}`,
    { issues },
  );
}

/** Decode an uploaded observatory file as UTF-8 text (422 with a file issue when it is not). */
export function observatoryTextOfUpload(buffer: Buffer): string {
  const refuse = (message: string) => observatoryFileRefused([{ entry: null, code: null, field: null, kind: 'invalid', message }]);
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buffer);
  } catch {
    throw refuse('The file is not UTF-8 text (a JSON observatory file expected)');
  }
  if (!text.trim()) throw refuse('The file is empty');
  return text;
}

/** The file's form around the entries (format, strict keys); the entries are checked one by one. */
const observatoryFileShellSchema = observatoryFileSchema.extend({ observatories: z.array(z.unknown()).min(1, 'The file lists no observatory') });

/**
 * Read an observatory file (the CLI's `{"observatories": [...]}` form) without touching the database: the valid
 * entries, or every problem found — one issue per entry and field, and codes repeated inside the file (compared
 * without regard to case, as the table does) named with both entries.
 */
export function readObservatoryFile(text: string): { ok: true; observatories: Observatory[] } | { ok: false; issues: ObservatoryImportIssue[] } {
  const fileIssue = (message: string): ObservatoryImportIssue => ({ entry: null, code: null, field: null, kind: 'invalid', message });
  let json: unknown;
  try {
    json = JSON.parse(text.replace(/^\uFEFF/, ''));
  } catch (err) {
    return { ok: false, issues: [fileIssue(`The file is not JSON: ${(err as Error).message}`)] };
  }
  const shell = observatoryFileShellSchema.safeParse(json);
  if (!shell.success) {
    return {
      ok: false,
      issues: shell.error.issues.map((i) => {
        const where = i.path.map(String).join('.');
        const keys = i.code === 'unrecognized_keys' ? ` (${i.keys.join(', ')})` : '';
        return fileIssue(where ? `${where}: ${i.message}${keys}` : `${i.message}${keys}`);
      }),
    };
  }
  const issues: ObservatoryImportIssue[] = [];
  const observatories: Observatory[] = [];
  const firstEntryOfCode = new Map<string, { entry: number; code: string }>();
  shell.data.observatories.forEach((raw, k) => {
    const entry = k + 1;
    const rawCode = typeof raw === 'object' && raw !== null && typeof (raw as { code?: unknown }).code === 'string' ? (raw as { code: string }).code.trim() : null;
    const parsed = observatorySchema.safeParse(raw);
    if (!parsed.success) {
      const seen = new Set<string>();
      for (const i of parsed.error.issues) {
        const field = i.code === 'unrecognized_keys' ? i.keys.join(', ') : i.path.map(String).join('.') || null;
        const key = field ?? '';
        if (seen.has(key)) continue; // one issue per entry and field
        seen.add(key);
        const message = i.code === 'unrecognized_keys' ? `unknown field${i.keys.length === 1 ? '' : 's'} ${i.keys.join(', ')}` : i.message;
        issues.push({ entry, code: rawCode || null, field, kind: 'invalid', message });
      }
    } else {
      observatories.push(parsed.data);
    }
    if (rawCode && /^[A-Za-z0-9]{1,8}$/.test(rawCode)) {
      const first = firstEntryOfCode.get(rawCode.toUpperCase());
      if (first) {
        issues.push({
          entry,
          code: rawCode,
          field: 'code',
          kind: 'duplicate',
          message: `code ${rawCode} is repeated in the file: entries ${first.entry} (${first.code}) and ${entry} (${rawCode})`,
        });
      } else firstEntryOfCode.set(rawCode.toUpperCase(), { entry, code: rawCode });
    }
  });
  if (issues.length) return { ok: false, issues: issues.sort((a, b) => (a.entry ?? 0) - (b.entry ?? 0)) };
  return { ok: true, observatories };
}

const sameSite = (a: Observatory, b: Observatory) =>
  a.name === b.name &&
  a.longitudeDeg === b.longitudeDeg &&
  a.rhoCosPhi === b.rhoCosPhi &&
  a.rhoSinPhi === b.rhoSinPhi &&
  a.geodeticLatitudeDeg === b.geodeticLatitudeDeg &&
  a.heightM === b.heightM;

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

    /**
     * Import a file of observatories, all or nothing, in one transaction. A code already in the table (without
     * regard to case) is refused in 'add-only' mode (an issue of kind 'exists' for its entry) and has its name and
     * position replaced, like PUT, in 'replace' mode (the stored code stays); an entry identical to the stored row
     * is left untouched (unchanged). Any issue: 422 with every issue, nothing stored.
     */
    importFile(input: { fileName: string | null; text: string; mode: ObservatoryImportMode }, actorId: number | null): ImportObservatoriesResult {
      const read = readObservatoryFile(input.text);
      if (!read.ok) throw observatoryFileRefused(read.issues);
      const result = db.transaction((tx) => {
        const stored = new Map(tx.select().from(observatories).all().map((r) => [r.code.toUpperCase(), r] as const));
        if (input.mode === 'add-only') {
          const issues: ObservatoryImportIssue[] = [];
          read.observatories.forEach((o, k) => {
            const clash = stored.get(o.code.toUpperCase());
            if (clash) {
              issues.push({
                entry: k + 1,
                code: o.code,
                field: 'code',
                kind: 'exists',
                message: `an observatory with code ${clash.code} already exists (import in replace mode to replace it)`,
              });
            }
          });
          if (issues.length) throw observatoryFileRefused(issues);
        }
        const now = new Date();
        const out = { addedCodes: [] as string[], replacedCodes: [] as string[], unchangedCodes: [] as string[] };
        for (const o of read.observatories) {
          const row = stored.get(o.code.toUpperCase());
          if (!row) {
            tx.insert(observatories).values({ ...o, createdAt: now, updatedAt: now, updatedById: actorId }).run();
            out.addedCodes.push(o.code);
            continue;
          }
          if (sameSite(observatoryOfRow(row), o)) {
            out.unchangedCodes.push(row.code);
            continue;
          }
          const { code: _code, ...fields } = o;
          tx.update(observatories).set({ ...fields, updatedAt: now, updatedById: actorId }).where(eq(observatories.code, row.code)).run();
          out.replacedCodes.push(row.code);
        }
        return out;
      });
      return {
        fileName: input.fileName,
        mode: input.mode,
        added: result.addedCodes.length,
        replaced: result.replacedCodes.length,
        unchanged: result.unchangedCodes.length,
        ...result,
      };
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
