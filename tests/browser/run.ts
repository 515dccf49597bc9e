/**
 * Browser tests of the built client against the real server.
 *
 * Run by `npm run test:browser` after `ng build`: starts `tsx server/main.ts` on a free port with a
 * fresh data directory, drives Debian's Chromium through playwright-core and runs every flow in
 * tests/browser/flows/ in file-name order, in one browser. `-- --only NAME[,NAME…]` runs the flows whose file
 * name contains one of the NAMEs. Screenshots land in tmp/screenshots/. The last line is always
 * `browser: N passed, M failed`.
 */
import { mkdirSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext } from 'playwright-core';
import { assertEqual, check, counts, freePort, type Harness, serverLog, SHOTS, startServer, stopServer, signalServer, waitForHealth } from './harness.js';
import type { ChildProcess } from 'node:child_process';

const CHROMIUM = process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium';
const STEP_TIMEOUT_MS = 30_000;
const onlyIndex = process.argv.indexOf('--only');
const only = onlyIndex > 0 ? process.argv[onlyIndex + 1] : undefined;

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
    const paymentsPort = await freePort();
    server = startServer(port, dataDir, paymentsPort);
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
      // The local fake payment service's hosted checkout page stands in for the payment service's own.
      const fakeCheckout = url.origin === `http://127.0.0.1:${paymentsPort}` && url.pathname.startsWith('/pay/');
      if ((url.protocol === 'http:' || url.protocol === 'https:') && url.origin !== base && !fakeCheckout) foreignRequests.push(request.url());
    });
    const page = context.pages()[0] ?? (await context.newPage());
    page.on('pageerror', (error) => pageErrors.push(error.message));
    page.on('console', (message) => {
      if (/Content[- ]Security[- ]Policy/i.test(message.text())) cspViolations.push(message.text());
    });

    for (const file of readdirSync(join(import.meta.dirname, 'flows')).filter((f) => f.endsWith('.ts')).sort()) {
      if (only && !only.split(",").some((o) => file.includes(o))) continue;
      console.log(`flow ${file}`);
      const flow = (await import(`./flows/${file}`)) as { default: (h: Harness) => Promise<void> };
      await check(`flow ${file} runs to its end`, () => flow.default({ base, page, context: context! }));
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
    if (counts.failed > 0 && serverLog.length > 0) {
      const lines = serverLog.slice(-25).map((line) => (line.length > 400 ? `${line.slice(0, 400)}…` : line));
      console.log(`--- last server output ---\n${lines.join('\n')}`);
    }
    rmSync(profileDir, { recursive: true, force: true });
    rmSync(dataDir, { recursive: true, force: true });
  }
}

main()
  .catch((error: unknown) => {
    counts.failed += 1;
    console.log(`  FAIL  the browser test crashed: ${error instanceof Error ? error.stack : String(error)}`);
  })
  .finally(() => {
    console.log(`browser: ${counts.passed} passed, ${counts.failed} failed`);
    process.exitCode = counts.failed > 0 || counts.passed === 0 ? 1 : 0;
  });
