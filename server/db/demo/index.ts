// Demo objects and orbit solutions of the invented Halden Sound scenario (designations HSO-yy-Kn are Tocsin's own
// invented style). Files in this folder; the NEA's OPM is built by make-nea.ts (see there how).
// Idempotent: an object whose designation exists is left exactly as it is, with its versions.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { eq } from 'drizzle-orm';
import type { CreateObjectBody, SolutionFitFields } from '../../../shared/schemas/objects';
import { createObjectService } from '../../services/objects';
import type { Db } from '../client';
import { trackedObjects, users } from '../schema';

const here = path.dirname(fileURLToPath(import.meta.url));

interface DemoObject {
  object: CreateObjectBody;
  /** Versions in order: file in this folder and the fit statistics the file does not carry. */
  solutions: { file: string; fit: SolutionFitFields }[];
}

export const DEMO_OBJECTS: DemoObject[] = [
  {
    object: {
      designation: 'HSO-26-U1',
      name: 'Vaskir',
      kind: 'unbound',
      watch: true,
      notes: 'Interstellar visitor found inbound in June 2026. Version 2 adds radial and transverse non-gravitational terms.',
    },
    solutions: [
      { file: 'hso-26-u1.v1.json', fit: { observationArcDays: 128, observationCount: 193, fitRmsArcsec: 0.24, remark: 'Gravity-only fit' } },
      { file: 'hso-26-u1.v2.json', fit: { observationArcDays: 128, observationCount: 193, fitRmsArcsec: 0.21, remark: 'With A1 and A2: better residuals, wider uncertainty' } },
    ],
  },
  {
    object: {
      designation: 'HSO-26-N4',
      kind: 'near-earth-asteroid',
      watch: true,
      notes: 'Earth-crossing (Aten-type) asteroid with a close approach to Earth in September 2034.',
    },
    solutions: [{ file: 'hso-26-n4.opm', fit: { observationArcDays: 12.5, observationCount: 87, fitRmsArcsec: 0.44 } }],
  },
  {
    object: {
      designation: 'HSO-23-C2',
      name: 'Halvard',
      kind: 'comet',
      notes: 'Short-period comet; outgassing modelled with the water-ice non-gravitational law.',
    },
    solutions: [{ file: 'hso-23-c2.json', fit: { observationArcDays: 1187, observationCount: 2304, fitRmsArcsec: 0.72 } }],
  },
];

/** Insert the demo objects that are missing. Returns how many rows were added. */
export function seedDemoObjects(db: Db, analystEmail: string): number {
  const objects = createObjectService(db);
  const analyst = db.select({ id: users.id }).from(users).where(eq(users.email, analystEmail)).get();
  let inserted = 0;
  for (const demo of DEMO_OBJECTS) {
    const exists = db.select({ id: trackedObjects.id }).from(trackedObjects).where(eq(trackedObjects.designation, demo.object.designation)).get();
    if (exists) continue;
    db.transaction(() => {
      const created = objects.create(demo.object, analyst?.id ?? null);
      inserted++;
      for (const s of demo.solutions) {
        const text = fs.readFileSync(path.join(here, s.file), 'utf8');
        objects.addSolution(created.id, { text, sourceKind: 'opm', fileName: s.file, fit: s.fit }, analyst?.id ?? null);
        inserted++;
      }
    });
  }
  return inserted;
}
