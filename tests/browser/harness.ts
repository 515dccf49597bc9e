/**
 * Shared pieces of the browser tests: the check/assert helpers, sign-in and sign-out through the
 * real form, screenshots. Each flow in tests/browser/flows/ receives a `Harness`.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { join, resolve } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';

export const ROOT = resolve(import.meta.dirname, '../..');
export const SHOTS = join(ROOT, 'tmp/screenshots');
export const PASSWORD = 'netput-demo';

export interface Harness {
  base: string;
  page: Page;
  context: BrowserContext;
}

export const counts = { passed: 0, failed: 0 };
export const serverLog: string[] = [];


export async function check(name: string, body: () => Promise<void>): Promise<boolean> {
  try {
    await body();
    counts.passed += 1;
    console.log(`  ok    ${name}`);
    return true;
  } catch (error) {
    counts.failed += 1;
    console.log(`  FAIL  ${name}\n        ${(error instanceof Error ? error.message : String(error)).split('\n').join('\n        ')}`);
    return false;
  }
}

export function assert(condition: unknown, message: string): asserts condition {
  if (!condition) throw new Error(message);
}

export function assertEqual<T>(actual: T, expected: T, what: string): void {
  const a = JSON.stringify(actual);
  const e = JSON.stringify(expected);
  if (a !== e) throw new Error(`${what}: expected ${e}, got ${a}`);
}

export function freePort(): Promise<number> {
  return new Promise((done, fail) => {
    const probe = createServer();
    probe.once('error', fail);
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      probe.close(() => done(port));
    });
  });
}

/** Port of the server's local fake payment service: its hosted checkout page is the one other origin a flow may open. */
export let fakePaymentsPort = 0;

export function startServer(port: number, dataDir: string, paymentsPort = 0): ChildProcess {
  fakePaymentsPort = paymentsPort;
  // A fresh PGlite folder and the built-in fake SMTP server: never a configured database or mail relay.
  const env: NodeJS.ProcessEnv = { ...process.env, PORT: String(port), DATA_DIR: dataDir, NODE_ENV: 'production' };
  delete env['DATABASE_URL'];
  delete env['SMTP_URL'];
  env['PUBLIC_URL'] = `http://127.0.0.1:${port}`;
  delete env['PAYMENT_SECRET_KEY'];
  env['FAKE_PAYMENTS_PORT'] = String(paymentsPort);
  const child = spawn(join(ROOT, 'node_modules/.bin/tsx'), ['server/main.ts'], {
    cwd: ROOT,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
    // Own process group, so the server and the node process tsx starts can be stopped together.
    detached: true,
  });
  const keep = (chunk: Buffer) => {
    serverLog.push(...chunk.toString().split('\n').filter(Boolean));
    if (serverLog.length > 200) serverLog.splice(0, serverLog.length - 200);
  };
  child.stdout?.on('data', keep);
  child.stderr?.on('data', keep);
  return child;
}

export function signalServer(child: ChildProcess | undefined, signal: NodeJS.Signals): void {
  if (!child?.pid || child.exitCode !== null || child.signalCode !== null) return;
  try {
    process.kill(-child.pid, signal);
  } catch {
    child.kill(signal);
  }
}

/** Stops the server's whole process group; SIGKILL if it has not exited after a few seconds. */
export async function stopServer(child: ChildProcess | undefined): Promise<void> {
  if (!child?.pid || child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((done) => child.once('exit', () => done()));
  signalServer(child, 'SIGTERM');
  const inTime = await Promise.race([exited.then(() => true), new Promise<boolean>((r) => setTimeout(() => r(false), 5000))]);
  if (!inTime) {
    signalServer(child, 'SIGKILL');
    await exited;
  }
}

export async function waitForHealth(base: string, server: ChildProcess, timeoutMs = 90_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`the server exited with code ${server.exitCode}`);
    try {
      const response = await fetch(`${base}/api/health`);
      if (response.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`GET /api/health did not answer 200 within ${timeoutMs / 1000} s`);
}

/** The main navigation, found in the DOM rather than the accessibility tree (on a phone it is closed, so hidden). */
export function mainNav(page: Page) {
  return page.locator('nav[aria-label="Main"]');
}

/**
 * Waits until the phone's navigation drawer has finished closing after a link in it was followed
 * (the app closes it on navigation, with a slide-out), so a screenshot shows the page alone.
 */
export async function navClosed(page: Page): Promise<void> {
  // Material hides a closed drawer (visibility: hidden) only when its closing animation has ended.
  await page.locator('mat-sidenav').waitFor({ state: 'hidden' });
  await page.locator('.mat-drawer-backdrop.mat-drawer-shown').waitFor({ state: 'detached' });
}

export async function navHrefs(page: Page): Promise<string[]> {
  return mainNav(page)
    .locator('a[href]')
    .evaluateAll((links) => links.map((a) => a.getAttribute('href') ?? ''));
}

export async function navTitles(page: Page): Promise<string[]> {
  return (await mainNav(page).locator('.nav-label').allTextContents()).map(
    (t) => t.trim(),
  );
}

export async function signIn(page: Page, base: string, email: string): Promise<void> {
  await page.goto(`${base}/`);
  await page.waitForURL(/\/sign-in/);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => url.pathname === '/');
  // Attached, not visible: on a phone the navigation waits closed behind the menu button.
  await mainNav(page).waitFor({ state: 'attached' });
}

export async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: /^Account menu/ }).click();
  await page.getByRole('menuitem', { name: 'Sign out' }).click();
  await page.waitForURL(/\/sign-in/);
}

/** Where a screenshot of that name goes (for a screenshot of one element). */
export function shotPath(name: string): string {
  return join(SHOTS, `${name}.png`);
}

export async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(SHOTS, `${name}.png`), fullPage: true });
}


/**
 * Makes sure a fitted model run exists, through the API as the signed-in planner: a finished run is
 * taken (of a model holding every item in `needs`, the largest such model first), else a model is
 * defined with `definition` and fitted. Answers what happened: "run #7 had finished", "run #9
 * fitted", or why not.
 */
export async function ensureFittedRun(page: Page, options: { name: string; definition: unknown; needs?: string[]; timeoutMs: number }): Promise<string> {
  // Plain script text: tsx would wrap named inner functions in a helper the page does not have.
  return (await page.evaluate(`(async () => {
    const definition = ${JSON.stringify(options.definition)};
    const needs = ${JSON.stringify(options.needs ?? [])};
    const token = decodeURIComponent((document.cookie.split('; ').find((c) => c.startsWith('XSRF-TOKEN=')) || '').split('=')[1] || '');
    const post = async (url, body) => {
      const r = await fetch(url, {
        method: 'POST',
        headers: body === undefined ? { 'X-XSRF-TOKEN': token } : { 'X-XSRF-TOKEN': token, 'Content-Type': 'application/json' },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      return { status: r.status, body: await r.json().catch(() => null) };
    };
    const models = await (await fetch('/api/models')).json();
    const fits = models
      .filter((m) => needs.every((item) => m.definition.items.includes(item)))
      .sort((a, b) => (needs.length ? b.definition.items.length - a.definition.items.length : 0))
      .flatMap((m) => m.runs.filter((r) => r.status === 'succeeded'));
    if (fits.length) return 'run #' + fits[0].id + ' had finished';
    const model = await post('/api/models', { name: ${JSON.stringify(options.name)}, definition });
    if (model.status !== 201) return 'POST /api/models answered ' + model.status;
    const run = await post('/api/models/' + model.body.id + '/runs');
    if (run.status !== 202) return 'POST /api/models/:id/runs answered ' + run.status;
    const deadline = Date.now() + ${options.timeoutMs};
    while (Date.now() < deadline) {
      const s = await (await fetch('/api/model-runs/' + run.body.id + '/status')).json();
      if (s.status === 'succeeded') return 'run #' + run.body.id + ' fitted';
      if (s.status === 'failed' || s.status === 'cancelled') return 'run #' + run.body.id + ' ' + s.status + ': ' + s.error;
      await new Promise((r) => setTimeout(r, 500));
    }
    return 'run #' + run.body.id + ' did not finish in time';
  })()`)) as string;
}

/**
 * Waits, as a signed-in staff member, until the demo co-op's background preparation (fit, outlook,
 * budget; seed/prepare-demo.ts) is done, so a flow run on its own starts from the same state as
 * after the demo flow. Answers what it saw.
 */
export async function waitForDemoPrepared(page: Page, timeoutMs = 300_000): Promise<string> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const demo = (await page.evaluate(() => fetch('/api/summary').then((r) => r.json()))) as { demo: { status: string; stage: string; error: string | null } | null };
    if (!demo.demo) return 'the demo is prepared';
    if (demo.demo.status === 'failed') return `the demo preparation failed: ${demo.demo.error}`;
    if (Date.now() > end) return `the demo is still being prepared (${demo.demo.stage})`;
    await page.waitForTimeout(2000);
  }
}
