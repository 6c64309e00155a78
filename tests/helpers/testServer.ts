// Starts a complete Tocsin server for API and browser tests: a fresh temporary SQLite file,
// migrations, the demo seed (unless seed:false), mail to an in-process SMTP fake, listening on
// 127.0.0.1 with a free port, serving dist/client when it has been built.
//
//   const srv = await startTestServer();
//   await fetch(`${srv.url}/api/health`);
//   const mails = await srv.mail.messages();
//   await srv.close();
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { simpleParser } from 'mailparser';
import nodemailer from 'nodemailer';
import { SMTPServer } from 'smtp-server';
import { buildApp } from '../../server/app';
import { loadConfig, type Config } from '../../server/config';
import { closeDb, openDb, type Db } from '../../server/db/client';
import { runMigrations } from '../../server/db/migrate';
import { DEMO_USERS, seed as seedDemo } from '../../server/db/seed';
import type { Services } from '../../server/services';
import { createRunner, type Runner, type RunnerOptions } from '../../server/services/runs/runner';

export { DEMO_USERS };

export interface TestMail {
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  date: Date;
  /** Attached files as parsed from the MIME message. */
  attachments: { filename: string; contentType: string; content: Buffer }[];
}

export interface TestServer {
  url: string;
  db: Db;
  /** Path of the temporary SQLite file. */
  databaseFile: string;
  config: Config;
  services: Services;
  /** The assessment-run runner, when started with the `runner` option. */
  runner: Runner | undefined;
  mail: {
    /** Port of the in-process SMTP fake (127.0.0.1). */
    port: number;
    /** Every message received so far, oldest first. */
    messages(): Promise<TestMail[]>;
    /** Wait (up to timeoutMs) for a message to this address and return the newest one. */
    waitFor(to: string, timeoutMs?: number): Promise<TestMail>;
    clear(): void;
    /** Stop the SMTP fake (connections are refused, so mail stays in the outbox) and start it again on the same port. */
    stop(): Promise<void>;
    start(): Promise<void>;
  };
  close(): Promise<void>;
}

export interface TestServerOptions {
  /** Seed the demo office and users (default true). */
  seed?: boolean;
  /** Override configuration (e.g. a small sign-in rate limit). */
  config?: Partial<Config>;
  /** Serve the built client from this folder (default dist/client when it exists). */
  clientDir?: string;
  /** Start the assessment-run runner (true, or its options); close() stops it (releasing its runs). */
  runner?: boolean | RunnerOptions;
  /**
   * Use this SQLite file instead of a fresh temporary one (e.g. a second server on the database of a first, to
   * test a restart). close() then leaves the file in place.
   */
  databaseFile?: string;
}

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

/**
 * An SMTP server in this process that keeps every message it receives. `stop()` closes it and `start()` listens
 * again on the same port (messages received before are kept).
 */
export async function startSmtpFake(opts: { port?: number } = {}): Promise<{
  port: number;
  messages(): Promise<TestMail[]>;
  clear(): void;
  stop(): Promise<void>;
  start(): Promise<void>;
  close(): Promise<void>;
}> {
  let pending: Promise<TestMail>[] = [];
  const create = () =>
    new SMTPServer({
      authOptional: true,
      disabledCommands: ['AUTH', 'STARTTLS'],
      logger: false,
      onData(stream, sessionInfo, callback) {
        const to = sessionInfo.envelope.rcptTo.map((r) => r.address);
        const parsed = simpleParser(stream).then((m) => ({
          from: m.from?.text ?? '',
          to,
          subject: m.subject ?? '',
          text: m.text ?? '',
          html: typeof m.html === 'string' ? m.html : '',
          date: m.date ?? new Date(),
          attachments: m.attachments.map((a) => ({ filename: a.filename ?? '', contentType: a.contentType, content: a.content })),
        }));
        pending.push(parsed);
        parsed.then(() => callback(), (err) => callback(err as Error));
      },
    });
  let server: SMTPServer | null = null;
  const listen = async (port: number) => {
    const s = create();
    await new Promise<void>((resolve, reject) => {
      s.server.once('error', reject);
      s.listen(port, '127.0.0.1', () => resolve());
    });
    server = s;
    return (s.server.address() as AddressInfo).port;
  };
  const close = async () => {
    const s = server;
    server = null;
    if (s) await new Promise<void>((resolve) => s.close(() => resolve()));
  };
  const port = await listen(opts.port ?? 0);
  return {
    port,
    messages: () => Promise.all(pending),
    clear: () => {
      pending = [];
    },
    stop: close,
    async start() {
      if (!server) await listen(port);
    },
    close,
  };
}

export async function startTestServer(opts: TestServerOptions = {}): Promise<TestServer> {
  const dir = opts.databaseFile ? undefined : fs.mkdtempSync(path.join(os.tmpdir(), 'tocsin-test-'));
  const databaseFile = opts.databaseFile ?? path.join(dir!, 'tocsin.sqlite');
  const db = openDb(databaseFile);
  runMigrations(db);
  if (opts.seed !== false) await seedDemo(db);

  const smtp = await startSmtpFake();
  const mailTransport = nodemailer.createTransport({ host: '127.0.0.1', port: smtp.port, secure: false, ignoreTLS: true });

  // Listen first so the public URL (used in invitation links) is known before the app is built.
  const server = http.createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  const config: Config = {
    ...loadConfig({ NODE_ENV: 'test', SESSION_SECRET: 'test-session-secret-0123456789abcdef' }),
    databaseFile,
    publicUrl: url,
    ...opts.config,
  };
  const clientDir = opts.clientDir ?? path.join(ROOT, 'dist/client');
  const { app, services } = buildApp({ db, config, mailTransport, clientDir, logError: (err) => console.error('[test server]', err) });
  server.on('request', app);
  const runner = opts.runner ? createRunner(db, services.runs, { log: () => undefined, ...(opts.runner === true ? {} : opts.runner) }) : undefined;
  runner?.start();

  const messages = smtp.messages;
  return {
    url,
    db,
    databaseFile,
    config,
    services,
    runner,
    mail: {
      port: smtp.port,
      messages,
      clear: smtp.clear,
      stop: smtp.stop,
      start: smtp.start,
      async waitFor(to, timeoutMs = 5000) {
        const until = Date.now() + timeoutMs;
        for (;;) {
          const found = (await messages()).filter((m) => m.to.includes(to.toLowerCase()));
          if (found.length) return found[found.length - 1];
          if (Date.now() > until) throw new Error(`No e-mail to ${to} within ${timeoutMs} ms`);
          await new Promise((r) => setTimeout(r, 50));
        }
      },
    },
    async close() {
      await runner?.stop();
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      mailTransport.close();
      await smtp.close();
      closeDb(db);
      if (dir) fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
