// Configuration from the environment, read once at start.
import crypto from 'node:crypto';

export interface Config {
  env: 'production' | 'development' | 'test';
  port: number;
  /** Host to listen on (HOST; default all interfaces). */
  host: string | undefined;
  /** SQLite file path (DATABASE_URL; a `file:` prefix is accepted). */
  databaseFile: string;
  /** Absolute origin used in links in e-mails (PUBLIC_URL; default http://localhost:PORT). */
  publicUrl: string;
  /** SMTP transport URL; when unset, index.ts starts the local MailDev fake. */
  smtpUrl: string | undefined;
  smtpPort: number;
  mailWebPort: number;
  mailFrom: string;
  sessionSecret: string;
  /** True when SESSION_SECRET was not given and one was made up for this run. */
  sessionSecretGenerated: boolean;
  /** Sign-in attempts allowed per IP and e-mail within the window. */
  signInRateLimit: { max: number; windowMs: number };
  session: { idleMs: number; absoluteMs: number };
  /** Express 'trust proxy' setting (TRUST_PROXY, e.g. 1 or loopback) when behind a reverse proxy. */
  trustProxy: string | number | false;
}

function int(name: string, fallback: number, env: NodeJS.ProcessEnv): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 65535) throw new Error(`${name} must be a port number, got "${raw}"`);
  return n;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const mode = env.NODE_ENV === 'production' ? 'production' : env.NODE_ENV === 'test' ? 'test' : 'development';
  const port = int('PORT', 3000, env);
  const rawDb = env.DATABASE_URL?.trim() || 'data/tocsin.sqlite';
  const databaseFile = rawDb.replace(/^file:(\/\/)?/, '');
  let sessionSecret = env.SESSION_SECRET ?? '';
  let generated = false;
  if (!sessionSecret) {
    if (mode === 'production') throw new Error('SESSION_SECRET is required when NODE_ENV=production');
    sessionSecret = crypto.randomBytes(32).toString('hex');
    generated = true;
  }
  return {
    env: mode,
    port,
    host: env.HOST || undefined,
    databaseFile,
    publicUrl: (env.PUBLIC_URL || `http://localhost:${port}`).replace(/\/+$/, ''),
    smtpUrl: env.SMTP_URL || undefined,
    smtpPort: int('SMTP_PORT', 1025, env),
    mailWebPort: int('MAIL_WEB_PORT', 1080, env),
    mailFrom: env.MAIL_FROM || 'Tocsin <tocsin@hspdo.example>',
    sessionSecret,
    sessionSecretGenerated: generated,
    signInRateLimit: { max: 10, windowMs: 15 * 60_000 },
    session: { idleMs: 2 * 3_600_000, absoluteMs: 12 * 3_600_000 },
    trustProxy: env.TRUST_PROXY ? (/^\d+$/.test(env.TRUST_PROXY) ? Number(env.TRUST_PROXY) : env.TRUST_PROXY) : false,
  };
}
