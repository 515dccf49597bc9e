import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';
import { openBookingRound, publishOutlook } from './season-setup.js';

/**
 * Forecast against outcome for fertiliser: a published 2025/26 outlook, members' bookings in a
 * 2025/26 booking round and the farms' 2025/26 records, set side by side per nutrient and per farm.
 * The expected figures are read back from the API's own sources (the published version, the farm
 * records) and the booking worked by hand: 10 t of urea 46-0-0 bring 4,600 kg N, 2.5 t of muriate
 * of potash 0-0-60 bring 1,500 kg K2O.
 */
let t: TestApp;
type Agent = Awaited<ReturnType<typeof signedIn>>;
let planner: Agent;
let treasurer: Agent;
let member: Agent;

const kg = (v: number) => Math.round(v).toLocaleString('en-GB');

beforeAll(async () => {
  t = await startTestApp({ jobs: true });
  planner = await signedIn(t.app, 'planner@example.org');
  treasurer = await signedIn(t.app, 'treasurer@example.org');
  member = await signedIn(t.app, 'member@example.org');
  await publishOutlook(planner, { fittedTo: '2024/25', season: '2025/26', name: 'Accountability model', title: 'Outlook 2025/26 (entered afterwards)' });
  await openBookingRound(treasurer, '2025/26');
  const products = (await treasurer.get('/api/fertiliser-products')).body as { id: number; name: string }[];
  const urea = products.find((p) => p.name === 'Urea')!.id;
  const mop = products.find((p) => p.name === 'Muriate of potash')!.id;
  const booked = await member.post('/api/bookings').send({ lines: [{ productId: urea, tonnes: 10 }, { productId: mop, tonnes: 2.5 }], deliveryMonth: '2027-03' });
  expect(booked.status).toBe(201);
  expect(booked.body.nutrients).toEqual({ nitrogen: 4600, phosphate: 0, potash: 1500 });
}, 300_000);
afterAll(async () => t?.close());

describe('fertiliser: projected, booked and used', () => {
  it('per nutrient and per farm with records, in kg of nutrient and in plain words', async () => {
    const acc = (await treasurer.get('/api/outlooks/accountability')).body;
    const s = acc.seasons.find((x: { season: string }) => x.season === '2025/26');
    const fert = s.fertiliser;
    expect(fert.bookingRound).toBe(true);

    // The demo's fertiliser items are counted in kg of the nutrient itself (grade 100 %).
    const fertItems = ((await planner.get('/api/items')).body as { code: string; category: string; unit: string }[]).filter((i) => i.category === 'fertiliser');
    expect(fertItems.map((i) => [i.code, i.unit]).sort()).toEqual([
      ['nitrogen', 'kg N'],
      ['phosphate', 'kg P2O5'],
      ['potash', 'kg K2O'],
    ]);
    const version = (await planner.get(`/api/outlooks/versions/${s.versionId}`)).body as { farms: { farmId: number; code: string; items: { item: string; scenarios: { base: { point: number } } }[] }[] };
    const recs = ((await planner.get('/api/records')).body as { farmCode: string; season: string; itemCode: string; quantity: number }[]).filter((r) => r.season === '2025/26');
    const used = (code: string, item: string) => recs.filter((r) => r.farmCode === code && r.itemCode === item).reduce((a, r) => a + r.quantity, 0);
    const projected = (code: string, item: string) => version.farms.find((f) => f.code === code)!.items.find((i) => i.item === item)!.scenarios.base.point;

    const codes = [...new Set(recs.map((r) => r.farmCode))].sort();
    expect(codes).toHaveLength(20);
    expect(fert.farmsWithRecords).toBe(20);
    expect(fert.farms.map((f: { code: string }) => f.code)).toEqual(codes);

    // The member's farm: its projection, its booking, its records.
    const myFarm = (await member.get('/api/bookings/offer')).body.farm as { id: number };
    const mine = fert.farms.find((f: { farmId: number }) => f.farmId === myFarm.id);
    const n = mine.nutrients.find((x: { nutrient: string }) => x.nutrient === 'nitrogen');
    const P = projected(mine.code, 'nitrogen');
    const A = used(mine.code, 'nitrogen');
    expect(n).toMatchObject({ name: 'Nitrogen (N)', unit: 'kg N', booked: 4600 });
    expect(n.projected).toBeCloseTo(P, 9);
    expect(n.actual).toBeCloseTo(A, 9);
    expect(n.bookedShareOfUse).toBeCloseTo(4600 / A, 12);
    expect(n.errorPct).toBeCloseTo((100 * (P - A)) / A, 9);
    const e = (100 * (P - A)) / A;
    expect(n.words).toBe(
      `Nitrogen (N): the outlook projected ${kg(P)} kg N, members booked 4,600 kg N through the co-op (${Math.round(460_000 / P)} % of the projection) and the records show ${kg(A)} kg N used, so the bookings covered ${Math.round(460_000 / A)} % of use, ` +
        (Math.abs(e) < 0.5 ? 'and the projection matched use.' : `and the projection was ${Math.abs(Math.round(e))} % ${e > 0 ? 'above' : 'below'} use.`),
    );
    const p = mine.nutrients.find((x: { nutrient: string }) => x.nutrient === 'phosphate');
    expect(p.booked).toBe(0);
    expect(p.words).toContain('nothing was booked through the co-op');
    expect(mine.nutrients.find((x: { nutrient: string }) => x.nutrient === 'potash').booked).toBe(1500);

    // Another farm, which booked nothing.
    const other = fert.farms.find((f: { farmId: number }) => f.farmId !== myFarm.id);
    const k = other.nutrients.find((x: { nutrient: string }) => x.nutrient === 'potash');
    expect(k.booked).toBe(0);
    expect(k.bookedShareOfUse).toBe(0);
    expect(k.actual).toBeCloseTo(used(other.code, 'potash'), 9);

    // The co-op rows add up the farms with records.
    const sum = (f: (code: string) => number) => codes.reduce((a, c) => a + f(c), 0);
    const coopN = fert.nutrients.find((x: { nutrient: string }) => x.nutrient === 'nitrogen');
    expect(coopN.projected).toBeCloseTo(sum((c) => projected(c, 'nitrogen')), 6);
    expect(coopN.actual).toBeCloseTo(sum((c) => used(c, 'nitrogen')), 6);
    expect(coopN.booked).toBe(4600);
    expect(fert.nutrients.find((x: { nutrient: string }) => x.nutrient === 'potash').booked).toBe(1500);
    expect(fert.note).toMatch(/^Over the 20 farms with records for 2025\/26\./);
  });

  it('a cancelled booking no longer counts; a member cannot read the record', async () => {
    const bookingId = (await member.get('/api/bookings/offer')).body.booking.id;
    expect((await member.post(`/api/bookings/${bookingId}/cancel`)).status).toBe(200);
    const acc = (await treasurer.get('/api/outlooks/accountability')).body;
    const fert = acc.seasons.find((x: { season: string }) => x.season === '2025/26').fertiliser;
    expect(fert.nutrients.find((x: { nutrient: string }) => x.nutrient === 'nitrogen').booked).toBe(0);
    expect(fert.nutrients.find((x: { nutrient: string }) => x.nutrient === 'nitrogen').words).toContain('nothing was booked through the co-op');
    expect((await member.get('/api/outlooks/accountability')).status).toBe(403);
  });
});
