// The areas of the app and the tasks a user can start, each guarded by one ability check.
// Navigation and the home page are derived from these tables and the user's ability,
// never from role names: a role sees an area exactly when shared/abilities.ts lets it.
import type { AppAbility } from '../../shared/abilities';

type CanArgs = Parameters<AppAbility['can']>;
export type AbilityAction = CanArgs[0];
export type AbilitySubject = CanArgs[1];

export type Area = {
  to: string;
  label: string;
  action: AbilityAction;
  subject: AbilitySubject;
};

/**
 * Navigation entries, in display order. Home is always present for a signed-in user.
 * Adding an area (a later issue's pages): add it here with the ability check that guards its
 * route, and update EXPECTED_NAV and AREA_PAGES in tests/browser/roles.test.ts.
 */
export const AREAS: Area[] = [
  { to: '/objects', label: 'Objects', action: 'read', subject: 'TrackedObject' },
  { to: '/observatories', label: 'Observatories', action: 'read', subject: 'Observatory' },
  { to: '/bulletins', label: 'Bulletins', action: 'read', subject: 'Bulletin' },
  { to: '/releases', label: 'Releases', action: 'read', subject: 'Release' },
  { to: '/briefings', label: 'Briefings', action: 'read', subject: 'Briefing' },
  { to: '/admin/users', label: 'Users', action: 'read', subject: 'User' },
  { to: '/account', label: 'Account', action: 'read', subject: 'Account' },
];

export type Task = {
  to: string;
  title: string;
  description: string;
  action: AbilityAction;
  subject: AbilitySubject;
};

/** What a user can do now; the home page lists those the ability allows. */
export const TASKS: Task[] = [
  {
    to: '/objects',
    title: 'Load an orbit solution',
    description: 'Register an object or add a new solution version (CCSDS OPM, Tocsin JSON or a form), and compare versions.',
    action: 'create',
    subject: 'Solution',
  },
  {
    to: '/objects',
    title: 'Fit an orbit to astrometry',
    description: "Add an object's ADES astrometry, fit it with gravity only and with non-gravitational terms, compare the two and adopt one as a new solution version.",
    action: 'create',
    subject: 'Astrometry',
  },
  {
    to: '/observatories',
    title: 'Keep the observatory table',
    description: 'Add or correct the sites whose codes astrometry files may name: longitude and parallax constants or geodetic latitude and height.',
    action: 'create',
    subject: 'Observatory',
  },
  {
    to: '/bulletins',
    title: 'Draft a bulletin',
    description: 'Write a statement about one object for officials, with figures linked to a named run, and submit it for review.',
    action: 'create',
    subject: 'Bulletin',
  },
  {
    to: '/bulletins?state=in_review',
    title: 'Review bulletins',
    description: 'Check each figure of a submitted bulletin against its run, then sign it off or ask for changes.',
    action: 'approve',
    subject: 'Bulletin',
  },
  {
    to: '/bulletins?state=approved',
    title: 'Distribute an approved bulletin',
    description: 'Send a signed-off version to a stakeholder list and follow who received and acknowledged it.',
    action: 'create',
    subject: 'Distribution',
  },
  {
    to: '/releases',
    title: 'Prepare a press release',
    description: 'Turn an approved bulletin version into a statement for the public, with the same figures in plain language, and schedule its publication.',
    action: 'create',
    subject: 'Release',
  },
  {
    to: '/releases?state=in_review',
    title: 'Review public wording',
    description: 'Check a release against its bulletin version and approve the wording, or ask for changes.',
    action: 'approve',
    subject: 'Release',
  },
  {
    to: '/briefings',
    title: 'Read and acknowledge briefings',
    description: 'See the bulletins sent to you and tell the office you have received them.',
    action: 'acknowledge',
    subject: 'Briefing',
  },
  {
    to: '/admin/users#new-user',
    title: 'Invite a colleague',
    description: 'Create an account and send a one-time invitation link, with the role they need.',
    action: 'create',
    subject: 'User',
  },
  {
    to: '/admin/users',
    title: 'Manage users and roles',
    description: 'See who has access, change roles, and deactivate or reactivate accounts.',
    action: 'update',
    subject: 'User',
  },
  {
    to: '/account',
    title: 'Change your password',
    description: 'Set a new password of at least 12 characters for your own sign-in.',
    action: 'update',
    subject: 'Account',
  },
];

export function allowedAreas(ability: AppAbility): Area[] {
  return AREAS.filter((a) => ability.can(a.action, a.subject));
}

export function allowedTasks(ability: AppAbility): Task[] {
  return TASKS.filter((t) => ability.can(t.action, t.subject));
}
