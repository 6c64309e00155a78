// The Tocsin process: migrate, seed, build the client when needed, start the local mail fake
// (unless SMTP_URL is set), serve API and client from one origin, print where everything is.
import http from 'node:http';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Transporter } from 'nodemailer';
import { buildApp } from './app';
import { ensureClientBuilt } from './clientBuild';
import { loadConfig } from './config';
import { closeDb, openDb } from './db/client';
import { runMigrations } from './db/migrate';
import { DEMO_USERS, DEMO_OFFICE, seed } from './db/seed';
import { createTransport } from './services/mail';
import { seedDemoBulletins } from './services/bulletins/demo';
import { closeBulletinPdfWorkers } from './services/pdf';
import { seedDemoReleases } from './services/releases/demo';
import { queueDemoFit } from './services/od/demo';
import { createFitRunner } from './services/od/fitRunner';
import { queueDemoRuns } from './services/runs/demoRuns';
import { createRunner } from './services/runs/runner';
import { ROLE_LABELS } from '../shared/roles';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

async function main(): Promise<void> {
  const config = loadConfig();
  const db = openDb(config.databaseFile);
  runMigrations(db);
  const { inserted } = await seed(db);
  console.log(`Database ${config.databaseFile}: migrations applied, demo seed ${inserted ? `added ${inserted} rows` : 'already present'}.`);

  const client = await ensureClientBuilt(ROOT);

  let stopMailFake: (() => Promise<void>) | undefined;
  let transport: Transporter;
  let inboxUrl: string | undefined;
  if (config.smtpUrl) {
    transport = createTransport(config.smtpUrl);
  } else {
    const { MailDev } = await import('maildev');
    const maildev = new MailDev({ smtp: config.smtpPort, web: config.mailWebPort, ip: config.host ?? '0.0.0.0', webIp: config.host ?? '0.0.0.0', silent: true });
    await maildev.start();
    stopMailFake = () => maildev.stop();
    transport = createTransport(`smtp://127.0.0.1:${config.smtpPort}`);
    inboxUrl = `http://localhost:${config.mailWebPort}`;
  }

  const { app, services } = buildApp({ db, config, mailTransport: transport, clientDir: client.clientDir });
  const server = http.createServer(app);
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(config.port, config.host, () => resolve());
  });

  const timers = [
    setInterval(() => void services.mail.deliverPending(), 30_000),
    setInterval(() => services.sessionStore.prune(), 10 * 60_000),
  ];
  for (const t of timers) t.unref();
  void services.mail.deliverPending();

  // Press releases: publishes what fell due while the server was down (recording how late), then each at its time.
  services.releaseScheduler.start();

  // Assessment runs: resumes runs a previous process left behind, then works the queue (server/services/runs).
  const demoRuns = queueDemoRuns(db, services.runs, DEMO_USERS.find((u) => u.role === 'analyst')!.email);
  if (demoRuns.length) console.log(`Demo assessment runs queued: ${demoRuns.map((id) => `#${id}`).join(', ')} (computed in the background).`);
  const runner = createRunner(db, services.runs);
  runner.start();
  // Orbit fits (issue 8): the demo fit of the visitor's astrometry on the first start, then the fit queue on the same
  // durable job machinery (server/services/od/fitRunner.ts).
  const demoFit = queueDemoFit(db, services.fits, DEMO_USERS.find((u) => u.role === 'analyst')!.email);
  if (demoFit !== null) console.log(`Demo orbit fit queued: #${demoFit} (gravity-only and with A1, A2; computed in the background).`);
  const fitRunner = createFitRunner(db, services.fits);
  fitRunner.start();
  // Demo bulletins (one approved and distributed, one in review) are made once the demo runs are done.
  const demoBulletins = setInterval(() => {
    seedDemoBulletins(services, DEMO_OFFICE.emailDomain)
      .then((state) => {
        // Demo releases (one published, one scheduled) follow from the approved demo bulletin (issue 7).
        if (state !== 'done') return;
        clearInterval(demoBulletins);
        seedDemoReleases(services, DEMO_OFFICE.emailDomain);
      })
      .catch((err) => {
        clearInterval(demoBulletins);
        console.warn('Demo bulletins could not be made:', err instanceof Error ? err.message : err);
      });
  }, 3000);
  demoBulletins.unref();
  timers.push(demoBulletins);

  const width = Math.max(...DEMO_USERS.map((u) => u.email.length));
  console.log('');
  console.log(`Tocsin is running at ${config.publicUrl}   (${DEMO_OFFICE.name}, demo data)`);
  if (!client.built) console.log(`  !! The web client is NOT built: ${client.problem}. Only the API under /api works.`);
  else if (client.problem) console.log(`  !! ${client.problem}.`);
  console.log(inboxUrl ? `Mail inbox (local fake): ${inboxUrl}   (SMTP on port ${config.smtpPort})` : `Mail goes out through ${config.smtpUrl!.replace(/\/\/[^@/]*@/, '//***@')}`);
  if (config.sessionSecretGenerated) console.log('SESSION_SECRET not set: using a random one, so sessions end when the server restarts.');
  console.log('Demo sign-ins:');
  for (const u of DEMO_USERS) console.log(`  ${ROLE_LABELS[u.role].padEnd(20)} ${u.email.padEnd(width)}  ${u.password}`);
  console.log('');

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`${signal}: shutting down`);
    for (const t of timers) clearInterval(t);
    services.releaseScheduler.stop();
    // Running engine work is stopped and its runs go back to the queue; the next start resumes them.
    await Promise.all([runner.stop(), fitRunner.stop()]);
    await closeBulletinPdfWorkers(); // the bulletin PDF thread (server/services/pdf/pool.ts)
    server.closeAllConnections();
    await new Promise<void>((resolve) => server.close(() => resolve()));
    transport.close();
    await stopMailFake?.().catch(() => undefined);
    closeDb(db);
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

main().catch((err) => {
  console.error('Tocsin could not start:', err instanceof Error ? err.message : err);
  process.exit(1);
});
