// zod validation of params, query and body; failures become 400 {code:'validation', details:{issues}}.
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type { z } from 'zod';
import type { ValidationIssue } from '../../shared/schemas/errors';
import { HttpError } from '../errors';

type Part = 'params' | 'query' | 'body';
type Schemas = Partial<Record<Part, z.ZodType>>;
type Parsed<S extends Schemas> = { [K in Part]: S[K] extends z.ZodType ? z.output<S[K]> : undefined };

/** Parse the request parts named in `schemas`; throw a 400 listing every problem. */
export function parseRequest<S extends Schemas>(req: Request, schemas: S): Parsed<S> {
  const out: Record<string, unknown> = { params: undefined, query: undefined, body: undefined };
  const issues: ValidationIssue[] = [];
  for (const part of ['params', 'query', 'body'] as const) {
    const schema = schemas[part];
    if (!schema) continue;
    const input = part === 'body' ? (req.body ?? {}) : req[part];
    const result = schema.safeParse(input);
    if (result.success) out[part] = result.data;
    else for (const issue of result.error.issues) issues.push({ in: part, path: issue.path.map(String).join('.'), message: issue.message });
  }
  if (issues.length) throw new HttpError(400, 'validation', 'Some fields are not valid', { issues });
  return out as Parsed<S>;
}

/**
 * A route handler with validated input:
 *   router.post('/users', handle({ body: createUserBodySchema }, async ({ body, req }) => ...))
 * The function returns the JSON to send (status 200, or `status` from the options), or undefined for 204.
 */
export function handle<S extends Schemas, R>(
  schemas: S,
  fn: (input: Parsed<S> & { req: Request; res: Response }) => R | Promise<R>,
  options: { status?: number } = {},
): RequestHandler {
  return async (req: Request, res: Response, next: NextFunction) => {
    try {
      const input = parseRequest(req, schemas);
      const result = await fn({ ...input, req, res });
      if (res.headersSent) return;
      if (result === undefined) res.status(204).end();
      else res.status(options.status ?? 200).json(result);
    } catch (err) {
      next(err);
    }
  };
}
