// Applies the generated migrations in ./drizzle. Run alone with `npm run db:migrate`.
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { migrate } from 'drizzle-orm/better-sqlite3/migrator';
import { closeDb, openDb, type Db } from './client';

export const MIGRATIONS_FOLDER = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../drizzle');

export function runMigrations(db: Db): void {
  migrate(db, { migrationsFolder: MIGRATIONS_FOLDER });
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (isMain) {
  const { loadConfig } = await import('../config');
  const config = loadConfig();
  const db = openDb(config.databaseFile);
  runMigrations(db);
  closeDb(db);
  console.log(`Migrations applied to ${config.databaseFile}`);
}
