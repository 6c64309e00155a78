// User administration. No Express here.
import { and, asc, eq, isNull, ne, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { users, type UserRow } from '../db/schema';
import { conflict, notFound, unprocessable } from '../errors';
import type { CreateUserBody, UpdateUserBody, User } from '../../shared/schemas/users';
import { hashPassword } from './passwords';
import type { InvitationService } from './invitations';
import type { SqliteSessionStore } from './sessionStore';

export function toUser(row: UserRow): User {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    active: row.active,
    invited: row.passwordHash === null,
    createdAt: row.createdAt.toISOString(),
    lastSignInAt: row.lastSignInAt ? row.lastSignInAt.toISOString() : null,
  };
}

export function createUserService(db: Db, store: SqliteSessionStore, invitations: InvitationService) {
  function row(id: number): UserRow {
    const found = db.select().from(users).where(eq(users.id, id)).get();
    if (!found) throw notFound('No such user');
    return found;
  }

  return {
    list(): User[] {
      return db.select().from(users).orderBy(asc(users.name), asc(users.id)).all().map(toUser);
    },

    get(id: number): User {
      return toUser(row(id));
    },

    /** Create a user; with no password, send an invitation e-mail. */
    async create(body: CreateUserBody, actor: UserRow | null): Promise<User> {
      const exists = db.select({ id: users.id }).from(users).where(eq(users.email, body.email)).get();
      if (exists) throw conflict('A user with this e-mail address already exists', { field: 'email' });
      const passwordHash = body.password ? await hashPassword(body.password) : null;
      let created: UserRow;
      try {
        created = db.insert(users).values({ email: body.email, name: body.name, role: body.role, passwordHash }).returning().get();
      } catch (err) {
        if (String((err as Error).message).includes('UNIQUE')) throw conflict('A user with this e-mail address already exists', { field: 'email' });
        throw err;
      }
      if (!passwordHash) await invitations.invite(created, actor);
      return toUser(created);
    },

    /** Rename, change role, (de)activate. Deactivation ends the user's sessions at once. */
    update(id: number, body: UpdateUserBody, actorId: number): User {
      const current = row(id);
      const demotesAdmin = current.role === 'admin' && ((body.role !== undefined && body.role !== 'admin') || body.active === false);
      if (demotesAdmin) {
        if (id === actorId) throw unprocessable('You cannot remove your own administrator rights or deactivate yourself');
        const others = db
          .select({ n: sql<number>`count(*)` })
          .from(users)
          .where(and(eq(users.role, 'admin'), eq(users.active, true), ne(users.id, id)))
          .get();
        if (!others || others.n === 0) throw unprocessable('Tocsin needs at least one active administrator');
      }
      const updated = db
        .update(users)
        .set({
          ...(body.name !== undefined ? { name: body.name } : {}),
          ...(body.role !== undefined ? { role: body.role } : {}),
          ...(body.active !== undefined ? { active: body.active } : {}),
        })
        .where(eq(users.id, id))
        .returning()
        .get();
      if (body.active === false) store.destroyAllForUser(id);
      return toUser(updated);
    },

    /** Send a new invitation to a user who has not chosen a password yet. */
    async reinvite(id: number, actor: UserRow | null): Promise<void> {
      const target = db.select().from(users).where(and(eq(users.id, id), isNull(users.passwordHash))).get();
      if (!target) {
        row(id); // 404 when the user does not exist at all
        throw conflict('This user has already chosen a password');
      }
      if (!target.active) throw unprocessable('Activate the user before inviting them');
      await invitations.invite(target, actor);
    },
  };
}
export type UserService = ReturnType<typeof createUserService>;
