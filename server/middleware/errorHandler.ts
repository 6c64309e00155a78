// Turns every error into {"error": {"code", "message", "details"}} with the right status.
// Never sends a stack trace; unexpected errors are logged on the server and answered 500.
import type { ErrorRequestHandler, RequestHandler, Response } from 'express';
import type { ErrorBody, ErrorCode } from '../../shared/schemas/errors';
import { HttpError } from '../errors';

export function sendError(res: Response, status: number, code: ErrorCode, message: string, details?: unknown): void {
  const body: ErrorBody = { error: { code, message, ...(details !== undefined ? { details } : {}) } };
  res.status(status).json(body);
}

/** For /api paths that matched nothing. */
export const apiNotFound: RequestHandler = (req, res) => {
  sendError(res, 404, 'not_found', `No API route ${req.method} ${req.path}`);
};

export function errorHandler(log: (err: unknown) => void = (err) => console.error(err)): ErrorRequestHandler {
  return (err, _req, res, next) => {
    if (res.headersSent) return next(err);
    if (err instanceof HttpError) return sendError(res, err.status, err.code, err.message, err.details);
    const e = err as { type?: string; code?: string; status?: number };
    if (e?.code === 'EBADCSRFTOKEN') {
      return sendError(res, 403, 'csrf', 'Missing or invalid CSRF token: fetch GET /api/csrf and send it as the x-csrf-token header');
    }
    if (e?.type === 'entity.parse.failed') return sendError(res, 400, 'bad_request', 'The request body is not valid JSON');
    if (e?.type === 'entity.too.large') return sendError(res, 400, 'bad_request', 'The request body is too large');
    if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) {
      return sendError(res, e.status, e.status === 404 ? 'not_found' : 'bad_request', 'The request could not be handled');
    }
    log(err);
    sendError(res, 500, 'internal', 'Something went wrong on the server');
  };
}
