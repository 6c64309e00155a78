// The one error shape of the API: {"error": {"code", "message", "details"}}.
import { z } from 'zod';

export const ERROR_CODES = [
  'validation', // 400: body, query or params failed their zod schema; details.issues says where
  'bad_request', // 400: malformed JSON and the like
  'unauthenticated', // 401: not signed in
  'invalid_credentials', // 401: sign-in refused (same answer whether or not the e-mail exists)
  'forbidden', // 403: signed in but the ability does not allow it
  'csrf', // 403: missing or wrong x-csrf-token header / cookie
  'not_found', // 404
  'conflict', // 409: e.g. e-mail already taken
  'unprocessable', // 422: well-formed but not acceptable now (e.g. wrong current password)
  'INVALID_ASTROMETRY', // 422: an ADES file refused (issue 8): error.issues (and details.issues) list every bad line
  'rate_limited', // 429
  'internal', // 500: never carries a stack trace
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];

export const validationIssueSchema = z.object({
  /** Which part of the request: body, query or params. */
  in: z.enum(['body', 'query', 'params']),
  /** Dotted path inside that part ('' for the whole part). */
  path: z.string(),
  message: z.string(),
});
export type ValidationIssue = z.infer<typeof validationIssueSchema>;

export const errorBodySchema = z.object({
  error: z.object({
    code: z.enum(ERROR_CODES),
    message: z.string(),
    details: z.unknown().optional(),
  }),
});
export type ErrorBody = z.infer<typeof errorBodySchema>;
