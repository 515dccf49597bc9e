import type { Page } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assert, assertEqual, check, shotPath, signIn, signOut } from '../harness.js';
import { outlookMailOf } from '../../../server/mail/outlook-mail.js';
import type { MemberVersion } from '../../../shared/outlook-types.js';

/** The demo's outlook is published by a background job after the first start. */
const PUBLISHED_TIMEOUT_MS = 300_000;

const getJson = <T>(page: Page, url: string) => page.evaluate((u) => fetch(u).then((r) => (r.status === 204 ? null : r.json())), url) as Promise<T>;

/** Words a member should not meet on the portal (issue 16): method names and formulas. */
const JARGON = ['trend index', 'projection at the estimates', 'at the estimates', 'λ', '∓', '5–95', 'simulated seasons', 'Adaptive expectation'];

async function scrollTo(page: Page, selector: string): Promise<void> {
  await page.locator(selector).first().evaluate((el) => el.scrollIntoView({ block: 'start' }));
  await page.evaluate(() => window.scrollBy(0, -70));
}

/** The page is no wider than the viewport (nothing to scroll sideways), tables in their own scroll boxes aside. */
async function noSidewaysScroll(page: Page, what: string): Promise<void> {
  const { scroll, width } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, width: window.innerWidth }));
  assert(scroll <= width, `${what} is ${scroll} px wide in a ${width} px window`);
}

/**
 * Issue 16, member portal and e-mail: the member reads the published outlook in plain words, with
 * per-hectare figures, an estimate of the farm's fertiliser need and bill, the band described in
 * words and the method one click away; the outlook e-mail reads in one column on a phone.
 */
export default async function memberPlain({ base, page }: Harness): Promise<void> {
  const memberIn = await check('the member signs in', () => signIn(page, base, 'member@example.org'));
  if (!memberIn) return;
  let version: MemberVersion | null = null;
  const published = await check('an outlook is published (the demo arrives with one)', async () => {
    const end = Date.now() + PUBLISHED_TIMEOUT_MS;
    while (!(version = await getJson<MemberVersion | null>(page, '/api/portal/outlook')) && Date.now() < end) await page.waitForTimeout(2000);
    assert(version, 'no outlook was published in time');
  });
  if (!published || !version) return;
  const v: MemberVersion = version;

  for (const width of [1280, 390]) {
    await check(`the portal at ${width} px: plain words, per hectare beside totals, the fertiliser bill, the method behind one click`, async () => {
      await page.setViewportSize({ width, height: width === 390 ? 844 : 860 });
      await page.goto(`${base}/my-farm/outlook`);
      await page.getByRole('heading', { level: 1, name: `Season outlook ${v.season.label}` }).waitFor();
      const main = page.locator('main');
      const visible = await main.evaluate((el) => {
        // Text a reader sees without opening "How this was made".
        const clone = el.cloneNode(true) as HTMLElement;
        clone.querySelectorAll('details').forEach((d) => d.remove());
        return clone.innerText;
      });
      for (const word of JARGON) assert(!visible.includes(word), `the member reads "${word}"`);
      assert(visible.includes(`records of ${v.plain.sampleSeasons.first} to ${v.plain.sampleSeasons.last}`), 'the sample is not in season labels');
      assert(!/published them on .* by\b/.test(visible), 'the broken "published … by" sentence');
      assert(visible.includes('The band is where 9 in 10 outcomes should fall.'), 'the band is not described in words');
      // Per hectare beside the total on the farm's cards.
      const farmCards = page.getByRole('list', { name: "Your farm's projection" });
      const firstCard = (await farmCards.locator('li').first().innerText()).replace(/\s+/g, ' ');
      assert(/ t\/ha/.test(firstCard), `the first card has no t/ha: ${firstCard}`);
      // The same item order on the cards, the co-op's cards and the prices.
      const names = async (sel: ReturnType<Page['locator']>) => (await sel.allInnerTexts()).map((t) => t.split('\n')[0]!.trim());
      const farmOrder = await names(farmCards.locator('li .what'));
      const coopOrder = await names(page.getByRole('list', { name: 'Co-op projection' }).locator('li .what'));
      const priceOrder = await names(page.getByRole('region', { name: 'Expected prices' }).locator('tbody th'));
      const strip = (xs: string[]) => xs.map((x) => x.replace(/\s*(harvest|use)$/i, '').trim());
      assertEqual(strip(farmOrder), strip(coopOrder), 'item order of the farm and the co-op cards');
      assertEqual(strip(farmOrder), priceOrder.map((x) => x.replace(/\s*[A-Z]{3}\/.*$/, '').trim()), 'item order of the cards and the prices');
      // The fertiliser estimate with its caution.
      const fert = page.getByRole('region', { name: 'Your fertiliser estimate' });
      await fert.waitFor();
      const fertText = await fert.innerText();
      for (const n of ['kg N/ha', 'kg P2O5/ha', 'kg K2O/ha']) assert(fertText.includes(n), `no ${n} in the fertiliser estimate`);
      await page.getByText(/soil tests.*certified adviser has the last word/).first().waitFor();
      // The method is one click away.
      const how = page.locator('details.how');
      assertEqual(await how.getAttribute('open'), null, '"How this was made" open at first');
      await noSidewaysScroll(page, 'the portal');
      await page.screenshot({ path: shotPath(`portal-plain-top-${width}`) });
      await scrollTo(page, '#farm-heading');
      await page.screenshot({ path: shotPath(`portal-plain-farm-${width}`) });
      await scrollTo(page, 'np-portal-fertiliser');
      await page.screenshot({ path: shotPath(`portal-plain-fertiliser-${width}`) });
      await scrollTo(page, '#coop-heading');
      await page.screenshot({ path: shotPath(`portal-plain-coop-${width}`) });
      await how.getByText('How this was made', { exact: true }).click();
      await scrollTo(page, 'details.how');
      await page.screenshot({ path: shotPath(`portal-plain-method-${width}`) });
    });
  }
  await page.setViewportSize({ width: 1280, height: 860 });

  await check('the outlook e-mail reads in one column at 390 px, with the date as the app writes it', async () => {
    const me = await getJson<{ email: string; name: string }>(page, '/api/auth/me');
    const mail = outlookMailOf(v, v.farm, { email: me.email, name: me.name }, { portalUrl: `${base}/my-farm/outlook`, unsubscribeUrl: `${base}/api/unsubscribe/example` });
    const day = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }).format(new Date(v.publishedAt));
    assert(mail.text.includes(`(${day})`), `the e-mail does not date the outlook "${day}"`);
    const mailPage = await page.context().newPage();
    try {
      for (const width of [390, 1280]) {
        await mailPage.setViewportSize({ width, height: 844 });
        await mailPage.setContent(mail.html);
        await noSidewaysScroll(mailPage, `the e-mail at ${width} px`);
        await mailPage.screenshot({ path: shotPath(`outlook-mail-${width}`), fullPage: true });
      }
    } finally {
      await mailPage.close();
    }
  });
  await check('the member signs out', () => signOut(page));

  const adminIn = await check('the admin signs in', () => signIn(page, base, 'admin@example.org'));
  if (!adminIn) return;
  await check('the admin settings show the address e-mail links use, with no warning when PUBLIC_URL is set', async () => {
    await page.goto(`${base}/admin/settings`);
    await page.getByRole('heading', { level: 2, name: 'This server' }).waitFor();
    await page.getByText(base, { exact: true }).waitFor();
    assertEqual(await page.getByText(/PUBLIC_URL is not set/).count(), 0, 'a PUBLIC_URL warning although it is set');
    await page.screenshot({ path: shotPath('admin-settings-server-1280') });
    await page.setViewportSize({ width: 390, height: 844 });
    await page.screenshot({ path: shotPath('admin-settings-server-390') });
    await page.setViewportSize({ width: 1280, height: 860 });
  });
  await check('the admin signs out', () => signOut(page));
}
