// Every /api route of Tocsin, with the ability it needs. The server's authorization middleware
// looks each request up here: a request matching no entry is answered 404 before any handler
// runs, a non-public entry needs a signed-in user (401) whose ability allows `action` on
// `subject` (403). So a handler cannot be reached without an entry here (deny by default).
// The API test walks this table for every role, and the client may use it to decide what to show.
import type { Action, SubjectName } from './abilities';

export type HttpMethod = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

export interface RouteDef {
  method: HttpMethod;
  /** Express-style path; `:name` matches one path segment. */
  path: string;
  action: Action;
  subject: SubjectName;
  /** Reachable without signing in (the ability is not consulted). */
  public?: boolean;
  /** What the route is for (documentation only). */
  summary: string;
}

export const ROUTES = [
  { method: 'GET', path: '/api/health', action: 'read', subject: 'Health', public: true, summary: 'Liveness and version' },
  { method: 'GET', path: '/api/csrf', action: 'read', subject: 'Health', public: true, summary: 'CSRF token (sets the CSRF cookie)' },

  { method: 'POST', path: '/api/session', action: 'create', subject: 'Account', public: true, summary: 'Sign in' },
  { method: 'GET', path: '/api/session', action: 'read', subject: 'Account', summary: 'The signed-in user and their rules' },
  { method: 'DELETE', path: '/api/session', action: 'delete', subject: 'Account', public: true, summary: 'Sign out (idempotent)' },

  { method: 'PUT', path: '/api/account/password', action: 'update', subject: 'Account', summary: 'Change own password' },

  { method: 'GET', path: '/api/users', action: 'read', subject: 'User', summary: 'List users' },
  { method: 'POST', path: '/api/users', action: 'create', subject: 'User', summary: 'Create a user (invites by e-mail when no password is given)' },
  { method: 'GET', path: '/api/users/:id', action: 'read', subject: 'User', summary: 'One user' },
  { method: 'PATCH', path: '/api/users/:id', action: 'update', subject: 'User', summary: 'Rename, change role, (de)activate' },
  { method: 'POST', path: '/api/users/:id/invitation', action: 'update', subject: 'User', summary: 'Send a fresh invitation e-mail' },

  { method: 'GET', path: '/api/invitations/:token', action: 'read', subject: 'Account', public: true, summary: 'Look up an invitation' },
  { method: 'POST', path: '/api/invitations/:token', action: 'update', subject: 'Account', public: true, summary: 'Accept an invitation by choosing a password' },

  { method: 'GET', path: '/api/objects', action: 'read', subject: 'TrackedObject', summary: 'List tracked objects (paging, sorting, search, filters)' },
  { method: 'POST', path: '/api/objects', action: 'create', subject: 'TrackedObject', summary: 'Register a tracked object' },
  { method: 'GET', path: '/api/objects/:id', action: 'read', subject: 'TrackedObject', summary: 'One tracked object' },
  { method: 'PATCH', path: '/api/objects/:id', action: 'update', subject: 'TrackedObject', summary: 'Change name, notes or watch status' },
  { method: 'GET', path: '/api/objects/:id/solutions', action: 'read', subject: 'Solution', summary: 'Orbit-solution versions of an object' },
  { method: 'POST', path: '/api/objects/:id/solutions', action: 'create', subject: 'Solution', summary: 'Add a version: multipart file (OPM or Tocsin JSON) or JSON form body' },
  { method: 'GET', path: '/api/objects/:id/solutions/:version', action: 'read', subject: 'Solution', summary: 'One solution version with its normalised orbit and raw text' },
  { method: 'GET', path: '/api/objects/:id/compare', action: 'read', subject: 'Solution', summary: 'Compare two versions (?a=1&b=2): elements, 1-sigma, non-grav terms, sigma ratios' },

  { method: 'GET', path: '/api/runs', action: 'read', subject: 'Run', summary: 'Assessment runs, newest first (?objectId=&solutionId=&status=&limit=)' },
  { method: 'POST', path: '/api/runs', action: 'create', subject: 'Run', summary: 'Queue an assessment run of a solution version (202 with the run)' },
  { method: 'GET', path: '/api/runs/:id', action: 'read', subject: 'Run', summary: 'One run: status, progress, provenance, and the engine result when done' },
  { method: 'DELETE', path: '/api/runs/:id', action: 'delete', subject: 'Run', summary: 'Cancel a queued or running run' },

  { method: 'GET', path: '/api/observatories', action: 'read', subject: 'Observatory', summary: 'The office\'s observatory table, with how many observations use each code' },
  { method: 'POST', path: '/api/observatories', action: 'create', subject: 'Observatory', summary: 'Add an observatory (code, name, longitude, parallax constants or latitude and height; 201)' },
  { method: 'POST', path: '/api/observatories/import', action: 'create', subject: 'Observatory', summary: 'Import a file of observatories in the CLI\'s JSON form, all or nothing (mode add-only or replace)' },
  { method: 'PUT', path: '/api/observatories/:code', action: 'update', subject: 'Observatory', summary: 'Replace an observatory\'s name and position (the code stays)' },
  { method: 'DELETE', path: '/api/observatories/:code', action: 'delete', subject: 'Observatory', summary: 'Remove an observatory no observation uses (409 when used)' },

  { method: 'GET', path: '/api/objects/:id/astrometry', action: 'read', subject: 'Astrometry', summary: 'An object\'s uploaded ADES files and its optical observations' },
  { method: 'POST', path: '/api/objects/:id/astrometry', action: 'create', subject: 'Astrometry', summary: 'Upload ADES PSV (multipart file or {fileName, text}; 422 with every bad line and nothing stored)' },
  { method: 'PATCH', path: '/api/objects/:id/astrometry/:obsId', action: 'update', subject: 'Astrometry', summary: 'Exclude an observation from fits, or take it back {excluded, reason}' },

  { method: 'GET', path: '/api/objects/:id/fits', action: 'read', subject: 'Fit', summary: 'Orbit fits of an object, newest first (results left out)' },
  { method: 'POST', path: '/api/objects/:id/fits', action: 'create', subject: 'Fit', summary: 'Queue an orbit fit of the object\'s observations (202 with the job)' },
  { method: 'GET', path: '/api/fits/:id', action: 'read', subject: 'Fit', summary: 'One fit: status, progress and, when done, both fits and their comparison' },
  { method: 'DELETE', path: '/api/fits/:id', action: 'delete', subject: 'Fit', summary: 'Cancel a queued or running fit' },
  { method: 'POST', path: '/api/fits/:id/adopt', action: 'adopt', subject: 'Fit', summary: 'Make one of a finished fit\'s solutions the object\'s new solution version {which, reason} (201, once)' },

  { method: 'GET', path: '/api/bulletins', action: 'read', subject: 'Bulletin', summary: 'Bulletins, most recently changed first (?objectId=&state=)' },
  { method: 'POST', path: '/api/bulletins', action: 'create', subject: 'Bulletin', summary: 'Start a bulletin about an object (201 with the draft)' },
  { method: 'GET', path: '/api/bulletins/:id', action: 'read', subject: 'Bulletin', summary: 'The draft with its revision, figures (value, staleness, latest value), allowed actions and history' },
  { method: 'PUT', path: '/api/bulletins/:id', action: 'update', subject: 'Bulletin', summary: 'Save the draft; carries the revision it edits (409 with the current copy when stale)' },
  { method: 'POST', path: '/api/bulletins/:id/transitions', action: 'transition', subject: 'Bulletin', summary: 'Workflow action {action, comment, confirmedFigures, staleReason} (shared/bulletins/workflow.ts)' },
  { method: 'GET', path: '/api/bulletins/:id/versions', action: 'read', subject: 'Bulletin', summary: 'Locked versions with status, reviewer and hash' },
  { method: 'GET', path: '/api/bulletins/:id/versions/:version', action: 'read', subject: 'Bulletin', summary: 'One locked version with its differences from an earlier one (?against=)' },
  { method: 'GET', path: '/api/bulletins/:id/versions/:version/pdf', action: 'read', subject: 'Bulletin', summary: 'The PDF of a locked version (application/pdf)' },

  { method: 'GET', path: '/api/stakeholder-lists', action: 'read', subject: 'StakeholderList', summary: 'Stakeholder lists with their members' },
  { method: 'POST', path: '/api/stakeholder-lists', action: 'create', subject: 'StakeholderList', summary: 'Create a list (users and outside addresses)' },
  { method: 'GET', path: '/api/stakeholder-lists/:id', action: 'read', subject: 'StakeholderList', summary: 'One list' },
  { method: 'PUT', path: '/api/stakeholder-lists/:id', action: 'update', subject: 'StakeholderList', summary: 'Replace name, kind, description and members' },

  { method: 'GET', path: '/api/distributions', action: 'read', subject: 'Distribution', summary: 'Distributions with per-recipient delivery and acknowledgement (?bulletinId=)' },
  { method: 'POST', path: '/api/distributions', action: 'create', subject: 'Distribution', summary: 'Send a locked version to a stakeholder list: PDF attached, HTML and text summary (201)' },
  { method: 'GET', path: '/api/distributions/:id', action: 'read', subject: 'Distribution', summary: 'One distribution with per-recipient status' },

  { method: 'GET', path: '/api/briefings', action: 'read', subject: 'Briefing', summary: 'The signed-in user\'s briefing inbox' },
  { method: 'GET', path: '/api/briefings/:id', action: 'read', subject: 'Briefing', summary: 'One briefing: the version sent, its figures and summary' },
  { method: 'GET', path: '/api/briefings/:id/pdf', action: 'read', subject: 'Briefing', summary: 'The PDF of the briefed version' },
  { method: 'POST', path: '/api/briefings/:id/acknowledge', action: 'acknowledge', subject: 'Briefing', summary: 'Acknowledge receipt {comment?} (idempotent)' },

  { method: 'GET', path: '/api/releases', action: 'read', subject: 'Release', summary: 'Press releases, most recently changed first (?state=)' },
  { method: 'POST', path: '/api/releases', action: 'create', subject: 'Release', summary: 'Start a release from an approved bulletin version {bulletinId, version} (figures copied; 201)' },
  { method: 'GET', path: '/api/releases/:id', action: 'read', subject: 'Release', summary: 'One release: wording, copied figures, plain language, schedule, allowed actions, history' },
  { method: 'PUT', path: '/api/releases/:id', action: 'update', subject: 'Release', summary: 'Save the draft wording; carries the revision it edits (409 with the current copy when stale)' },
  { method: 'POST', path: '/api/releases/:id/schedule', action: 'publish', subject: 'Release', summary: 'Schedule or reschedule publication {publishAt (ISO with zone), timeZone?}; embargoed until then' },
  { method: 'POST', path: '/api/releases/:id/cancel', action: 'transition', subject: 'Release', summary: 'Cancel a release that is not published {comment}' },
  { method: 'POST', path: '/api/releases/:id/transitions', action: 'transition', subject: 'Release', summary: 'Workflow action {action, comment?, publishAt?, timeZone?} (shared/releases/workflow.ts)' },
  { method: 'GET', path: '/api/releases/:id/versions/:version', action: 'read', subject: 'Release', summary: 'One locked (approved) wording with its hash' },
  { method: 'GET', path: '/api/public/releases', action: 'read', subject: 'Release', public: true, summary: 'Published press releases (no sign-in; nothing embargoed, draft or cancelled)' },
  { method: 'GET', path: '/api/public/releases/:slug', action: 'read', subject: 'Release', public: true, summary: 'One published press release (no sign-in)' },
] as const satisfies readonly RouteDef[];

interface CompiledRoute {
  def: RouteDef;
  pattern: RegExp;
}

function compile(path: string): RegExp {
  const source = path
    .split('/')
    .map((segment) => (segment.startsWith(':') ? '[^/]+' : segment.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')))
    .join('/');
  return new RegExp(`^${source}/?$`);
}

const COMPILED: CompiledRoute[] = (ROUTES as readonly RouteDef[]).map((def) => ({ def, pattern: compile(def.path) }));

/** The table entry for a request, or undefined. `path` is the URL path without the query string. */
export function findRoute(method: string, path: string): RouteDef | undefined {
  const upper = method.toUpperCase();
  const m = upper === 'HEAD' ? 'GET' : upper;
  return COMPILED.find((r) => r.def.method === m && r.pattern.test(path))?.def;
}

/** Whether any entry has this path (whatever the method). */
export function pathIsKnown(path: string): boolean {
  return COMPILED.some((r) => r.pattern.test(path));
}
