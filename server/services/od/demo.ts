// Demo scenario of orbit determination (issue 8 item 9): the Halden Sound office's invented observatories, an
// invented astrometry arc of the unbound visitor (files in server/db/demo, made by make-astrometry.ts), and one fit
// job with A1 and A2 so both fits and their comparison are there on the first start.
//   seedDemoAstrometry   called by the seed (server/db/seed.ts): observatories missing from the table, and the
//                        visitor's arc when the visitor has no astrometry yet (uploaded through the same service
//                        as any file, so the demo file passes the same checks).
//   queueDemoFit         called by server/index.ts only, like the demo runs (test servers start without it): queues
//                        the fit when the visitor has none; the fit runner computes it in the background.
// Idempotent: a second call adds nothing.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { eq, sql } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { astrometryBatches, observatories, orbitFits, trackedObjects, users } from '../../db/schema';
import { fitSettingsSchema, observatoryFileSchema } from '../../../shared/schemas/od';
import { createAstrometryService, AstrometryRefusedError } from './astrometry';
import type { FitService } from './fits';

const DEMO_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../db/demo');
export const DEMO_OBSERVATORIES_FILE = path.join(DEMO_DIR, 'hspdo-observatories.json');
export const DEMO_ASTROMETRY_FILE = path.join(DEMO_DIR, 'hso-26-u1.psv');
/** The solution the arc was made from names the object. */
const DEMO_SOLUTION_FILE = path.join(DEMO_DIR, 'hso-26-u1.v2.json');

/**
 * Settings of the demo fit: gravity-only and with the radial and transverse terms, compared, under the
 * inverse-square law of version 2 (the arc was made with it; the water-ice g(r) all but vanishes beyond 3 AU, where
 * most of the arc lies).
 */
export const DEMO_FIT_SETTINGS = fitSettingsSchema.parse({ nonGravTerms: ['a1', 'a2'], nonGravLaw: 'inverse-square' });

export function demoAstrometryDesignation(): string {
  return (JSON.parse(fs.readFileSync(DEMO_SOLUTION_FILE, 'utf8')) as { designation: string }).designation;
}

function userId(db: Db, email: string): number | null {
  return db.select({ id: users.id }).from(users).where(eq(users.email, email)).get()?.id ?? null;
}

/** Insert the demo observatories that are missing and the visitor's arc if it has none. Returns rows added. */
export function seedDemoAstrometry(db: Db, analystEmail: string): number {
  let inserted = 0;
  const file = observatoryFileSchema.parse(JSON.parse(fs.readFileSync(DEMO_OBSERVATORIES_FILE, 'utf8')));
  for (const o of file.observatories) inserted += db.insert(observatories).values(o).onConflictDoNothing().run().changes;

  const object = db.select({ id: trackedObjects.id }).from(trackedObjects).where(eq(trackedObjects.designation, demoAstrometryDesignation())).get();
  if (!object) return inserted;
  const hasAstrometry = db.select({ n: sql<number>`count(*)` }).from(astrometryBatches).where(eq(astrometryBatches.objectId, object.id)).get()!.n > 0;
  if (hasAstrometry) return inserted;
  const text = fs.readFileSync(DEMO_ASTROMETRY_FILE, 'utf8');
  try {
    const result = createAstrometryService(db).upload(object.id, { fileName: path.basename(DEMO_ASTROMETRY_FILE), text }, userId(db, analystEmail));
    inserted += 1 + result.added;
  } catch (err) {
    if (err instanceof AstrometryRefusedError) {
      throw new Error(`the demo astrometry ${DEMO_ASTROMETRY_FILE} was refused: ${err.issues.slice(0, 5).map((i) => `line ${i.line}: ${i.message}`).join('; ')}`);
    }
    throw err;
  }
  return inserted;
}

/** Queue the demo fit of the visitor when it has none. Returns the fit id, or null when nothing was queued. */
export function queueDemoFit(db: Db, fits: FitService, analystEmail: string): number | null {
  const object = db.select({ id: trackedObjects.id }).from(trackedObjects).where(eq(trackedObjects.designation, demoAstrometryDesignation())).get();
  if (!object) return null;
  const hasFit = db.select({ n: sql<number>`count(*)` }).from(orbitFits).where(eq(orbitFits.objectId, object.id)).get()!.n > 0;
  const hasAstrometry = db.select({ n: sql<number>`count(*)` }).from(astrometryBatches).where(eq(astrometryBatches.objectId, object.id)).get()!.n > 0;
  if (hasFit || !hasAstrometry) return null;
  return fits.create(object.id, DEMO_FIT_SETTINGS, userId(db, analystEmail)).id;
}
