import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assertEqual, check, ROOT, signIn, signOut } from '../harness.js';

/**
 * The accessibility walk: every screen each role opens, at 1280 px and 390 px, checked by axe-core
 * (the WCAG 2.0 and 2.1 A and AA rules, contrast included). No serious or critical finding may be
 * left. Runs last, so the screens hold what the earlier flows made (model runs, an outlook, a budget);
 * a screen whose record does not exist yet is skipped.
 */
const AXE = readFileSync(join(ROOT, 'node_modules/axe-core/axe.min.js'), 'utf8');
const RULES = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'];

interface Finding {
  id: string;
  impact: string | null;
  target: string;
}

async function findings(page: Page): Promise<Finding[]> {
  // Icon ligatures count as icons only once the icon font has loaded (axe compares the drawn glyphs).
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  // Through the DevTools protocol, so the page's own script policy does not apply to the checker.
  await page.evaluate(AXE);
  return (await page.evaluate(
    `axe.run(document, { runOnly: ${JSON.stringify(RULES)} }).then((r) => r.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => ({ id: v.id, impact: v.impact, target: v.nodes.map((n) => n.target.join(' ')).slice(0, 3).join(' | ') })))`,
  )) as Finding[];
}

async function firstId(page: Page, url: string, pick: (rows: any[]) => unknown): Promise<unknown> {
  const body = await page.evaluate((u) => fetch(u).then((r) => (r.ok ? r.json() : null)), url);
  return Array.isArray(body) ? pick(body) : null;
}

async function walk(page: Page, base: string, who: string, paths: (string | null)[]): Promise<void> {
  for (const width of [1280, 390]) {
    await page.setViewportSize({ width, height: 860 });
    for (const path of paths) {
      if (!path) continue;
      await check(`${who}, ${width} px, ${path}: no serious accessibility finding`, async () => {
        await page.goto(`${base}${path}`);
        await page.locator('main').waitFor({ state: 'attached' });
        await page.waitForLoadState('networkidle');
        await page.waitForTimeout(300);
        const found = await findings(page);
        assertEqual(found, [], 'serious or critical findings');
      });
    }
  }
  await page.setViewportSize({ width: 1280, height: 860 });
}

export default async function accessibility({ base, page }: Harness): Promise<void> {
  await page.setViewportSize({ width: 1280, height: 860 });
  await page.goto(`${base}/sign-in`);
  await check('the sign-in page: no serious accessibility finding', async () => {
    await page.getByLabel('E-mail').waitFor();
    await page.waitForLoadState('networkidle');
    assertEqual(await findings(page), [], 'serious or critical findings');
  });

  if (await check('the planner signs in for the accessibility walk', () => signIn(page, base, 'planner@example.org'))) {
    const runId = await firstId(page, '/api/models', (models) => models.flatMap((m) => m.runs ?? []).find((r: { status: string }) => r.status === 'succeeded')?.id);
    const modelId = await firstId(page, '/api/models', (models) => models[0]?.id);
    const outlookId = await firstId(page, '/api/outlooks', (rows) => rows[0]?.id);
    await walk(page, base, 'planner', [
      '/',
      '/prices',
      '/farms',
      '/farms/1',
      '/imports',
      '/contracts',
      '/reference',
      '/models',
      modelId ? `/models/${modelId}` : null,
      runId ? `/models/runs/${runId}` : null,
      '/outlook',
      outlookId ? `/outlook/${outlookId}` : null,
      '/admin/audit',
      '/account',
    ]);
    await check('the planner signs out', () => signOut(page));
  }
  if (await check('the treasurer signs in for the accessibility walk', () => signIn(page, base, 'treasurer@example.org'))) {
    const budgetId = await firstId(page, '/api/budgets', (rows) => rows[0]?.id);
    await walk(page, base, 'treasurer', ['/', '/budget', budgetId ? `/budget/${budgetId}` : null, '/budget/products', '/budget/bookings', '/contracts']);
    await check('the treasurer signs out', () => signOut(page));
  }
  if (await check('the member signs in for the accessibility walk', () => signIn(page, base, 'member@example.org'))) {
    await walk(page, base, 'member', ['/', '/my-farm/outlook', '/my-farm/bookings', '/account']);
    await check('the member signs out', () => signOut(page));
  }
  if (await check('the admin signs in for the accessibility walk', () => signIn(page, base, 'admin@example.org'))) {
    await walk(page, base, 'admin', ['/admin/users', '/admin/settings', '/admin/audit']);
    await check('the admin signs out', () => signOut(page));
  }
}
