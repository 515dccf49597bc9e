import type { ConsoleMessage } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assertEqual, check, shot, signIn, signOut } from '../harness.js';

/**
 * A page where nothing is wrong logs nothing (issue 16, Console): the signed-out sign-in page and
 * the member portal, published outlook or not, leave no error or warning in the browser console
 * (a failed request, e.g. a 401 or 404, is logged by the browser as an error).
 */
export default async function quietConsole({ base, page }: Harness): Promise<void> {
  const logged: string[] = [];
  const listen = (message: ConsoleMessage) => {
    if (message.type() === 'error' || message.type() === 'warning') logged.push(`${message.type()}: ${message.text()} (${message.location().url})`);
  };
  page.on('console', listen);
  try {
    await check('the signed-out sign-in page logs nothing in the console', async () => {
      await page.context().clearCookies();
      logged.length = 0;
      await page.goto(`${base}/`);
      await page.waitForURL(/\/sign-in/);
      await page.getByLabel('E-mail').waitFor();
      await page.waitForLoadState('networkidle');
      assertEqual(logged, [], 'console errors and warnings on the sign-in page');
    });
    const memberIn = await check('the member signs in', () => signIn(page, base, 'member@example.org'));
    if (!memberIn) return;
    await check('the member portal logs nothing in the console, and says so plainly when nothing is published', async () => {
      logged.length = 0;
      const published = await page.evaluate(() => fetch('/api/portal/outlook').then((r) => r.status));
      await page.goto(`${base}/my-farm/outlook`);
      await page.getByRole('heading', { level: 1 }).first().waitFor();
      await page.waitForLoadState('networkidle');
      if (published === 204) await page.getByText(/has not published an outlook yet/).first().waitFor();
      await shot(page, 'member-portal-console-1280');
      assertEqual(logged, [], 'console errors and warnings on the member portal');
    });
    await check('signing out logs nothing either', async () => {
      logged.length = 0;
      await signOut(page);
      await page.waitForLoadState('networkidle');
      assertEqual(logged, [], 'console errors and warnings after sign-out');
    });
  } finally {
    page.off('console', listen);
  }
}
