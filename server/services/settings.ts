import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { settings } from '../db/schema';

export const OFFICE_NAME_KEY = 'office.name';

export function getSetting(db: Db, key: string): string | undefined {
  return db.select().from(settings).where(eq(settings.key, key)).get()?.value;
}

export function officeName(db: Db): string {
  return getSetting(db, OFFICE_NAME_KEY) ?? 'Tocsin';
}
