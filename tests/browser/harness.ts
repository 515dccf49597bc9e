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

export function startServer(port: number, dataDir: string): ChildProcess {
  // A fresh PGlite folder and the built-in fake SMTP server: never a configured database or mail relay.
  const env: NodeJS.ProcessEnv = { ...process.env, PORT: String(port), DATA_DIR: dataDir, NODE_ENV: 'production' };
  delete env['DATABASE_URL'];
  delete env['SMTP_URL'];
  env['PUBLIC_URL'] = `http://127.0.0.1:${port}`;
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

export async function navHrefs(page: Page): Promise<string[]> {
  return mainNav(page)
    .locator('a[href]')
    .evaluateAll((links) => links.map((a) => a.getAttribute('href') ?? ''));
}

export async function navTitles(page: Page): Promise<string[]> {
  return (await mainNav(page).locator('.mat-mdc-list-item-title').allTextContents()).map(
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

export async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(SHOTS, `${name}.png`), fullPage: true });
}

