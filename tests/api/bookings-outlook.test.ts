import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { openBookingRound, publishOutlook } from './season-setup.js';
import { leastCostTonnes } from '../../server/budget/product-mix.js';

/**
 * The member's booking offer when the season has a published outlook: the projected need is the
 * farm's base-scenario point projection of each fertiliser item (items counted in kg of nutrient,
 * grade 100 %), the suggestion is the least-cost mix of the round's products covering it (solved by
 * javascript-lp-solver, rounded up to 0.1 t), and a booking above 3× the need asks for confirmation.
 * The outlook is made and published through the API, as a planner would.
 */
let t: TestApp;
type Agent = Awaited<ReturnType<typeof signedIn>>;
let planner: Agent;
let treasurer: Agent;
let member: Agent;


const NUTRIENT_ITEM = { nitrogen: 'nitrogen', phosphate: 'phosphate', potash: 'potash' } as const;
type N = keyof typeof NUTRIENT_ITEM;
const NS: N[] = ['nitrogen', 'phosphate', 'potash'];

beforeAll(async () => {
  t = await startTestApp({ jobs: true });
  planner = await signedIn(t.app, 'planner@example.org');
  treasurer = await signedIn(t.app, 'treasurer@example.org');
  member = await signedIn(t.app, 'member@example.org');
  // A fit without back-test (speed), the 2026/27 outlook projected on it and published.
  await publishOutlook(planner, { fittedTo: '2025/26', season: '2026/27', name: 'Booking outlook model', title: 'Outlook 2026/27 for bookings' });
  await openBookingRound(treasurer, '2026/27');
}, 300_000);
afterAll(async () => t?.close());

describe('the booking offer from a published outlook', () => {
  it('the projected need is the farm’s published base projection of N, P2O5 and K2O; the suggestion is the least-cost mix covering it', async () => {
    const portal = (await member.get('/api/portal/outlook')).body;
    expect(portal.season.label).toBe('2026/27');
    const point = (code: string) => portal.farm.items.find((i: { item: string }) => i.item === code).scenarios.base.point as number;

    const offer = (await member.get('/api/bookings/offer')).body;
    expect(offer.farm.id).toBe(portal.farm.farmId);
    expect(offer.need.source).toBe('Published outlook “Outlook 2026/27 for bookings” (version 1), base scenario');
    // The demo's nutrient items are kg N, kg P2O5 and kg K2O (grade 100 %): the need is the point projection itself.
    for (const n of NS) {
      expect(point(NUTRIENT_ITEM[n])).toBeGreaterThan(0);
      expect(offer.need.nutrients[n]).toBeCloseTo(point(NUTRIENT_ITEM[n]), 6);
    }
    // The portal's plain fertiliser lines say the same kilograms.
    for (const line of portal.plain.fertiliser.lines as { item: string; kg: number }[]) expect(offer.need.nutrients[line.item as N]).toBeCloseTo(line.kg, 6);

    // Suggestion: the least-cost continuous mix of the round's products at the booking prices, rounded up to 0.1 t.
    const products = offer.products as { productId: number; name: string; pricePerTMinor: number; nPct: number; p2o5Pct: number; k2oPct: number }[];
    const mix = leastCostTonnes(offer.need.nutrients, products.map((p) => ({ ...p, pricePerT: p.pricePerTMinor / 100 })) as never);
    const expected = products.map((p, i) => ({ productId: p.productId, tonnes: Math.ceil(mix.tonnes[i]! * 10) / 10 })).filter((s) => s.tonnes > 0);
    expect(offer.suggestion).toEqual(expected);
    expect(offer.suggestion.length).toBeGreaterThan(0);
    // It covers the need of every nutrient, and each line is a whole number of 100 kg.
    for (const n of NS) {
      const pct = { nitrogen: 'nPct', phosphate: 'p2o5Pct', potash: 'k2oPct' }[n] as 'nPct';
      const supplied = offer.suggestion.reduce((a: number, s: { productId: number; tonnes: number }) => a + s.tonnes * 1000 * products.find((p) => p.productId === s.productId)![pct] / 100, 0);
      expect(supplied).toBeGreaterThanOrEqual(offer.need.nutrients[n] - 1e-6);
    }
    for (const s of offer.suggestion) expect(Math.round(s.tonnes * 10)).toBeCloseTo(s.tonnes * 10, 9);
  });

  it('more than 3× the projected need asks for confirmation, naming the ratio; just under 3× is booked', async () => {
    const offer = (await member.get('/api/bookings/offer')).body;
    const urea = offer.products.find((p: { name: string }) => p.name === 'Urea');
    expect(urea.nPct).toBe(46);
    const needN = offer.need.nutrients.nitrogen as number;
    // Urea 46-0-0: t tonnes bring 460 × t kg N.
    const over = Math.ceil(((3.2 * needN) / 460) * 10) / 10;
    const res = await member.post('/api/bookings').send({ lines: [{ productId: urea.productId, tonnes: over }], deliveryMonth: '2027-03' });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('needs_confirmation');
    const bookedN = Math.round(over * 1000) * 0.46;
    expect(res.body.error.details).toEqual([
      {
        path: 'nutrients.nitrogen',
        message: `${Math.round(bookedN).toLocaleString('en-GB')} kg of nitrogen (N) is ${(bookedN / needN).toFixed(1)} times your farm's projected need of ${Math.round(needN).toLocaleString('en-GB')} kg`,
      },
    ]);
    expect(bookedN / needN).toBeGreaterThan(3);

    const under = Math.floor(((2.9 * needN) / 460) * 10) / 10;
    expect(under).toBeGreaterThan(0);
    const ok = await member.post('/api/bookings').send({ lines: [{ productId: urea.productId, tonnes: under }], deliveryMonth: '2027-03' });
    expect(ok.status).toBe(201);
    expect(ok.body.nutrients.nitrogen).toBeCloseTo(Math.round(under * 1000) * 0.46, 6);
  });
});
