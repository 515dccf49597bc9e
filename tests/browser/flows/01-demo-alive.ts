import type { Page } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assert, assertEqual, check, shot, signIn, signOut } from '../harness.js';

/** The preparation fits a model with a back-test and projects a season: a minute or more on a busy machine. */
const PREPARE_TIMEOUT_MS = 300_000;

const getJson = <T>(page: Page, url: string) => page.evaluate((u) => fetch(u).then((r) => (r.status === 204 ? null : r.json())), url) as Promise<T>;

interface Summary {
  demo: { status: string; stage: string } | null;
  lastRecordedSeason: string | null;
  nextSteps: { kind: string; text: string }[];
}

/**
 * Issue 16, first visit: the server loads the demo co-op into the empty database and prepares it in
 * the background — a fitted per-hectare model, the 2026/27 outlook published on the run its back-test
 * favours, and the treasurer's budget — so every demo account sees real figures at first sign-in,
 * and Home says what to do next for each role.
 */
export default async function demoAlive({ base, page }: Harness): Promise<void> {
  const plannerIn = await check('the planner signs in right after the first start', () => signIn(page, base, 'planner@example.org'));
  if (!plannerIn) return;
  const ready = await check('Home says the demo is being prepared until its model, outlook and budget are done', async () => {
    const first = await getJson<Summary>(page, '/api/summary');
    if (first.demo) {
      assertEqual(first.demo.status, 'preparing', 'demo state');
      await page.getByText('The demo co-op is being prepared').waitFor();
      await shot(page, 'home-demo-preparing-1280');
    }
    await page.getByText('The demo co-op is being prepared').waitFor({ state: 'detached', timeout: PREPARE_TIMEOUT_MS });
    const after = await getJson<Summary>(page, '/api/summary');
    assertEqual(after.demo, null, 'demo state when done');
  });
  if (!ready) return;

  await check("the planner's Home names the season without records and nothing else as waiting", async () => {
    const s = await getJson<Summary>(page, '/api/summary');
    assertEqual(s.lastRecordedSeason, '2025/26', 'newest recorded season');
    assertEqual(s.nextSteps.map((n) => n.kind), ['records-missing'], 'next steps');
    await page.getByText('No farm has records for 2026/27 yet; the newest recorded season is 2025/26.', { exact: false }).waitFor();
    assertEqual(await page.getByText(/every season up to 2026\/27/).count(), 0, 'a claim that 2026/27 is recorded');
    await shot(page, 'home-planner-1280');
    await page.setViewportSize({ width: 390, height: 844 });
    await shot(page, 'home-planner-390');
    await page.setViewportSize({ width: 1280, height: 860 });
  });
  await check('the planner finds the demo model fitted and the 2026/27 outlook published on the favoured run', async () => {
    const outlooks = await getJson<{ season: string; modelRunId: number; versions: number }[]>(page, '/api/outlooks');
    const demo = outlooks.find((o) => o.season === '2026/27');
    assert(demo, 'no 2026/27 outlook');
    assertEqual(demo.versions, 1, 'published versions');
    const choice = await getJson<{ favoured: { runId: number } | null }>(page, '/api/outlooks/run-choice');
    assertEqual(demo.modelRunId, choice.favoured?.runId, 'the outlook rests on the favoured run');
  });
  await check('the planner signs out', () => signOut(page));

  const treasurerIn = await check('the treasurer signs in', () => signIn(page, base, 'treasurer@example.org'));
  if (treasurerIn) {
    await check("the treasurer's Home has nothing waiting, and the demo budget is in the list with figures", async () => {
      await page.getByText('Nothing is waiting for you now.').waitFor();
      await shot(page, 'home-treasurer-1280');
      await page.goto(`${base}/budget`);
      await page.getByText('Fertiliser purchases (demo)').first().waitFor();
      await shot(page, 'budget-list-demo-1280');
    });
    await check('the treasurer signs out', () => signOut(page));
  }

  const memberIn = await check('the member signs in', () => signIn(page, base, 'member@example.org'));
  if (memberIn) {
    await check("the member's Home points to the new 2026/27 outlook, and the portal shows the farm's figures", async () => {
      await page.getByText(/New:\s*the co-op's outlook for 2026\/27/).waitFor();
      await shot(page, 'home-member-1280');
      await page.setViewportSize({ width: 390, height: 844 });
      await shot(page, 'home-member-390');
      await page.setViewportSize({ width: 1280, height: 860 });
      await page.getByRole('link', { name: 'Read the outlook' }).click();
      await page.waitForURL(/\/my-farm\/outlook$/);
      await page.getByText('2026/27').first().waitFor();
      assertEqual(await page.getByText(/has not published an outlook yet/).count(), 0, 'an empty portal');
    });
    await check('the member signs out', () => signOut(page));
  }
}
