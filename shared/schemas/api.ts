// Small shapes shared by many routes.
import { z } from 'zod';

/** A positive integer id in a path segment. */
export const idParamsSchema = z.object({ id: z.coerce.number().int().positive() });
export type IdParams = z.infer<typeof idParamsSchema>;

export const healthResponseSchema = z.object({
  status: z.literal('ok'),
  version: z.string(),
  time: z.string(),
});
export type HealthResponse = z.infer<typeof healthResponseSchema>;

export const csrfResponseSchema = z.object({ csrfToken: z.string() });
export type CsrfResponse = z.infer<typeof csrfResponseSchema>;
