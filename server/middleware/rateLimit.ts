// Sign-in rate limit: `max` failed attempts per client IP and e-mail within `windowMs`, then 429.
// Successful sign-ins do not count.
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { sendError } from './errorHandler';

export function signInRateLimit({ max, windowMs }: { max: number; windowMs: number }) {
  return rateLimit({
    windowMs,
    limit: max,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => {
      const email = typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase() : '';
      return `${ipKeyGenerator(req.ip ?? '')}|${email}`;
    },
    handler: (_req, res) => sendError(res, 429, 'rate_limited', 'Too many sign-in attempts. Wait a while and try again.'),
  });
}
