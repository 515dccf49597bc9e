import type { Page } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assert, check, shot, shotPath, signIn, signOut } from '../harness.js';
import { demoModel } from '../../../seed/demo-model.js';

/** A fit on the demo co-op and a 300-draw projection take a while when other work shares the two cores. */
const JOB_TIMEOUT_MS = 240_000;

/** Script text that defines `send(method, url, body)` for the signed-in user (with the CSRF token) inside page.evaluate. */
const SEND = `
  const token = decodeURIComponent((document.cookie.split('; ').find((c) => c.startsWith('XSRF-TOKEN=')) || '').split('=')[1] || '');
  const send = async (method, url, body) => {
    const r = await fetch(url, { method, headers: { 'X-XSRF-TOKEN': token, 'Content-Type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) });
    return { status: r.status, body: await r.json().catch(() => null) };
  };
  const sleep = (ms) => new Promise((r) => setTimeout(r, ms));`;

/**
 * A 2025/26 outlook made afterwards, as an outlook is judged after its season: a model fitted on the
 * seasons up to 2024/25, the 2025/26 season projected with it and published. Through the API as the
 * signed-in planner; answers "published 2025/26" or what went wrong.
 */
async function publishOutlook2025(page: Page): Promise<string> {
  return (await page.evaluate(`(async () => {${SEND}
    const versions = await (await fetch('/api/outlooks/versions')).json();
    if (versions.some((v) => v.season === '2025/26')) return 'published 2025/26';
    const model = await send('POST', '/api/models', { name: 'Seasons to 2024/25', definition: ${JSON.stringify(demoModel({ toSeason: '2024/25', backtestSeasons: 0 }))} });
    if (model.status !== 201) return 'POST /api/models answered ' + model.status + ' ' + JSON.stringify(model.body);
    const run = await send('POST', '/api/models/' + model.body.id + '/runs');
    if (run.status !== 202) return 'POST /api/models/:id/runs answered ' + run.status;
    const deadline = Date.now() + ${JOB_TIMEOUT_MS};
    for (;;) {
      const s = await (await fetch('/api/model-runs/' + run.body.id + '/status')).json();
      if (s.status === 'succeeded') break;
      if (s.status === 'failed' || s.status === 'cancelled' || Date.now() > deadline) return 'run #' + run.body.id + ' ' + s.status + ' ' + (s.error || '');
      await sleep(500);
    }
    const outlooks = await (await fetch('/api/outlooks')).json();
    let id = (outlooks.find((o) => o.season === '2025/26') || {}).id;
    if (!id) {
      const draft = await send('POST', '/api/outlooks', { season: '2025/26', modelRunId: run.body.id, title: 'Season outlook 2025/26 (entered afterwards)' });
      if (draft.status !== 201) return 'POST /api/outlooks answered ' + draft.status + ' ' + JSON.stringify(draft.body);
      id = draft.body.id;
    }
    await send('PATCH', '/api/outlooks/' + id, { draws: 300 });
    const job = await send('POST', '/api/outlooks/' + id + '/projection');
    if (job.status !== 202) return 'projection answered ' + job.status + ' ' + JSON.stringify(job.body);
    for (;;) {
      const p = await (await fetch('/api/outlooks/' + id + '/projection')).json();
      if (p.status === 'succeeded') break;
      if (p.status === 'failed' || Date.now() > deadline + ${JOB_TIMEOUT_MS}) return 'projection ' + p.status;
      await sleep(500);
    }
    const pub = await send('POST', '/api/outlooks/' + id + '/publish', { notifyMembers: false, acceptWeakSkill: true });
    return pub.status === 201 ? 'published 2025/26' : 'publish answered ' + pub.status + ' ' + JSON.stringify(pub.body);
  })()`)) as string;
}

/**
 * The outlook's fertiliser judged against the season: the planner publishes a 2025/26 outlook made
 * afterwards, the treasurer opens a 2025/26 booking round and the member books 10 t of urea and 2.5 t
 * of muriate of potash in it (all through the API, before the 2026/27 round below becomes the one
 * members book in); the planner then reads "Fertiliser: projected, booked and used" for 2025/26 on
 * the accountability page, at 1280 and 390 px.
 */
async function fertiliserAccountability(base: string, page: Page): Promise<void> {
  if (!(await check('the planner signs in to publish a 2025/26 outlook', () => signIn(page, base, 'planner@example.org')))) return;
  const published = await check('a 2025/26 outlook is published (fitted on the seasons to 2024/25, projected and published through the API)', async () => {
    const said = await publishOutlook2025(page);
    assert(said === 'published 2025/26', said);
  });
  await signOut(page);
  if (!published) return;

  await signIn(page, base, 'treasurer@example.org');
  const roundOpen = await check('the treasurer opens a 2025/26 booking round through the API', async () => {
    const said = (await page.evaluate(`(async () => {${SEND}
      const budget = await send('POST', '/api/budgets', {
        name: 'Booking prices 2025/26',
        source: { kind: 'manual', nKg: 400000, p2o5Kg: 100000, k2oKg: 120000 },
        bookingPlan: { months: [{ month: '2026-12', share: 1, prepay: true }], prepayDiscountPct: 2.5, paymentTermsDays: 30, deliveryMonth: '2027-03', financingRatePct: null },
      });
      if (budget.status !== 201) return 'POST /api/budgets answered ' + budget.status;
      const round = await send('PUT', '/api/bookings/rounds', { season: '2025/26', budgetId: budget.body.id, discountDeadline: '2099-01-31', vatPct: 20 });
      return round.status === 200 ? 'opened' : 'PUT /api/bookings/rounds answered ' + round.status + ' ' + JSON.stringify(round.body);
    })()`)) as string;
    assert(said === 'opened', said);
  });
  await signOut(page);
  if (!roundOpen) return;

  await signIn(page, base, 'member@example.org');
  const booked = await check('the member books 10 t of urea and 2.5 t of muriate of potash in the 2025/26 round through the API', async () => {
    const said = (await page.evaluate(`(async () => {${SEND}
      const offer = await (await fetch('/api/bookings/offer')).json();
      if (!offer || offer.round.season !== '2025/26') return 'the member is offered ' + (offer ? offer.round.season : 'no round');
      const id = (name) => (offer.products.find((p) => p.name === name) || {}).productId;
      const r = await send('POST', '/api/bookings', { lines: [{ productId: id('Urea'), tonnes: 10 }, { productId: id('Muriate of potash'), tonnes: 2.5 }], deliveryMonth: '2027-03' });
      return r.status === 201 ? JSON.stringify(r.body.nutrients) : 'POST /api/bookings answered ' + r.status + ' ' + JSON.stringify(r.body);
    })()`)) as string;
    // 10 t × 46 % N = 4,600 kg N; 2.5 t × 60 % K2O = 1,500 kg K2O.
    assert(said === JSON.stringify({ nitrogen: 4600, phosphate: 0, potash: 1500 }), said);
  });
  await signOut(page);
  if (!booked) return;

  await signIn(page, base, 'planner@example.org');
  await check('the planner reads "Fertiliser: projected, booked and used" for 2025/26, with the booking and a farm row, at 1280 and 390 px', async () => {
    await page.goto(`${base}/outlook/accountability`);
    const panel = page.locator('mat-expansion-panel').filter({ has: page.locator('mat-panel-title', { hasText: /^\s*2025\/26\s*$/ }) });
    const header = panel.locator('mat-expansion-panel-header');
    await header.waitFor({ timeout: 30_000 });
    if ((await header.getAttribute('aria-expanded')) !== 'true') await header.click();
    const heading = panel.getByRole('heading', { name: 'Fertiliser: projected, booked and used' });
    await heading.waitFor();
    await panel.getByText(/^Over the \d+ farms with records for 2025\/26\./).waitFor();
    const words = panel.locator('.fertiliser-words li');
    const nitrogen = (await words.filter({ hasText: /^Nitrogen \(N\)/ }).innerText()).trim();
    assert(/^Nitrogen \(N\): the outlook projected [\d,]+ kg N, members booked 4,600 kg N through the co-op \(\d+ % of the projection\) and the records show [\d,]+ kg N used/.test(nitrogen), `the nitrogen sentence reads "${nitrogen}"`);
    const potash = (await words.filter({ hasText: /^Potash/ }).innerText()).trim();
    assert(/members booked 1,500 kg K2O/.test(potash), `the potash sentence reads "${potash}"`);
    const grid = panel.locator('ag-grid-angular[aria-label="Fertiliser per farm 2025/26"]');
    // The first row: the first farm by code, nitrogen.
    const cell = async (col: string) => (await grid.locator(`.ag-row[row-index="0"] .ag-cell[col-id="${col}"]`).first().innerText()).trim();
    const [code, farm, nutrient, projected, bookedKg, used] = [await cell('code'), await cell('farm'), await cell('name'), await cell('projected'), await cell('booked'), await cell('actual')];
    assert(/^F\d+$/.test(code) && farm.length > 0 && nutrient === 'Nitrogen (N)', `first farm row: ${code} | ${farm} | ${nutrient}`);
    for (const [what, v] of [['projected', projected], ['booked', bookedKg], ['used', used]] as const) assert(/^−?[\d,]+(\.\d+)?$/.test(v), `${what} reads "${v}" in the row of ${code}`);
    await heading.evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await shot(page, 'accountability-fertiliser-1280');
    await page.setViewportSize({ width: 390, height: 844 });
    try {
      await page.waitForTimeout(800);
      await heading.evaluate((el) => el.scrollIntoView({ block: 'start' }));
      await shot(page, 'accountability-fertiliser-390');
    } finally {
      await page.setViewportSize({ width: 1280, height: 860 });
    }
  });
  await signOut(page);
}

/**
 * First the outlook's fertiliser against a past season's bookings and records (above). Then
 * member bookings: the treasurer opens a booking round on a budget (the budget made through the
 * API, the round through the page); the member, on a 390 px phone, books urea, reviews the amounts,
 * pays on the local fake payment service's hosted page and comes back to a prepaid booking; the
 * treasurer then sees the booking and the prepayment against the budget and the cash plan.
 */
export default async function bookings({ base, page }: Harness): Promise<void> {
  await fertiliserAccountability(base, page);

  await signIn(page, base, 'treasurer@example.org');
  let budgetId = 0;
  await check('the treasurer has a budget to take booking prices from', async () => {
    budgetId = (await page.evaluate(`(async () => {
      const token = decodeURIComponent((document.cookie.split('; ').find((c) => c.startsWith('XSRF-TOKEN=')) || '').split('=')[1] || '');
      const r = await fetch('/api/budgets', { method: 'POST', headers: { 'X-XSRF-TOKEN': token, 'Content-Type': 'application/json' }, body: JSON.stringify({
        name: 'Booking prices 2026/27',
        source: { kind: 'manual', nKg: 300000, p2o5Kg: 60000, k2oKg: 80000 },
        bookingPlan: { months: [{ month: '2026-12', share: 0.5, prepay: true }, { month: '2027-01', share: 0.5, prepay: true }], prepayDiscountPct: 2.5, paymentTermsDays: 30, deliveryMonth: '2027-03', financingRatePct: null },
      }) });
      return r.status === 201 ? (await r.json()).id : 0;
    })()`)) as number;
    assert(budgetId > 0, 'POST /api/budgets did not create the budget');
  });

  await check('the treasurer opens the 2026/27 booking round on the page', async () => {
    await page.goto(`${base}/budget/bookings`);
    await page.getByRole('button', { name: 'Open a booking round' }).click();
    // Saved empty, each field says what it needs.
    await page.getByRole('button', { name: 'Save round' }).click();
    for (const message of ['Enter the season, e.g. 2026/27', 'Choose the budget whose prices members book at', 'Enter the deadline as YYYY-MM-DD, e.g. 2027-01-31', 'Enter the VAT rate on fertiliser, 0 to 50 %']) {
      await page.locator('mat-error').getByText(message).waitFor();
    }
    for (const width of [1280, 390]) {
      await page.setViewportSize({ width, height: width === 390 ? 844 : 860 });
      await page.locator('form.round-form').screenshot({ path: shotPath(`bookings-round-errors-${width}`) });
    }
    await page.setViewportSize({ width: 1280, height: 860 });
    await page.getByRole('textbox', { name: 'Season' }).fill('2026/27');
    // The empty select's floating label sits over it: open it from the keyboard, as a keyboard user would.
    await page.getByRole('combobox', { name: 'Budget with the booking prices' }).focus();
    await page.keyboard.press('Enter');
    await page.getByRole('option', { name: 'Booking prices 2026/27' }).click();
    await page.getByLabel('Discount and change deadline').fill('2099-01-31');
    await page.getByLabel('VAT on fertiliser, %').fill('20');
    await page.getByRole('button', { name: 'Save round' }).click();
    await page.getByText(/Season 2026\/27 at the prices of “Booking prices 2026\/27”/).waitFor();
  });
  await signOut(page);

  await page.setViewportSize({ width: 390, height: 844 });
  try {
    await signIn(page, base, 'member@example.org');
    await check('the member books 5 t of urea on a phone and reviews the amounts', async () => {
      await page.goto(`${base}/my-farm/bookings`);
      await page.getByText(/Prepay by/).waitFor();
      await page.getByLabel('Urea, tonnes').fill('5');
      await page.getByText('Brings N 2,300 · P2O5 0 · K2O 0 kg').waitFor();
      await shot(page, 'bookings-member-form-390');
      await page.getByRole('button', { name: 'Review booking' }).click();
      // 5 t × 475.00 = 2,375.00; 2.5 % off = 59.38 (5,937.5 cents, half up); net 2,315.62; VAT 20 % 463.12; total 2,778.74.
      await page.getByText('EUR 2,778.74').waitFor();
      await shot(page, 'bookings-member-review-390');
      await page.getByRole('button', { name: 'Confirm booking' }).click();
      await page.getByText('Booked, not paid yet').waitFor();
      await page.getByText('Delivery in March 2027.').waitFor();
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      assert(overflow <= 1, `the page is ${overflow}px wider than the phone`);
    });

    await check('the member pays on the hosted page and comes back to a prepaid booking', async () => {
      await page.getByRole('button', { name: 'Pay EUR 2,778.74 now' }).click();
      await page.getByRole('heading', { name: 'Local test payment' }).waitFor();
      await shot(page, 'bookings-fake-checkout-390');
      await page.getByRole('button', { name: /^Pay EUR 2778\.74$/ }).click();
      await page.waitForURL((url) => url.origin === base && url.pathname === '/my-farm/bookings');
      await page.getByText('Thank you: your prepayment is recorded.').waitFor({ timeout: 20_000 });
      await page.getByText('Prepaid', { exact: true }).waitFor();
      await shot(page, 'bookings-member-prepaid-390');
    });
    await signOut(page);
  } finally {
    await page.setViewportSize({ width: 1280, height: 860 });
  }

  await signIn(page, base, 'treasurer@example.org');
  await check('the treasurer sees the booking and the prepayment against the budget', async () => {
    await page.goto(`${base}/budget/bookings`);
    await page.getByText(/1 booking from 1 of \d+ farms: 5 t of product/).waitFor();
    await page.getByText(/prepaid EUR 2,778\.74, outstanding EUR 0\.00/).waitFor();
    await shot(page, 'bookings-treasurer-1280');
    await page.setViewportSize({ width: 390, height: 844 });
    await page.reload();
    await page.getByText(/prepaid EUR 2,778\.74, outstanding EUR 0\.00/).waitFor();
    await shot(page, 'bookings-treasurer-390');
    await page.setViewportSize({ width: 1280, height: 860 });
  });
  await signOut(page);

  await page.setViewportSize({ width: 390, height: 844 });
  try {
    await signIn(page, base, 'member@example.org');
    await check('before the deadline the member cancels the prepaid booking and is told of the refund', async () => {
      await page.goto(`${base}/my-farm/bookings`);
      await page.getByRole('button', { name: 'Cancel booking' }).click();
      const dialog = page.getByRole('dialog');
      await dialog.getByText('Your prepayment of EUR 2,778.74 is refunded in full').waitFor();
      await dialog.getByRole('button', { name: 'Cancel booking' }).click();
      await page.getByRole('heading', { name: 'Book for 2026/27' }).waitFor();
    });
    await signOut(page);
  } finally {
    await page.setViewportSize({ width: 1280, height: 860 });
  }
}
