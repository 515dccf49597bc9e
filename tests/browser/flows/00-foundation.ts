import type { Harness } from '../harness.js';
import { assert, assertEqual, check, navHrefs, navTitles, shot, signIn, signOut } from '../harness.js';

/** Issue 2: each demo role signs in and sees only its own navigation; the member sees their farm. */
export default async function foundation({ base, page }: Harness): Promise<void> {
  // --- planner -----------------------------------------------------------------------------
  const plannerIn = await check('the planner signs in through the form', () => signIn(page, base, 'planner@example.org'));
  if (plannerIn) {
    await check("the planner's navigation is Home, Prices, Farms, Imports, Contracts, Reference data, Models, Outlook, Budget, Audit log, Account", async () => {
      assertEqual(
        await navHrefs(page),
        ['/', '/prices', '/farms', '/imports', '/contracts', '/reference', '/models', '/outlook', '/budget', '/admin/audit', '/account'],
        'navigation links',
      );
      assertEqual(
        await navTitles(page),
        ['Home', 'Prices', 'Farms', 'Imports', 'Contracts', 'Reference data', 'Models', 'Outlook', 'Budget', 'Audit log', 'Account'],
        'navigation labels',
      );
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
    await check("the member's navigation is only Home, Season outlook, Fertiliser booking and Account", async () => {
      assertEqual(await navHrefs(page), ['/', '/my-farm/outlook', '/my-farm/bookings', '/account'], 'navigation links');
      assertEqual(await navTitles(page), ['Home', 'Season outlook', 'Fertiliser booking', 'Account'], 'navigation labels');
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
  await page.setViewportSize({ width: 1280, height: 860 });
}
