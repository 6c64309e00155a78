// One-time invitation links: /invite/<token>, valid 7 days; only the SHA-256 of the token is stored.
import crypto from 'node:crypto';
import { and, eq, gt, isNull } from 'drizzle-orm';
import type { Db } from '../db/client';
import { invitations, users, type UserRow } from '../db/schema';
import { notFound } from '../errors';
import { hashPassword } from './passwords';
import type { MailService } from './mail';
import { officeName } from './settings';
import { render } from './templates';

export const INVITATION_VALID_MS = 7 * 24 * 3_600_000;

export function hashToken(token: string): string {
  return crypto.createHash('sha256').update(token).digest('hex');
}

export function createInvitationService(db: Db, mail: MailService, publicUrl: string, now: () => number = Date.now) {
  /** The open invitation for this token with its user, or undefined. */
  function findOpen(token: string) {
    return db
      .select({ invitation: invitations, user: users })
      .from(invitations)
      .innerJoin(users, eq(users.id, invitations.userId))
      .where(and(eq(invitations.tokenHash, hashToken(token)), isNull(invitations.acceptedAt), gt(invitations.expiresAt, new Date(now()))))
      .get();
  }

  return {
    /** Create a fresh invitation (closing older open ones of the user) and e-mail the link. */
    async invite(user: UserRow, invitedBy: UserRow | null): Promise<void> {
      const token = crypto.randomBytes(32).toString('base64url');
      const createdAt = new Date(now());
      const expiresAt = new Date(now() + INVITATION_VALID_MS);
      db.transaction((tx) => {
        tx.update(invitations)
          .set({ expiresAt: createdAt })
          .where(and(eq(invitations.userId, user.id), isNull(invitations.acceptedAt)))
          .run();
        tx.insert(invitations).values({ tokenHash: hashToken(token), userId: user.id, invitedById: invitedBy?.id ?? null, createdAt, expiresAt }).run();
      });
      const values = {
        name: user.name,
        email: user.email,
        officeName: officeName(db),
        inviterName: invitedBy?.name ?? 'An administrator',
        link: `${publicUrl}/invite/${token}`,
        expiresOn: expiresAt.toISOString().slice(0, 16).replace('T', ' ') + ' UTC',
      };
      await mail.send({
        to: user.email,
        subject: `Your Tocsin account at ${values.officeName}`,
        text: render('email/invitation.txt', values),
        html: render('email/invitation.html', values),
      });
    },

    /** Who the invitation is for; 404 when unknown, used, expired or the user is deactivated. */
    lookup(token: string): { email: string; name: string } {
      const found = findOpen(token);
      if (!found || !found.user.active) throw notFound('This invitation link is not valid any more');
      return { email: found.user.email, name: found.user.name };
    },

    /** Set the password and close the invitation. */
    async accept(token: string, password: string): Promise<void> {
      const found = findOpen(token);
      if (!found || !found.user.active) throw notFound('This invitation link is not valid any more');
      const passwordHash = await hashPassword(password);
      db.transaction((tx) => {
        const closed = tx
          .update(invitations)
          .set({ acceptedAt: new Date(now()) })
          .where(and(eq(invitations.id, found.invitation.id), isNull(invitations.acceptedAt)))
          .run();
        if (closed.changes !== 1) throw notFound('This invitation link is not valid any more');
        tx.update(users).set({ passwordHash, passwordChangedAt: new Date(now()) }).where(eq(users.id, found.user.id)).run();
      });
    },
  };
}
export type InvitationService = ReturnType<typeof createInvitationService>;
