// Migrations on an empty database and seed idempotence.
// Sources: SQLite documentation (PRAGMA journal_mode, PRAGMA foreign_keys, sqlite_schema);
// the agreed contract (one demo user per role, e-mail <role>@hspdo.example, password tocsin-<role>-demo).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { getTableConfig } from 'drizzle-orm/sqlite-core';
import { closeDb, openDb, type Db } from '../../server/db/client';
import { MIGRATIONS_FOLDER, runMigrations } from '../../server/db/migrate';
import * as schema from '../../server/db/schema';
import { DEMO_USERS, seed } from '../../server/db/seed';
import { verifyPassword } from '../../server/services/passwords';
import { ROLES } from '../../shared/roles';

const opened: { db: Db; dir: string }[] = [];
function freshDb(): Db {
  // A folder that does not exist yet: opening must create it.
  const dir = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'tocsin-db-')), 'nested', 'data');
  const db = openDb(path.join(dir, 'tocsin.sqlite'));
  opened.push({ db, dir });
  return db;
}
afterEach(() => {
  for (const { db, dir } of opened.splice(0)) {
    closeDb(db);
    fs.rmSync(path.dirname(path.dirname(dir)), { recursive: true, force: true });
  }
});

const tablesOfSchema = Object.values(schema)
  .filter((v) => v && typeof v === 'object' && Symbol.for('drizzle:IsDrizzleTable') in (v as object))
  .map((t) => getTableConfig(t as never));

/** Every row of every table, for comparing states. */
function snapshot(db: Db): Record<string, unknown[]> {
  const out: Record<string, unknown[]> = {};
  for (const t of tablesOfSchema) out[t.name] = db.$client.prepare(`select * from "${t.name}" order by 1`).all();
  return out;
}

describe('migrations', () => {
  it('build every table and column of the schema on an empty database, with WAL and foreign keys', () => {
    const db = freshDb();
    const before = db.$client.prepare("select name from sqlite_schema where type = 'table' and name not like 'sqlite_%'").all();
    expect(before).toHaveLength(0);
    runMigrations(db);

    expect(tablesOfSchema.length).toBeGreaterThanOrEqual(3);
    for (const t of tablesOfSchema) {
      const cols = (db.$client.prepare(`pragma table_info("${t.name}")`).all() as { name: string }[]).map((c) => c.name).sort();
      expect(cols, t.name).toEqual(t.columns.map((c) => c.name).sort());
    }
    expect(db.$client.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(db.$client.pragma('foreign_keys', { simple: true })).toBe(1);

    // Every migration file in ./drizzle was applied, once.
    const files = fs.readdirSync(MIGRATIONS_FOLDER).filter((f) => f.endsWith('.sql'));
    const applied = db.$client.prepare('select count(*) as n from __drizzle_migrations').get() as { n: number };
    expect(applied.n).toBe(files.length);
    runMigrations(db);
    expect((db.$client.prepare('select count(*) as n from __drizzle_migrations').get() as { n: number }).n).toBe(files.length);
  });

  it('enforce foreign keys (an invitation for a missing user is refused)', () => {
    const db = freshDb();
    runMigrations(db);
    expect(() =>
      db.insert(schema.invitations).values({ tokenHash: 'x', userId: 4242, expiresAt: new Date() }).run(),
    ).toThrow(/FOREIGN KEY/);
  });
});

describe('seed', () => {
  it('creates the invented office and one user per role with the printed passwords', async () => {
    const db = freshDb();
    runMigrations(db);
    await seed(db);
    const rows = db.select().from(schema.users).all();
    expect(rows.map((r) => r.role).sort()).toEqual([...ROLES].sort());
    for (const u of DEMO_USERS) {
      const row = rows.find((r) => r.email === `${u.role}@hspdo.example`)!;
      expect(row.name).toBe(u.name);
      expect(row.active).toBe(true);
      expect(row.passwordHash).toMatch(/^\$argon2id\$/);
      expect(await verifyPassword(row.passwordHash, `tocsin-${u.role}-demo`)).toBe(true);
      expect(await verifyPassword(row.passwordHash, `tocsin-${u.role}-dem0`)).toBe(false);
    }
    expect(db.select().from(schema.settings).all()).toEqual([{ key: 'office.name', value: 'Halden Sound Planetary Defence Office' }]);
  });

  it('is idempotent: a second run changes nothing, and leaves a changed password alone', async () => {
    const db = freshDb();
    runMigrations(db);
    expect((await seed(db)).inserted).toBeGreaterThan(0);
    const first = snapshot(db);
    expect((await seed(db)).inserted).toBe(0);
    expect(snapshot(db)).toEqual(first);

    db.$client.prepare("update users set password_hash = 'changed' where email = 'analyst@hspdo.example'").run();
    const changed = snapshot(db);
    await seed(db);
    expect(snapshot(db)).toEqual(changed);
  });
});
