// CSRF protection by the signed double-submit cookie pattern (csrf-csrf): GET /api/csrf sets an
// httpOnly cookie and returns the same token, which every POST/PUT/PATCH/DELETE must send back in
// the x-csrf-token header. The token is bound (HMAC) to the session id once signed in, so a sign-in
// or sign-out makes the old token useless; the session responses carry the new one.
import type { Request, Response } from 'express';
import { doubleCsrf } from 'csrf-csrf';

export const CSRF_COOKIE = 'tocsin.csrf';

export function createCsrf(secret: string, secure: boolean) {
  const { doubleCsrfProtection, generateCsrfToken } = doubleCsrf({
    getSecret: () => secret,
    getSessionIdentifier: (req: Request) => (req.session?.userId !== undefined ? req.sessionID : 'anonymous'),
    cookieName: CSRF_COOKIE,
    cookieOptions: { sameSite: 'lax', secure, httpOnly: true, path: '/' },
    getCsrfTokenFromRequest: (req: Request) => req.get('x-csrf-token'),
  });
  return {
    protect: doubleCsrfProtection,
    /** A token valid for the current session (reused when the cookie still fits, else new). */
    token: (req: Request, res: Response, overwrite = false) => generateCsrfToken(req, res, { overwrite }),
  };
}
export type Csrf = ReturnType<typeof createCsrf>;
