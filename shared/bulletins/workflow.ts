// The bulletin workflow as a table (state, action, to, roles, guards). The server enforces it
// (server/services/bulletins/workflow.ts: a transition not in this table, by a role not listed, or with a guard
// that fails is refused) and the client shows the actions the table allows.
//
//   draft --submit--> in_review --request_changes--> changes_requested --revise--> draft
//                     in_review --approve--> approved --distribute--> distributed (--distribute--> distributed)
//   approved | distributed --amend--> draft (a new draft version; the approved versions stay as they are)
//   any open state --withdraw--> withdrawn
//   superseded: a version's status once a newer version of the same bulletin is approved (no user action).
//
// Guards:
//   author        the actor wrote the current draft
//   notAuthor     the actor did not write the current draft (four-eyes: the reviewer cannot be the author)
//   staleReason   when a figure is bound to an out-of-date run, a written reason (kept with the bulletin) is needed
//   allFigures    the sign-off confirms every linked figure of the draft (index, run and quantity as they are)
import type { Role } from '../roles';

export const BULLETIN_STATES = ['draft', 'in_review', 'changes_requested', 'approved', 'distributed', 'withdrawn', 'superseded'] as const;
export type BulletinState = (typeof BULLETIN_STATES)[number];

export const BULLETIN_STATE_LABELS: Record<BulletinState, string> = {
  draft: 'Draft',
  in_review: 'In review',
  changes_requested: 'Changes requested',
  approved: 'Approved',
  distributed: 'Distributed',
  withdrawn: 'Withdrawn',
  superseded: 'Superseded',
};

/** Status of a locked version (a bulletin's state is the state of its head: the draft, or the newest version). */
export const VERSION_STATUSES = ['approved', 'distributed', 'superseded', 'withdrawn'] as const;
export type VersionStatus = (typeof VERSION_STATUSES)[number];

export const BULLETIN_ACTIONS = ['submit', 'request_changes', 'revise', 'approve', 'distribute', 'amend', 'withdraw'] as const;
export type BulletinAction = (typeof BULLETIN_ACTIONS)[number];

export const BULLETIN_ACTION_LABELS: Record<BulletinAction, string> = {
  submit: 'Submit for review',
  request_changes: 'Request changes',
  revise: 'Revise',
  approve: 'Approve and sign off',
  distribute: 'Distribute',
  amend: 'Start a new version',
  withdraw: 'Withdraw',
};

export const GUARDS = ['author', 'notAuthor', 'staleReason', 'allFigures'] as const;
export type Guard = (typeof GUARDS)[number];

export interface Transition {
  from: BulletinState;
  action: BulletinAction;
  to: BulletinState;
  roles: readonly Role[];
  guards: readonly Guard[];
  /** Distribution goes through POST /api/distributions, not POST /transitions. */
  viaDistribution?: boolean;
  /** A comment is required (e.g. what to change, why it is withdrawn). */
  commentRequired?: boolean;
}

export const TRANSITIONS: readonly Transition[] = [
  { from: 'draft', action: 'submit', to: 'in_review', roles: ['analyst'], guards: ['author', 'staleReason'] },
  { from: 'in_review', action: 'request_changes', to: 'changes_requested', roles: ['reviewer'], guards: ['notAuthor'], commentRequired: true },
  { from: 'in_review', action: 'approve', to: 'approved', roles: ['reviewer'], guards: ['notAuthor', 'allFigures'] },
  { from: 'changes_requested', action: 'revise', to: 'draft', roles: ['analyst'], guards: [] },
  { from: 'approved', action: 'distribute', to: 'distributed', roles: ['communications'], guards: [], viaDistribution: true },
  { from: 'distributed', action: 'distribute', to: 'distributed', roles: ['communications'], guards: [], viaDistribution: true },
  { from: 'approved', action: 'amend', to: 'draft', roles: ['analyst'], guards: [] },
  { from: 'distributed', action: 'amend', to: 'draft', roles: ['analyst'], guards: [] },
  { from: 'draft', action: 'withdraw', to: 'withdrawn', roles: ['analyst', 'admin'], guards: [], commentRequired: true },
  { from: 'changes_requested', action: 'withdraw', to: 'withdrawn', roles: ['analyst', 'admin'], guards: [], commentRequired: true },
  { from: 'in_review', action: 'withdraw', to: 'withdrawn', roles: ['analyst', 'reviewer', 'admin'], guards: [], commentRequired: true },
  { from: 'approved', action: 'withdraw', to: 'withdrawn', roles: ['reviewer', 'admin'], guards: [], commentRequired: true },
  { from: 'distributed', action: 'withdraw', to: 'withdrawn', roles: ['reviewer', 'admin'], guards: [], commentRequired: true },
];

/** The table entry for (state, action), or undefined when the action is not possible from that state. */
export function findTransition(from: BulletinState, action: BulletinAction): Transition | undefined {
  return TRANSITIONS.find((t) => t.from === from && t.action === action);
}

export interface GuardContext {
  actorId: number;
  /** Writer of the current draft (the one who created or amended it). */
  authorId: number;
  staleFigureCount: number;
  staleReason?: string | null;
  /** Indices of the draft's linked figures, and those the sign-off confirmed. */
  figureCount: number;
  confirmedFigureIndices?: readonly number[];
}

/** Why a guard fails, or null when it holds. */
export function guardFailure(guard: Guard, ctx: GuardContext): string | null {
  switch (guard) {
    case 'author':
      return ctx.actorId === ctx.authorId ? null : 'Only the author of the draft can do this';
    case 'notAuthor':
      return ctx.actorId !== ctx.authorId ? null : 'The reviewer cannot be the author (four-eyes rule)';
    case 'staleReason':
      return ctx.staleFigureCount === 0 || (ctx.staleReason ?? '').trim().length >= 10
        ? null
        : `${ctx.staleFigureCount} figure(s) are bound to an out-of-date run: rebind them or give a written reason (at least 10 characters)`;
    case 'allFigures': {
      const confirmed = new Set(ctx.confirmedFigureIndices ?? []);
      const missing: number[] = [];
      for (let i = 0; i < ctx.figureCount; i++) if (!confirmed.has(i)) missing.push(i + 1);
      return missing.length === 0 ? null : `Confirm every figure before signing off (not confirmed: ${missing.join(', ')})`;
    }
  }
}

/**
 * Actions a user may offer from a state (role check and the author/notAuthor guards; the data guards staleReason
 * and allFigures are checked when the action is taken). `viaDistribution` actions are included.
 */
export function availableActions(state: BulletinState, role: Role, actorId: number, authorId: number): BulletinAction[] {
  return TRANSITIONS.filter(
    (t) =>
      t.from === state &&
      t.roles.includes(role) &&
      t.guards.every((g) => (g === 'author' || g === 'notAuthor' ? guardFailure(g, { actorId, authorId, staleFigureCount: 0, figureCount: 0 }) === null : true)),
  ).map((t) => t.action);
}
