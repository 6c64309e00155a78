// Sign-in, own password. No Express here.
import { eq } from 'drizzle-orm';
import type { Db } from '../db/client';
import { users, type UserRow } from '../db/schema';
import { unprocessable } from '../errors';
import type { SessionUser } from '../../shared/schemas/users';
import { hashPassword, verifyPassword } from './passwords';
import type { SqliteSessionStore } from './sessionStore';

export function toSessionUser(row: UserRow): SessionUser {
  return { id: row.id, email: row.email, name: row.name, role: row.role };
}

export function createAuthService(db: Db, store: SqliteSessionStore) {
  return {
    /**
     * The active user with this e-mail and password, or null. Unknown e-mail, wrong password,
     * deactivated user and not-yet-accepted invitation all give null after the same hashing work.
     */
    async authenticate(email: string, password: string): Promise<UserRow | null> {
      const row = db.select().from(users).where(eq(users.email, email.trim().toLowerCase())).get();
      const ok = await verifyPassword(row?.passwordHash, password);
      if (!row || !ok || !row.active) return null;
      return row;
    },

    recordSignIn(userId: number): void {
      db.update(users).set({ lastSignInAt: new Date() }).where(eq(users.id, userId)).run();
    },

    /** The user behind a session, or null when gone or deactivated. */
    activeUser(userId: number): UserRow | null {
      const row = db.select().from(users).where(eq(users.id, userId)).get();
      return row && row.active ? row : null;
    },

    /** Change the signed-in user's password; ends their other sessions. */
    async changePassword(userId: number, currentPassword: string, newPassword: string, currentSid: string): Promise<void> {
      const row = db.select().from(users).where(eq(users.id, userId)).get();
      if (!row || !(await verifyPassword(row.passwordHash, currentPassword))) {
        throw unprocessable('The current password is not correct', { field: 'currentPassword' });
      }
      const passwordHash = await hashPassword(newPassword);
      db.update(users).set({ passwordHash, passwordChangedAt: new Date() }).where(eq(users.id, userId)).run();
      store.destroyAllForUser(userId, currentSid);
    },
  };
}
export type AuthService = ReturnType<typeof createAuthService>;
