// Builds the React client with Vite when dist/client is missing or older than its inputs.
// Never throws: when the client cannot be built, the server still starts and says so.
// Uses the same lock file and build-beside-then-rename swap as tests/browser/harness.ts, so a
// start and a browser test building at the same moment do not trample each other.
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

export interface ClientBuildResult {
  built: boolean;
  clientDir: string;
  /** Why the client is not available (or is stale), when so. */
  problem?: string;
}

/** The client bundle also contains ./shared, so a change there needs a rebuild too. */
const CLIENT_INPUTS = ['src', 'shared', 'index.html', 'vite.config.ts'];

function newestMtimeMs(p: string): number {
  if (!fs.existsSync(p)) return 0;
  const st = fs.statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of fs.readdirSync(p)) newest = Math.max(newest, newestMtimeMs(path.join(p, entry)));
  return newest;
}

function isStale(root: string): boolean {
  const index = path.join(root, 'dist/client/index.html');
  if (!fs.existsSync(index)) return true;
  const builtAt = fs.statSync(index).mtimeMs;
  return CLIENT_INPUTS.some((p) => newestMtimeMs(path.join(root, p)) > builtAt);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function withLock<T>(lock: string, fn: () => Promise<T>): Promise<T> {
  const started = Date.now();
  for (;;) {
    try {
      fs.closeSync(fs.openSync(lock, 'wx'));
      break;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
      try {
        if (Date.now() - fs.statSync(lock).mtimeMs > 180_000) fs.rmSync(lock, { force: true });
      } catch {
        /* removed meanwhile */
      }
      if (Date.now() - started > 240_000) throw new Error(`timed out waiting for the build lock ${lock}`);
      await sleep(250);
    }
  }
  try {
    fs.writeFileSync(lock, String(process.pid));
    return await fn();
  } finally {
    fs.rmSync(lock, { force: true });
  }
}

function runViteBuild(root: string, outDir: string): Promise<number | null> {
  const vite = path.join(root, 'node_modules/vite/bin/vite.js');
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [vite, 'build', '--logLevel', 'warn', '--outDir', outDir, '--emptyOutDir'], { cwd: root, stdio: 'inherit' });
    child.on('error', () => resolve(null));
    child.on('exit', (code) => resolve(code));
  });
}

export async function ensureClientBuilt(root: string): Promise<ClientBuildResult> {
  const clientDir = path.join(root, 'dist/client');
  const hasBuild = () => fs.existsSync(path.join(clientDir, 'index.html'));
  if (!fs.existsSync(path.join(root, 'src')) || !fs.existsSync(path.join(root, 'index.html'))) {
    return hasBuild() ? { built: true, clientDir } : { built: false, clientDir, problem: 'src/ or index.html is missing, so there is no client to build' };
  }
  if (!isStale(root)) return { built: true, clientDir };
  fs.mkdirSync(path.join(root, 'dist'), { recursive: true });
  try {
    return await withLock(path.join(root, 'dist/.client-build.lock'), async () => {
      if (!isStale(root)) return { built: true, clientDir };
      console.log(hasBuild() ? 'Client sources changed: rebuilding the client with Vite...' : 'Building the client with Vite (first start)...');
      const tmp = path.join(root, `dist/client.tmp-${process.pid}`);
      const code = await runViteBuild(root, tmp);
      if (code !== 0 || !fs.existsSync(path.join(tmp, 'index.html'))) {
        fs.rmSync(tmp, { recursive: true, force: true });
        const problem = `the Vite build failed (exit code ${code})`;
        return hasBuild() ? { built: true, clientDir, problem: `${problem}; serving the previous build` } : { built: false, clientDir, problem };
      }
      const old = path.join(root, `dist/client.old-${process.pid}`);
      if (fs.existsSync(clientDir)) fs.renameSync(clientDir, old);
      fs.renameSync(tmp, clientDir);
      fs.rmSync(old, { recursive: true, force: true });
      return { built: true, clientDir };
    });
  } catch (err) {
    return { built: hasBuild(), clientDir, problem: `the client could not be built: ${(err as Error).message}` };
  }
}
