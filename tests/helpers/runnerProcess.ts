// A stand-alone runner process for crash tests: opens the SQLite file given as the first argument, starts the
// assessment-run runner on it (lease 60 s, so a takeover by lease expiry cannot happen during a test), prints
// "ready <owner>" and works until killed.
//   node --import tsx tests/helpers/runnerProcess.ts /tmp/x/tocsin.sqlite
import { openDb } from '../../server/db/client';
import { createRunner } from '../../server/services/runs/runner';
import { createRunService } from '../../server/services/runs/service';

const file = process.argv[2];
if (!file) throw new Error('usage: runnerProcess.ts DATABASE_FILE');
const db = openDb(file);
const runs = createRunService(db);
const runner = createRunner(db, runs, { leaseMs: 60_000, pollMs: 100, progressWriteMs: 100, log: (m) => process.stderr.write(`[child runner] ${m}\n`) });
runner.start();
process.stdout.write(`ready ${runner.owner}\n`);
setInterval(() => undefined, 1 << 30);
