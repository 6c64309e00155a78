// The five roles of a Tocsin office. One list, used by the schema, the abilities, the seed and the client.
export const ROLES = ['admin', 'analyst', 'reviewer', 'communications', 'liaison'] as const;

export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  analyst: 'Analyst',
  reviewer: 'Reviewer',
  communications: 'Communications',
  liaison: 'Government liaison',
};

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}
