// The single permission definition of Tocsin. The server enforces it on every /api route
// (server/middleware/authorize.ts, driven by shared/routes.ts) and the client uses the same
// rules (sent by GET /api/session) to show only what a user may do.
//
// Adding a resource in a later issue: add its subject name to SUBJECTS, its rules below,
// and its routes to shared/routes.ts. A route without a matching rule is refused.
import { AbilityBuilder, createMongoAbility, type ForcedSubject, type MongoAbility, type MongoQuery, type RawRuleOf } from '@casl/ability';
import type { Role } from './roles';

export const ACTIONS = [
  'manage', // CASL's wildcard: every action
  'read',
  'create',
  'update',
  'delete',
  // domain verbs used by later issues
  'run',
  'review',
  'approve',
  'publish',
  'acknowledge',
  // bulletins: take a workflow action (which one, and by whom, is decided by shared/bulletins/workflow.ts)
  'transition',
  // orbit fits (issue 8): make a finished fit the object's new solution version
  'adopt',
] as const;
export type Action = (typeof ACTIONS)[number];

export const SUBJECTS = [
  'all', // CASL's wildcard: every subject
  'User',
  'Account',
  'Health',
  // reserved for later issues
  'TrackedObject',
  'Solution',
  'Run',
  'Bulletin',
  'StakeholderList',
  'Distribution',
  'Briefing',
  'Release',
  'Observatory',
  // orbit determination (issue 8): an object's optical observations, and orbit-fit jobs
  'Astrometry',
  'Fit',
] as const;
export type SubjectName = (typeof SUBJECTS)[number];

/** A subject is either a type name or a plain object tagged with one (CASL's `subject(type, obj)`). */
type TaggedSubject = { [K in Exclude<SubjectName, 'all'>]: ForcedSubject<K> & Record<string, any> }[Exclude<SubjectName, 'all'>];
export type AppSubject = SubjectName | TaggedSubject;
export type AppAbility = MongoAbility<[Action, AppSubject], MongoQuery>;
export type AppRule = RawRuleOf<AppAbility>;

/** Release states a liaison may read (the wording is locked from approval on; shared/releases/workflow.ts). */
export const RELEASE_STATES_FOR_LIAISONS = ['approved', 'scheduled', 'published'] as const;

export interface AbilityUser {
  id: number;
  role: Role;
}

/**
 * Build the ability of a user (or of an anonymous visitor when `user` is null).
 * Anonymous visitors get no rules at all: public routes are marked `public` in shared/routes.ts.
 */
export function defineAbilityFor(user: AbilityUser | null): AppAbility {
  const { can, build } = new AbilityBuilder<AppAbility>(createMongoAbility);
  if (!user) return build();

  // Everyone signed in: their own account, the health check and releases. Liaisons work outside the office: they
  // see a press release only once reviewers have approved its wording (approved, scheduled, published), never a
  // draft under discussion or a cancelled one.
  can(['read', 'update'], 'Account', { id: user.id });
  can('read', 'Health');
  if (user.role === 'liaison') can('read', 'Release', { state: { $in: [...RELEASE_STATES_FOR_LIAISONS] } });
  else can('read', 'Release');
  // Bulletins (issue 6): the office reads drafts, versions and who received and acknowledged them; liaisons only
  // see what was sent to them (their briefings). Workflow actions are refined per role by shared/bulletins/workflow.ts.
  if (user.role !== 'liaison') can('read', ['Bulletin', 'Distribution']);
  // Tracked objects, orbit solutions and assessment runs (issue 5): the analysis side of the office only;
  // communications staff and liaisons see published summaries, never the raw solutions or runs.
  if (user.role === 'admin' || user.role === 'analyst' || user.role === 'reviewer') can('read', ['TrackedObject', 'Solution', 'Run']);
  // Orbit determination (issue 8): the same analysis side reads observatories, astrometry and fits.
  if (user.role === 'admin' || user.role === 'analyst' || user.role === 'reviewer') can('read', ['Observatory', 'Astrometry', 'Fit']);

  switch (user.role) {
    case 'admin':
      can('manage', 'User');
      can('manage', ['StakeholderList', 'Observatory']);
      // Withdraws a bulletin (workflow table).
      can('transition', 'Bulletin');
      // Cancels a press release that must not go out (workflow table).
      can('transition', 'Release');
      // Operations: may cancel a stuck or runaway run (DELETE /api/runs/:id), never start one.
      can('delete', 'Run');
      break;
    case 'analyst':
      can(['create', 'update'], ['TrackedObject', 'Solution']);
      // Runs: start them, and cancel any run of the office (not only their own: the queue is shared and one
      // analyst must be able to stop a colleague's mistaken run).
      can(['create', 'run', 'delete'], 'Run');
      can(['create', 'update', 'transition'], 'Bulletin');
      // Orbit determination (issue 8): uploads astrometry and excludes observations, starts and cancels fits, and
      // adopts a fit as a new solution version (the observatory table is the administrator's).
      can(['create', 'update'], 'Astrometry');
      can(['create', 'delete', 'adopt'], 'Fit');
      break;
    case 'reviewer':
      can(['review', 'approve', 'transition'], 'Bulletin');
      // Press releases (issue 7): reviewers approve the public wording or ask for changes (shared/releases/workflow.ts).
      can(['review', 'approve', 'transition'], 'Release');
      // Reviewers re-run an assessment to check it, but do not cancel other people's runs.
      can(['create', 'review'], 'Run');
      // Reviewers may start a fit to check an analyst's (issue 8), but neither cancel nor adopt one.
      can('create', 'Fit');
      break;
    case 'communications':
      // Press releases (issue 7): write, submit, schedule (publish at a time), reschedule and cancel.
      can(['create', 'update', 'publish', 'transition'], 'Release');
      can(['publish', 'transition'], 'Bulletin');
      can('read', ['StakeholderList', 'Distribution']);
      can(['create', 'update'], 'Distribution');
      can(['create', 'update'], 'StakeholderList');
      break;
    case 'liaison':
      can(['read', 'acknowledge'], 'Briefing');
      break;
  }
  return build();
}

/** Rebuild an ability from the raw rules the server sent (used by the client). */
export function abilityFromRules(rules: AppRule[]): AppAbility {
  return createMongoAbility<AppAbility>(rules);
}
