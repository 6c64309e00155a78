// What a user may do with astrometry and orbit fits, in one place (the screens ask these, never role names).
// The ability (shared/abilities.ts) decides: analysts, reviewers and admins read; analysts upload astrometry,
// exclude observations, start, cancel and adopt fits; reviewers may start a fit to check one; admins keep the
// observatory table; communications and liaison see none of it (issue 8 contract).
import type { AppAbility } from '../../../shared/abilities';

export const odAccess = (ability: AppAbility) => ({
  readAstrometry: ability.can('read', 'Astrometry'),
  readFits: ability.can('read', 'Fit'),
  upload: ability.can('create', 'Astrometry'),
  exclude: ability.can('update', 'Astrometry'),
  startFit: ability.can('create', 'Fit'),
  cancelFit: ability.can('delete', 'Fit'),
  adopt: ability.can('adopt', 'Fit'),
  readObservatories: ability.can('read', 'Observatory'),
  manageObservatories: ability.can('create', 'Observatory'),
});
export type OdAccess = ReturnType<typeof odAccess>;
