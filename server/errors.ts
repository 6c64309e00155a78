// Errors that become the uniform JSON error body in middleware/errorHandler.ts.
import type { ErrorCode } from '../shared/schemas/errors';

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const notFound = (message = 'Not found') => new HttpError(404, 'not_found', message);
export const conflict = (message: string, details?: unknown) => new HttpError(409, 'conflict', message, details);
export const unprocessable = (message: string, details?: unknown) => new HttpError(422, 'unprocessable', message, details);
export const unauthenticated = (message = 'Please sign in') => new HttpError(401, 'unauthenticated', message);
export const forbidden = (message = 'You are not allowed to do this') => new HttpError(403, 'forbidden', message);
