/**
 * Browser test of the built client against the real server.
 *
 * Run by `npm run test:browser` after `ng build`: starts `tsx server/main.ts` on a free port with a
 * fresh data directory, drives Debian's Chromium through playwright-core, signs in through the real
 * form as the demo planner and the demo member, and checks what each of them is shown. Screenshots
 * land in tmp/screenshots/. The last line is always `browser: N passed, M failed`.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

const ROOT = resolve(import.meta.dirname, '../..');
const SHOTS = join(ROOT, 'tmp/screenshots');
const CHROMIUM = process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium';
const PASSWORD = 'netput-demo';
const STEP_TIMEOUT_MS = 15_000;

let passed = 0;
let failed = 0;
const serverLog: string[] = [];

async function check(name: string, body: () => Promise<void>): Promise<boolean> {
  try {
    await body();
    passed += 1;
    console.log(`  ok    ${name}`);
    return true;
  } catch (error) {
    failed += 1;
    console.log(`  FAIL  ${name}\n        ${(error instanceof Error ? error.message : String(error)).split('\n').join('\n        ')}`);
    return false;
  }
}

function assert(condition: unknown, message: string): asserts condition {
  if (!condition) throw new Error(message);
}

function assertEqual<T>(actual: T, expected: T, what: string): void {
  const a = JSON.stringify(actual);
  const e = JSON.stringify(expected);
  if (a !== e) throw new Error(`${what}: expected ${e}, got ${a}`);
}

function freePort(): Promise<number> {
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

function startServer(port: number, dataDir: string): ChildProcess {
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

function signalServer(child: ChildProcess | undefined, signal: NodeJS.Signals): void {
  if (!child?.pid || child.exitCode !== null || child.signalCode !== null) return;
  try {
    process.kill(-child.pid, signal);
  } catch {
    child.kill(signal);
  }
}

/** Stops the server's whole process group; SIGKILL if it has not exited after a few seconds. */
async function stopServer(child: ChildProcess | undefined): Promise<void> {
  if (!child?.pid || child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((done) => child.once('exit', () => done()));
  signalServer(child, 'SIGTERM');
  const inTime = await Promise.race([exited.then(() => true), new Promise<boolean>((r) => setTimeout(() => r(false), 5000))]);
  if (!inTime) {
    signalServer(child, 'SIGKILL');
    await exited;
  }
}

async function waitForHealth(base: string, server: ChildProcess, timeoutMs = 90_000): Promise<void> {
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
function mainNav(page: Page) {
  return page.locator('nav[aria-label="Main"]');
}

async function navHrefs(page: Page): Promise<string[]> {
  return mainNav(page)
    .locator('a[href]')
    .evaluateAll((links) => links.map((a) => a.getAttribute('href') ?? ''));
}

async function navTitles(page: Page): Promise<string[]> {
  return (await mainNav(page).locator('.mat-mdc-list-item-title').allTextContents()).map(
    (t) => t.trim(),
  );
}

async function signIn(page: Page, base: string, email: string): Promise<void> {
  await page.goto(`${base}/`);
  await page.waitForURL(/\/sign-in/);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => url.pathname === '/');
  // Attached, not visible: on a phone the navigation waits closed behind the menu button.
  await mainNav(page).waitFor({ state: 'attached' });
}

async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: /^Account menu/ }).click();
  await page.getByRole('menuitem', { name: 'Sign out' }).click();
  await page.waitForURL(/\/sign-in/);
}

async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: join(SHOTS, `${name}.png`), fullPage: true });
}

async function main(): Promise<void> {
  mkdirSync(SHOTS, { recursive: true });
  const dataDir = mkdtempSync(join(tmpdir(), 'netput-browser-data-'));
  const profileDir = mkdtempSync(join(tmpdir(), 'netput-browser-profile-'));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  let server: ChildProcess | undefined;
  let context: BrowserContext | undefined;
  // Last resort if this process is stopped early: never leave the server running.
  process.once('exit', () => signalServer(server, 'SIGKILL'));
  process.once('SIGINT', () => process.exit(130));
  process.once('SIGTERM', () => process.exit(143));

  const foreignRequests: string[] = [];
  const pageErrors: string[] = [];
  const cspViolations: string[] = [];

  try {
    server = startServer(port, dataDir);
    const up = await check('the server starts and GET /api/health answers', () => waitForHealth(base, server!));
    if (!up) return;

    context = await chromium.launchPersistentContext(profileDir, {
      executablePath: CHROMIUM,
      headless: true,
      viewport: { width: 1280, height: 860 },
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
        '--no-first-run',
      ],
    });
    context.setDefaultTimeout(STEP_TIMEOUT_MS);
    context.on('request', (request) => {
      const url = new URL(request.url());
      if ((url.protocol === 'http:' || url.protocol === 'https:') && url.origin !== base) foreignRequests.push(request.url());
    });
    const page = context.pages()[0] ?? (await context.newPage());
    page.on('pageerror', (error) => pageErrors.push(error.message));
    page.on('console', (message) => {
      if (/Content[- ]Security[- ]Policy/i.test(message.text())) cspViolations.push(message.text());
    });

    // --- planner -----------------------------------------------------------------------------
    const plannerIn = await check('the planner signs in through the form', () => signIn(page, base, 'planner@example.org'));
    if (plannerIn) {
      await check("the planner's navigation is Home, Farms, Audit log, Account", async () => {
        assertEqual(await navHrefs(page), ['/', '/farms', '/admin/audit', '/account'], 'navigation links');
        assertEqual(await navTitles(page), ['Home', 'Farms', 'Audit log', 'Account'], 'navigation labels');
      });
      await check('admin entries are absent for the planner', async () => {
        const titles = await navTitles(page);
        for (const label of ['Users', 'Co-op settings', 'Mail outbox']) assert(!titles.includes(label), `"${label}" is shown`);
      });
      await check('the home page shows the co-op summary and what needs doing', async () => {
        await page.getByRole('heading', { level: 1, name: /at a glance$/ }).waitFor();
        await page.getByRole('heading', { name: 'What needs doing now' }).waitFor();
        const summary = (await page.evaluate(() => fetch('/api/summary').then((r) => r.json()))) as { farms: number };
        const farmsFigure = page.locator('.figure', { hasText: 'farms' }).first().locator('.value');
        assertEqual((await farmsFigure.innerText()).replace(/\D/g, ''), String(summary.farms), 'farms figure');
        await page.getByText('not financial advice').waitFor();
      });
      await check('icons use the bundled Material Symbols Outlined font', async () => {
        const font = await page.evaluate(async () => {
          await document.fonts.ready;
          const icon = document.querySelector('mat-icon');
          return icon ? getComputedStyle(icon).fontFamily : null;
        });
        assert(font && font.replace(/["']/g, '').startsWith('Material Symbols Outlined'), `icon font-family is ${font}`);
        const loaded = await page.evaluate(() => document.fonts.check('24px "Material Symbols Outlined"'));
        assert(loaded, 'the icon font is not loaded');
        const width = await page.locator('mat-icon').first().evaluate((el) => el.scrollWidth);
        assert(width <= 32, `the first icon is ${width}px wide, so its ligature did not render`);
      });
      await check('no stylesheet is left on media=print', async () => {
        const stuck = await page.evaluate(() =>
          [...document.querySelectorAll('link[rel=stylesheet]')].filter((l) => (l as HTMLLinkElement).media === 'print').length,
        );
        assertEqual(stuck, 0, 'stylesheets with media=print');
      });
      await shot(page, 'planner-home-1280');

      await check('the planner opens Farms and sees the grid', async () => {
        await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Farms' }).click();
        await page.waitForURL(/\/farms$/);
        const farms = (await page.evaluate(() => fetch('/api/farms').then((r) => r.json()))) as unknown[];
        await page.locator('.ag-row').first().waitFor();
        const rows = await page.locator('.ag-row').count();
        assertEqual(rows, Math.min(farms.length, 20), 'grid rows on the first page');
        assertEqual(await page.title(), 'Farms · Netput', 'page title');
      });
      await shot(page, 'planner-farms-1280');

      await check('the planner is turned away from user administration', async () => {
        await page.goto(`${base}/admin/users`);
        await page.getByRole('heading', { name: 'Your role cannot open this page' }).waitFor();
      });
      await check('the planner can read the audit log', async () => {
        await page.goto(`${base}/admin/audit`);
        await page.getByRole('heading', { level: 1, name: 'Audit log' }).waitFor();
        await page.getByRole('table', { name: 'Audit log' }).waitFor();
      });
      await shot(page, 'planner-audit-1280');
      await check('the planner signs out', () => signOut(page));
    }

    // --- member, on a phone-sized screen ------------------------------------------------------
    await page.setViewportSize({ width: 375, height: 780 });
    const memberIn = await check('the member signs in through the form on a 375 px screen', () =>
      signIn(page, base, 'member@example.org'),
    );
    if (memberIn) {
      await check("the member's navigation is only Home and Account", async () => {
        assertEqual(await navHrefs(page), ['/', '/account'], 'navigation links');
        assertEqual(await navTitles(page), ['Home', 'Account'], 'navigation labels');
      });
      await check('the member sees their own farm and its records', async () => {
        const mine = (await page.evaluate(() => fetch('/api/my-farm').then((r) => r.json()))) as {
          farm: { name: string };
          records: unknown[];
        };
        await page.getByRole('heading', { level: 1, name: mine.farm.name }).waitFor();
        if (mine.records.length > 0) {
          await page.getByRole('heading', { name: 'Your records by season' }).waitFor();
          assert((await page.locator('table tr.mat-mdc-row').count()) > 0, 'the records table has no rows');
        }
        await page.getByText('Fertiliser rates follow soil tests').waitFor();
      });
      await shot(page, 'member-home-375');
      await check('the navigation opens from the menu button on a phone', async () => {
        await page.getByRole('button', { name: 'Open navigation' }).click();
        await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Account' }).waitFor({ state: 'visible' });
        // Wait for the slide-in to finish, so the screenshot shows the open menu.
        await page.waitForFunction(() => (document.querySelector('mat-sidenav')?.getBoundingClientRect().left ?? -1) >= 0);
        await page.waitForTimeout(300);
      });
      await shot(page, 'member-nav-375');
      await check('the member is turned away from the farms list', async () => {
        await page.goto(`${base}/farms`);
        await page.getByRole('heading', { name: 'Your role cannot open this page' }).waitFor();
      });
      await check('the member signs out', () => signOut(page));
    }

    await check('no request went to another origin', async () => {
      assertEqual(foreignRequests, [], 'requests to other origins');
    });
    await check('no uncaught page error and no CSP violation', async () => {
      assertEqual([...pageErrors, ...cspViolations], [], 'page errors and CSP violations');
    });
  } finally {
    await context?.close().catch(() => undefined);
    await stopServer(server);
    if (failed > 0 && serverLog.length > 0) {
      const lines = serverLog.slice(-25).map((line) => (line.length > 400 ? `${line.slice(0, 400)}…` : line));
      console.log(`--- last server output ---\n${lines.join('\n')}`);
    }
    rmSync(profileDir, { recursive: true, force: true });
    rmSync(dataDir, { recursive: true, force: true });
  }
}

main()
  .catch((error: unknown) => {
    failed += 1;
    console.log(`  FAIL  the browser test crashed: ${error instanceof Error ? error.stack : String(error)}`);
  })
  .finally(() => {
    console.log(`browser: ${passed} passed, ${failed} failed`);
    process.exitCode = failed > 0 || passed === 0 ? 1 : 0;
  });
