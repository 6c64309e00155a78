// One sentence per role for the home page: what the role is for in the office.
// Descriptive text only; what a user may do is decided by the ability, never by these.
import type { Role } from '../../shared/roles';

export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  admin: 'You keep the office running in Tocsin: who has access, and in which role.',
  analyst: 'You turn orbit solutions into close-approach and impact-probability assessments.',
  reviewer: 'You check the analysts’ runs and figures and sign off on what goes out.',
  communications: 'You prepare and publish public releases from approved assessments, on schedule.',
  liaison: 'You receive briefings for government officials and acknowledge them.',
};
