import { useAbility } from '@casl/react';
import type { AppAbility } from '../../shared/abilities';

/** The current user's ability (from the nearest AbilityProvider), typed with Tocsin's actions and subjects. */
export function useAppAbility(): AppAbility {
  return useAbility<AppAbility>();
}
