// The press-release workflow as a table (state, action, to, roles, guards), the same pattern as the bulletin
// workflow (shared/bulletins/workflow.ts). The server enforces it (server/services/releases/service.ts: an action not
// in this table, by a role not listed, or with a guard that fails is refused) and the client shows the actions the
// table allows.
//
//   draft --submit--> in_review --request_changes--> changes_requested --revise--> draft
//                     in_review --approve--> approved            (the public wording is locked as version N)
//   approved --schedule {publishAt}--> scheduled --reschedule {publishAt}--> scheduled
//   scheduled --unschedule--> approved                           (embargo lifted from the calendar, not published)
//   scheduled --publish--> published                             (the scheduler only, at publishAt; no user action)
//   approved --amend--> draft                                    (a new version of the wording; version N stays as it is)
//   any state before published --cancel--> cancelled             (never published, never shown publicly)
//
// Guards:
//   author      the actor wrote the current draft (or started the amendment)
//   notAuthor   the actor did not write the current draft (four-eyes: the reviewer of the public wording is not its author)
//   publishAt   a valid publication time is given (not more than PUBLISH_AT_PAST_TOLERANCE_MS in the past)
import type { Role } from '../roles';

export const RELEASE_STATES = ['draft', 'in_review', 'changes_requested', 'approved', 'scheduled', 'published', 'cancelled'] as const;
export type ReleaseState = (typeof RELEASE_STATES)[number];

export const RELEASE_STATE_LABELS: Record<ReleaseState, string> = {
  draft: 'Draft',
  in_review: 'In review',
  changes_requested: 'Changes requested',
  approved: 'Approved',
  scheduled: 'Scheduled (embargoed)',
  published: 'Published',
  cancelled: 'Cancelled',
};

export const RELEASE_ACTIONS = ['submit', 'request_changes', 'revise', 'approve', 'schedule', 'reschedule', 'unschedule', 'publish', 'amend', 'cancel'] as const;
export type ReleaseAction = (typeof RELEASE_ACTIONS)[number];

export const RELEASE_ACTION_LABELS: Record<ReleaseAction, string> = {
  submit: 'Submit the wording for review',
  request_changes: 'Request changes',
  revise: 'Revise',
  approve: 'Approve the public wording',
  schedule: 'Schedule publication',
  reschedule: 'Reschedule',
  unschedule: 'Take off the schedule',
  publish: 'Publish',
  amend: 'Start a new version of the wording',
  cancel: 'Cancel the release',
};

export const RELEASE_GUARDS = ['author', 'notAuthor', 'publishAt'] as const;
export type ReleaseGuard = (typeof RELEASE_GUARDS)[number];

/** Who acts: a role, or the scheduler (publication at the scheduled time; no user can take that action). */
export type ReleaseActor = Role | 'system';

export interface ReleaseTransition {
  from: ReleaseState;
  action: ReleaseAction;
  to: ReleaseState;
  roles: readonly ReleaseActor[];
  guards: readonly ReleaseGuard[];
  /** A comment is required (what to change, why it is cancelled). */
  commentRequired?: boolean;
}

/** A publication time may lie this far in the past when it is set (it then publishes at once); earlier is refused. */
export const PUBLISH_AT_PAST_TOLERANCE_MS = 5 * 60 * 1000;

const CANCELLABLE: readonly ReleaseState[] = ['draft', 'in_review', 'changes_requested', 'approved', 'scheduled'];

export const RELEASE_TRANSITIONS: readonly ReleaseTransition[] = [
  { from: 'draft', action: 'submit', to: 'in_review', roles: ['communications'], guards: ['author'] },
  { from: 'in_review', action: 'request_changes', to: 'changes_requested', roles: ['reviewer'], guards: ['notAuthor'], commentRequired: true },
  { from: 'in_review', action: 'approve', to: 'approved', roles: ['reviewer'], guards: ['notAuthor'] },
  { from: 'changes_requested', action: 'revise', to: 'draft', roles: ['communications'], guards: [] },
  { from: 'approved', action: 'schedule', to: 'scheduled', roles: ['communications'], guards: ['publishAt'] },
  { from: 'scheduled', action: 'reschedule', to: 'scheduled', roles: ['communications'], guards: ['publishAt'] },
  { from: 'scheduled', action: 'unschedule', to: 'approved', roles: ['communications'], guards: [] },
  { from: 'scheduled', action: 'publish', to: 'published', roles: ['system'], guards: [] },
  { from: 'approved', action: 'amend', to: 'draft', roles: ['communications'], guards: [] },
  ...CANCELLABLE.map((from) => ({ from, action: 'cancel' as const, to: 'cancelled' as const, roles: ['communications', 'admin'] as const, guards: [] as const, commentRequired: true })),
];

/** The table entry for (state, action), or undefined when the action is not possible from that state. */
export function findReleaseTransition(from: ReleaseState, action: ReleaseAction): ReleaseTransition | undefined {
  return RELEASE_TRANSITIONS.find((t) => t.from === from && t.action === action);
}

export interface ReleaseGuardContext {
  actorId: number;
  /** Writer of the current draft (who created the release or started the amendment). */
  authorId: number;
  /** The requested publication time (ISO 8601) for schedule / reschedule. */
  publishAt?: string | null;
  /** Now, epoch milliseconds (injectable for tests). */
  nowMs?: number;
}

/** Why a guard fails, or null when it holds. */
export function releaseGuardFailure(guard: ReleaseGuard, ctx: ReleaseGuardContext): string | null {
  switch (guard) {
    case 'author':
      return ctx.actorId === ctx.authorId ? null : 'Only the author of the draft can do this';
    case 'notAuthor':
      return ctx.actorId !== ctx.authorId ? null : 'The reviewer of the public wording cannot be its author (four-eyes rule)';
    case 'publishAt': {
      if (!ctx.publishAt) return 'Give the publication date and time';
      const t = Date.parse(ctx.publishAt);
      if (!Number.isFinite(t)) return 'The publication time is not a valid date and time';
      const now = ctx.nowMs ?? Date.now();
      if (t < now - PUBLISH_AT_PAST_TOLERANCE_MS) return 'The publication time is in the past';
      return null;
    }
  }
}

/** Whether the state is shown on the public site (only published releases ever are). */
export function isPublicState(state: ReleaseState): boolean {
  return state === 'published';
}

/**
 * Actions a user may offer from a state (role check and the author/notAuthor guards; publishAt is checked when the
 * action is taken). The scheduler's 'publish' is never offered to a user.
 */
export function availableReleaseActions(state: ReleaseState, role: Role, actorId: number, authorId: number): ReleaseAction[] {
  return RELEASE_TRANSITIONS.filter(
    (t) =>
      t.from === state &&
      t.roles.includes(role) &&
      t.guards.every((g) => (g === 'author' || g === 'notAuthor' ? releaseGuardFailure(g, { actorId, authorId }) === null : true)),
  ).map((t) => t.action);
}
