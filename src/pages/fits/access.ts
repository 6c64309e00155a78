// What a user may do with astrometry and orbit fits, in one place (the screens ask these, never role names).
// The ability (shared/abilities.ts) decides: analysts, reviewers and admins read; analysts upload astrometry,
// exclude observations, start, cancel and adopt fits; reviewers may start a fit to check one; communications and
// liaison see none of it (issue 8 contract).
import type { AppAbility } from '../../../shared/abilities';

export const odAccess = (ability: AppAbility) => ({
  read: ability.can('read', 'Solution'),
  upload: ability.can('create', 'Solution'),
  exclude: ability.can('create', 'Solution'),
  startFit: ability.can('create', 'Run'),
  cancelFit: ability.can('create', 'Solution') || ability.can('delete', 'Run'),
  adopt: ability.can('create', 'Solution'),
  readObservatories: ability.can('read', 'Observatory'),
  manageObservatories: ability.can('create', 'Observatory'),
});
export type OdAccess = ReturnType<typeof odAccess>;
