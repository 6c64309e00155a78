#!/usr/bin/env node
// `npm test`: the whole suite (unit, API, browser, reference checks).
// Ensures the outside tools the tests need are present (Debian's chromium, swetest with its data files,
// poppler-utils); when one is missing and we are root, installs it with apt-get; otherwise fails with a
// message saying what to install. Browser and reference tests never skip silently.
// Extra arguments are passed to vitest: `npm test -- tests/unit/engine-time.test.ts`.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { tmpdir } from 'node:os';

const requirements = [
  { path: '/usr/bin/chromium', pkg: 'chromium', why: 'browser tests (headless Chromium through playwright-core)' },
  { path: '/usr/bin/swetest', pkg: 'swetest', why: 'ephemeris reference checks' },
  { path: '/usr/share/libswe/ephe/sepl_18.se1', pkg: 'swe-basic-data', why: 'swetest data files (DE431-derived)' },
  { path: '/usr/bin/pdftotext', pkg: 'poppler-utils', why: 'PDF text extraction in document tests' },
];

const missing = requirements.filter((r) => !existsSync(r.path));
if (missing.length > 0) {
  const pkgs = [...new Set(missing.map((m) => m.pkg))];
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  if (!isRoot) {
    console.error('The test suite needs Debian packages that are not installed:');
    for (const m of missing) console.error(`  ${m.pkg}  (${m.path}: ${m.why})`);
    console.error(`Install them with:  sudo apt-get update && sudo apt-get install -y ${pkgs.join(' ')}`);
    process.exit(1);
  }
  console.log(`Installing missing Debian packages: ${pkgs.join(' ')}`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  for (const args of [['update'], ['install', '-y', ...pkgs]]) {
    const r = spawnSync('apt-get', args, { stdio: 'inherit', env });
    if (r.status !== 0) {
      console.error(`apt-get ${args.join(' ')} failed; install ${pkgs.join(' ')} by hand.`);
      process.exit(1);
    }
  }
}

const outDir = join(tmpdir(), 'tocsin-test');
mkdirSync(outDir, { recursive: true });
const jsonFile = join(outDir, `vitest-${process.pid}.json`);
const vitest = spawnSync(
  process.execPath,
  [
    'node_modules/vitest/vitest.mjs',
    'run',
    '--reporter=default',
    '--reporter=json',
    `--outputFile.json=${jsonFile}`,
    ...process.argv.slice(2),
  ],
  { stdio: 'inherit', env: { ...process.env, NODE_ENV: 'test' } },
);

// One plain closing line that any CI reader understands.
try {
  const report = JSON.parse(readFileSync(jsonFile, 'utf8'));
  const passed = report.numPassedTests ?? 0;
  // A file that fails to load counts as one failure even when no test in it ran.
  const failed = (report.numFailedTests ?? 0) || (vitest.status !== 0 ? Math.max(1, report.numFailedTestSuites ?? 0) : 0);
  const skipped = (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0);
  console.log(`Tests: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
  if (passed === 0) {
    console.error('No test was executed.');
    process.exit(1);
  }
} catch (err) {
  console.error(`Could not read the test report (${err.message}).`);
  process.exit(vitest.status || 1);
}
process.exit(vitest.status ?? 1);
