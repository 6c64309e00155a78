// Demo scenario: an invented regional office, one user per role, demo objects with orbit solutions
// (server/db/demo), and the office's observatories with the visitor's astrometry (server/services/od/demo.ts).
// Idempotent: rows that exist are left exactly as they are (a second run changes nothing, and a
// demo user who changed their password keeps it).
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { eq } from 'drizzle-orm';
import type { Role } from '../../shared/roles';
import { seedDemoStakeholderLists } from '../services/bulletins/demo';
import { seedDemoAstrometry } from '../services/od/demo';
import { hashPassword } from '../services/passwords';
import { OFFICE_NAME_KEY } from '../services/settings';
import type { Db } from './client';
import { seedDemoObjects } from './demo';
import { settings, users } from './schema';

export const DEMO_OFFICE = {
  name: 'Halden Sound Planetary Defence Office',
  shortName: 'HSPDO',
  emailDomain: 'hspdo.example',
} as const;

export interface DemoUser {
  role: Role;
  name: string;
  email: string;
  password: string;
}

const DEMO_NAMES: Record<Role, string> = {
  admin: 'Ada Brennock',
  analyst: 'Tomas Velde',
  reviewer: 'Ines Marrow',
  communications: 'Colm Aske',
  liaison: 'Runa Sollis',
};

export const DEMO_USERS: DemoUser[] = (Object.keys(DEMO_NAMES) as Role[]).map((role) => ({
  role,
  name: DEMO_NAMES[role],
  email: `${role}@${DEMO_OFFICE.emailDomain}`,
  password: `tocsin-${role}-demo`,
}));

/** Insert what is missing. Returns how many rows were added. */
export async function seed(db: Db): Promise<{ inserted: number }> {
  let inserted = 0;
  inserted += db.insert(settings).values({ key: OFFICE_NAME_KEY, value: DEMO_OFFICE.name }).onConflictDoNothing().run().changes;
  for (const u of DEMO_USERS) {
    const exists = db.select({ id: users.id }).from(users).where(eq(users.email, u.email)).get();
    if (exists) continue;
    const passwordHash = await hashPassword(u.password);
    inserted += db.insert(users).values({ email: u.email, name: u.name, role: u.role, passwordHash }).onConflictDoNothing().run().changes;
  }
  inserted += seedDemoObjects(db, DEMO_USERS.find((u) => u.role === 'analyst')!.email);
  // Orbit determination (issue 8): the office's observatories and the visitor's astrometry arc.
  inserted += seedDemoAstrometry(db, DEMO_USERS.find((u) => u.role === 'analyst')!.email);
  inserted += seedDemoStakeholderLists(db, DEMO_OFFICE.emailDomain);
  return { inserted };
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (isMain) {
  const { loadConfig } = await import('../config');
  const { openDb, closeDb } = await import('./client');
  const { runMigrations } = await import('./migrate');
  const db = openDb(loadConfig().databaseFile);
  runMigrations(db);
  const { inserted } = await seed(db);
  closeDb(db);
  console.log(`Seed done (${inserted} rows added)`);
}
