// Shared set-up for the browser tests: build the client once when it is stale, start a test
// server (tests/helpers/testServer.ts), and drive Debian's Chromium through playwright-core.
import { existsSync, mkdirSync, openSync, closeSync, readdirSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll } from 'vitest';
import { startTestServer, type TestServer, type TestServerOptions } from '../helpers/testServer';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
export const CLIENT_DIR = path.join(ROOT, 'dist/client');
export const CHROMIUM_PATH = '/usr/bin/chromium';
export const SHOTS_DIR = '/tmp/shots';

/** The client bundle also contains ./shared (abilities, roles, schemas): a change there needs a rebuild too. */
const CLIENT_INPUTS = ['src', 'shared', 'index.html', 'vite.config.ts'];

function newestMtimeMs(p: string): number {
  if (!existsSync(p)) return 0;
  const st = statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of readdirSync(p)) newest = Math.max(newest, newestMtimeMs(path.join(p, entry)));
  return newest;
}

/** True when dist/client is missing or older than any client input. */
export function clientIsStale(): boolean {
  const built = path.join(CLIENT_DIR, 'index.html');
  if (!existsSync(built)) return true;
  const builtAt = statSync(built).mtimeMs;
  return CLIENT_INPUTS.some((p) => newestMtimeMs(path.join(ROOT, p)) > builtAt);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * Build the client with Vite's build() API when it is stale. Safe when several test files (each
 * in its own process) call it at once: an exclusive lock file serialises builds, the staleness
 * check is repeated under the lock, and the new bundle is built beside dist/client and swapped in
 * by rename so a server already serving the old bundle never sees a half-written folder.
 */
export async function ensureClientBuilt(): Promise<void> {
  if (!clientIsStale()) return;
  mkdirSync(path.join(ROOT, 'dist'), { recursive: true });
  const lock = path.join(ROOT, 'dist/.client-build.lock');
  const started = Date.now();
  for (;;) {
    try {
      closeSync(openSync(lock, 'wx'));
      break;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
      // A lock older than 3 minutes belongs to a build that died: take it over.
      try {
        if (Date.now() - statSync(lock).mtimeMs > 180_000) rmSync(lock, { force: true });
      } catch {
        /* removed meanwhile */
      }
      if (Date.now() - started > 240_000) throw new Error(`Timed out waiting for the client build lock ${lock}`);
      await sleep(250);
    }
  }
  try {
    writeFileSync(lock, String(process.pid));
    if (!clientIsStale()) return; // another test file built it while we waited
    const { build } = await import('vite');
    const tmp = path.join(ROOT, `dist/client.tmp-${process.pid}`);
    // Vitest sets NODE_ENV=test, which would make Vite emit React's development build; the
    // bundle in dist/client is also the one `npm start` serves, so build it for production.
    const nodeEnv = process.env.NODE_ENV;
    process.env.NODE_ENV = 'production';
    try {
      await build({
        root: ROOT,
        configFile: path.join(ROOT, 'vite.config.ts'),
        mode: 'production',
        logLevel: 'warn',
        build: { outDir: tmp, emptyOutDir: true },
      });
    } finally {
      process.env.NODE_ENV = nodeEnv;
    }
    const old = path.join(ROOT, `dist/client.old-${process.pid}`);
    if (existsSync(CLIENT_DIR)) renameSync(CLIENT_DIR, old);
    renameSync(tmp, CLIENT_DIR);
    rmSync(old, { recursive: true, force: true });
  } finally {
    rmSync(lock, { force: true });
  }
}

/** What a browser test file works with: its test server and Chromium. */
export interface BrowserSuite {
  server: TestServer;
  browser: Browser;
}

export interface BrowserSuiteHooks {
  /** Time for the set-up (client build, server start, browser launch), ms; the configured hookTimeout by default. */
  setupTimeoutMs?: number;
  /** Run once the server is up, before the browser starts (e.g. start a background service). */
  afterStart?: (server: TestServer) => unknown;
  /** Run before the browser and the server close (e.g. stop that service). */
  beforeClose?: (server: TestServer) => unknown;
}

/**
 * The set-up of a browser test file: before its tests, build the client when stale, start a test server with
 * `serverOptions` and launch Chromium; after them, close both. The returned object's `server` and `browser` are
 * set once the set-up has run: read them inside tests and helpers, not when the file loads.
 */
export function browserSuite(serverOptions: TestServerOptions = {}, hooks: BrowserSuiteHooks = {}): BrowserSuite {
  const suite = {} as BrowserSuite;
  beforeAll(async () => {
    await ensureClientBuilt();
    suite.server = await startTestServer(serverOptions);
    await hooks.afterStart?.(suite.server);
    suite.browser = await launchBrowser();
  }, hooks.setupTimeoutMs);
  afterAll(async () => {
    if (suite.server) await hooks.beforeClose?.(suite.server);
    await suite.browser?.close();
    await suite.server?.close();
  });
  return suite;
}

/** Launch Debian's Chromium headless. Fails (never skips) with a clear message when it is missing. */
export async function launchBrowser(): Promise<Browser> {
  if (!existsSync(CHROMIUM_PATH)) {
    throw new Error(
      `Browser tests need Debian's Chromium at ${CHROMIUM_PATH}, which is missing. ` +
        'Install it with `sudo apt-get install -y chromium` (npm test does this itself when run as root).',
    );
  }
  // playwright-core's launch() gives every browser a fresh temporary user-data-dir of its own.
  return chromium.launch({
    executablePath: CHROMIUM_PATH,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

/**
 * A fresh context (own cookies) with a desktop-sized viewport and the server as base URL. The clock runs in UTC
 * unless `timezoneId` names another IANA zone; `timeoutMs` is the default wait of every action.
 */
export async function newContext(
  browser: Browser,
  baseURL: string,
  viewport = { width: 1280, height: 860 },
  { timezoneId = 'UTC', timeoutMs = 10_000 }: { timezoneId?: string; timeoutMs?: number } = {},
): Promise<BrowserContext> {
  const context = await browser.newContext({ baseURL, viewport, locale: 'en-GB', timezoneId });
  context.setDefaultTimeout(timeoutMs);
  return context;
}

export const DEMO_ROLES = ['admin', 'analyst', 'reviewer', 'communications', 'liaison'] as const;
export type DemoRole = (typeof DEMO_ROLES)[number];

/** Demo sign-ins as agreed in the foundation contract: <role>@hspdo.example / tocsin-<role>-demo. */
export function demoCredentials(role: DemoRole): { email: string; password: string } {
  return { email: `${role}@hspdo.example`, password: `tocsin-${role}-demo` };
}

export async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/** Sign in as a demo role through the sign-in form and wait until home ("/") is shown. */
export async function signInAs(page: Page, role: DemoRole): Promise<void> {
  const { email, password } = demoCredentials(role);
  await signIn(page, email, password);
  try {
    await page.waitForURL((u) => u.pathname === '/');
  } catch (e) {
    throw new Error(`Signing in as ${role} did not reach home; the page is at ${page.url()} showing "${await mainHeading(page).catch(() => '?')}"`, { cause: e });
  }
}

export interface SignedInPageOptions {
  /** 4xx answers the test provokes on purpose: not counted in `errors` nor in `refused` (default [401]). */
  expectedStatuses?: number[];
  viewport?: { width: number; height: number };
  /** IANA time zone of the browser's clock (default UTC). */
  timezoneId?: string;
  /** Default wait of every action, ms (default 10 000). */
  timeoutMs?: number;
}

export interface SignedInPage {
  context: BrowserContext;
  page: Page;
  /** Uncaught page errors and console errors (watchPageErrors). */
  errors: string[];
  /** Every answer with status >= 400 not in `expectedStatuses`, as "409 POST /api/path". */
  refused: string[];
}

/**
 * A fresh context and page signed in as a demo role (home shown), watching page errors and refused answers
 * from before the sign-in on.
 */
export async function signedInPage(browser: Browser, baseURL: string, role: DemoRole, options: SignedInPageOptions = {}): Promise<SignedInPage> {
  const { expectedStatuses = [401], viewport, timezoneId, timeoutMs } = options;
  const context = await newContext(browser, baseURL, viewport, { timezoneId, timeoutMs });
  const page = await context.newPage();
  const errors = watchPageErrors(page, expectedStatuses);
  const refused: string[] = [];
  page.on('response', (r) => {
    if (r.status() >= 400 && !expectedStatuses.includes(r.status())) refused.push(`${r.status()} ${r.request().method()} ${new URL(r.url()).pathname}`);
  });
  await signInAs(page, role);
  return { context, page, errors, refused };
}

/**
 * Watch a run page's status badge (the page polls; no reload) until it reads Done or Failed, or `timeoutMs` has
 * passed: the statuses seen in order of first sight, with 'progressbar' added when a progress bar showed while
 * Running, and the status read last.
 */
export async function watchRunStatus(page: Page, timeoutMs: number): Promise<{ seen: string[]; final: string }> {
  const status = page.getByTestId('run-status').first();
  const seen = new Set<string>();
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const s = ((await status.textContent()) ?? '').trim();
    seen.add(s);
    if (s === 'Running' && (await page.getByRole('progressbar').count()) === 1) seen.add('progressbar');
    if (s === 'Done' || s === 'Failed' || Date.now() > deadline) return { seen: [...seen], final: s };
    await page.waitForTimeout(100);
  }
}

/** The labels of the main navigation, in order. */
export async function navLabels(page: Page): Promise<string[]> {
  const links = page.getByRole('navigation', { name: 'Main' }).getByRole('link');
  return (await links.allTextContents()).map((s) => s.trim());
}

export async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Sign out' }).click();
  try {
    await page.waitForURL((u) => u.pathname === '/sign-in');
  } catch (e) {
    throw new Error(`Sign-out did not reach /sign-in; the page is at ${page.url()} showing "${await mainHeading(page).catch(() => '?')}"`, { cause: e });
  }
}

export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(SHOTS_DIR, { recursive: true });
  const file = path.join(SHOTS_DIR, `${name}.png`);
  await page.mouse.move(0, 0); // no hover effects from the last click
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/**
 * Collects uncaught page errors and console errors so a test can assert there were none.
 * Chromium logs every 4xx answer as a console error; `expectedStatuses` lists the answers the
 * test provokes on purpose (401 for GET /api/session when signed out and for a refused sign-in).
 */
export function watchPageErrors(page: Page, expectedStatuses: number[] = [401]): string[] {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(`pageerror: ${e.message}`));
  page.on('console', (m) => {
    if (m.type() !== 'error') return;
    const status = /status of (\d{3})/.exec(m.text());
    if (status && expectedStatuses.includes(Number(status[1]))) return;
    errors.push(`console: ${m.text()}`);
  });
  return errors;
}

/** The text of the page's main heading, once there is exactly one h1 in the main landmark. */
export async function mainHeading(page: Page): Promise<string> {
  const h1 = page.locator('main h1');
  await h1.first().waitFor({ state: 'visible' });
  return ((await h1.first().textContent()) ?? '').trim();
}

/** Wait until the main heading reads `text` (polling), and return it for an assertion. */
export async function waitForHeading(page: Page, text: string | RegExp, timeoutMs = 10_000): Promise<string> {
  const deadline = Date.now() + timeoutMs;
  let last = '';
  while (Date.now() < deadline) {
    last = await mainHeading(page).catch(() => '');
    if (typeof text === 'string' ? last === text : text.test(last)) return last;
    await sleep(50);
  }
  return last;
}

export async function isVisible(locator: import('playwright-core').Locator): Promise<boolean> {
  try {
    await locator.waitFor({ state: 'visible' });
    return true;
  } catch {
    return false;
  }
}
