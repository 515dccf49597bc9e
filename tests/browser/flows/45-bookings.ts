import type { Harness } from '../harness.js';
import { assert, check, shot, signIn, signOut } from '../harness.js';

/**
 * Member bookings: the treasurer opens a booking round on a budget (the budget made through the
 * API, the round through the page); the member, on a 390 px phone, books urea, reviews the amounts,
 * pays on the local fake payment service's hosted page and comes back to a prepaid booking; the
 * treasurer then sees the booking and the prepayment against the budget and the cash plan.
 */
export default async function bookings({ base, page }: Harness): Promise<void> {
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
