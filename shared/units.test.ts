import { describe, expect, it } from 'vitest';
import {
  acresToHa,
  BUSHEL_WEIGHTS,
  bushelsToTonnes,
  bushelWeightOf,
  HA_PER_ACRE,
  haToAcres,
  inUnitSystem,
  k2oToK,
  KG_PER_LB,
  KG_PER_SHORT_TON,
  kgPerBushel,
  kgToLb,
  M2_PER_ACRE,
  NUTRIENT_FACTORS,
  p2o5ToP,
  PURE_COMPOUND,
  shortTonsToTonnes,
  tonnesToBushels,
  tonnesToShortTons,
  unitLabel,
} from './units.js';

describe('mass and area definitions', () => {
  it('the pound is 0.45359237 kg exactly', () => {
    // 1959 international yard and pound agreement (docs/sources.md §6, units.wikia.com "Pound").
    expect(KG_PER_LB).toBe(0.45359237);
    expect(kgToLb(0.45359237)).toBe(1);
  });

  it('the short ton is 2000 lb = 907.18474 kg', () => {
    // Short ton = 2000 lb (en.wikipedia.org/?title=Short_ton&oldid=807481176: "907.18474 kg").
    expect(KG_PER_SHORT_TON).toBeCloseTo(907.18474, 10);
    expect(tonnesToShortTons(0.90718474)).toBeCloseTo(1, 12);
    expect(shortTonsToTonnes(tonnesToShortTons(123.4))).toBeCloseTo(123.4, 10);
  });

  it('the international acre is 4840 yd² = 4046.8564224 m²', () => {
    // International yard 0.9144 m (NBS 1959) × 4840 yd²; UK Units of Measurement Regulations 1995 give the same value.
    expect(M2_PER_ACRE).toBeCloseTo(4046.8564224, 9);
    expect(HA_PER_ACRE).toBeCloseTo(0.40468564224, 12);
    expect(haToAcres(acresToHa(640))).toBeCloseTo(640, 10);
  });

  it('1 lb/ac is 1.12085115619 kg/ha', () => {
    // Derived constant in docs/fertiliser.md §4 [C] (pound exact, international acre).
    expect(lbPerAcreInKgPerHa()).toBeCloseTo(1.12085115619, 10);
  });
});

/** |computed − published| in units of the fourth decimal. */
function fourDecimalGap(computed: number, published: number) {
  return Math.abs(computed - published) * 1e4;
}

function lbPerAcreInKgPerHa() {
  return KG_PER_LB / HA_PER_ACRE;
}

describe('bushel weights', () => {
  it('uses the USDA official weights per bushel', () => {
    // USDA official weight per bushel (docs/sources.md §6: en.wikipedia.org/wiki/Test_weight; agriconverter.com citing USDA FSA).
    expect(BUSHEL_WEIGHTS.wheat.lb).toBe(60);
    expect(BUSHEL_WEIGHTS.soybeans.lb).toBe(60);
    expect(BUSHEL_WEIGHTS.corn.lb).toBe(56);
    expect(BUSHEL_WEIGHTS.barley.lb).toBe(48);
    expect(BUSHEL_WEIGHTS.oats.lb).toBe(32);
    for (const crop of ['wheat', 'soybeans', 'corn', 'barley', 'oats'] as const) expect(BUSHEL_WEIGHTS[crop].status).toBe('official');
  });

  it('marks canola/rapeseed 50 lb as common practice without a source', () => {
    // Common practice, no source (from memory): no stored source confirms 50 lb/bu.
    expect(BUSHEL_WEIGHTS.canola.lb).toBe(50);
    expect(BUSHEL_WEIGHTS.canola.status).toBe('common-practice');
    expect(bushelWeightOf('Rapeseed')).toBe(BUSHEL_WEIGHTS.canola);
  });

  it('converts corn and wheat bushels to the exact derived masses', () => {
    // docs/fertiliser.md §5 [C]: corn 56 × 0.45359237 = 25.40117272 kg (39.368261104 bu/t);
    // wheat/soybeans 60 × 0.45359237 = 27.2155422 kg (36.743710364 bu/t).
    expect(kgPerBushel('corn')).toBeCloseTo(25.40117272, 10);
    expect(tonnesToBushels(1, 'corn')).toBeCloseTo(39.368261104, 8);
    expect(kgPerBushel('wheat')).toBeCloseTo(27.2155422, 10);
    expect(tonnesToBushels(1, 'soybeans')).toBeCloseTo(36.743710364, 8);
    expect(bushelsToTonnes(tonnesToBushels(250, 'barley'), 'barley')).toBeCloseTo(250, 10);
  });

  it('when the crop has no known bushel weight, says which crops it knows', () => {
    expect(bushelWeightOf('lentils')).toBeNull();
    expect(() => tonnesToBushels(1, 'lentils')).toThrow(/No bushel weight is known for "lentils".*wheat/);
  });
});

describe('oxide and element factors from IUPAC atomic weights', () => {
  it('P2O5 → P is 0.4364 and K2O → K is 0.8301 at four decimals', () => {
    // docs/sources.md §7: P2O5→P 0.4364, K2O→K 0.8301 (K2O→K also Virginia Tech SPES-201).
    // "At four decimals" means within one unit of the fourth decimal: K2O→K computes to
    // 0.8301513, which rounds to 0.8302, so the printed 0.8301 is a truncation.
    expect(fourDecimalGap(NUTRIENT_FACTORS.p2o5ToP, 0.4364)).toBeLessThan(1);
    expect(fourDecimalGap(NUTRIENT_FACTORS.k2oToK, 0.8301)).toBeLessThan(1);
    expect(NUTRIENT_FACTORS.p2o5ToP.toFixed(4)).toBe('0.4364');
    expect(NUTRIENT_FACTORS.p2o5ToP).toBeCloseTo(0.436427, 6);
    expect(NUTRIENT_FACTORS.k2oToK).toBeCloseTo(0.830151, 6);
    expect(p2o5ToP(1000)).toBeCloseTo(436.427, 2);
    expect(k2oToK(1000)).toBeCloseTo(830.151, 2);
  });

  it('the reverse factors and NH3 → N equal the values computed by hand from the atomic weights', () => {
    // Not a published table: docs/fertiliser.md §2 [C], e.g. K→K2O = (2×39.0983 + 15.999)/(2×39.0983)
    // = 1.204600; P→P2O5 2.291335 and NH3→N 0.822441 likewise, printed 2.2913, 1.2046, 0.8224.
    expect(fourDecimalGap(NUTRIENT_FACTORS.pToP2o5, 2.2913)).toBeLessThan(1);
    expect(fourDecimalGap(NUTRIENT_FACTORS.kToK2o, 1.2046)).toBeLessThan(1);
    expect(fourDecimalGap(NUTRIENT_FACTORS.nh3ToN, 0.8224)).toBeLessThan(1);
    expect(NUTRIENT_FACTORS.pToP2o5).toBeCloseTo(2.291335, 6);
    expect(NUTRIENT_FACTORS.kToK2o).toBeCloseTo(1.2046, 6);
    expect(NUTRIENT_FACTORS.nh3ToN).toBeCloseTo(0.822441, 6);
  });

  it('agrees with Virginia Tech SPES-201 to 0.05 %, and its K → K2O 1.2051 comes from rounded atomic weights', () => {
    // SPES-201 "Conversion Factors Needed for Common Fertilizer Calculations": P2O5→P 0.4365,
    // P→P2O5 2.2910, K2O→K 0.8301, K→K2O 1.2051, NH3→N 0.8225, N→NH3 1.2158 (docs/sources.md §7).
    // Which is right (docs/fertiliser.md §2): the factors computed from the IUPAC standard atomic
    // weights (K 39.0983, O 15.999), K2O/2K = (2×39.0983 + 15.999)/(2×39.0983) = 1.204600. The
    // table's 1.2051 is what rounded weights give, (2×39.0 + 16.0)/(2×39.0) = 94/78 = 1.20513 (our
    // reading of the table; it does not say how it was made). One tolerance for every factor:
    // 5e-4 relative. The table's rounding and older weights move a factor by at most 4.2e-4
    // relative (K→K2O), while any wrong formula is off by far more (P instead of P2O5: ×2.29;
    // K2O→K used for K→K2O: 31 %).
    const spes201: [number, number][] = [
      [NUTRIENT_FACTORS.p2o5ToP, 0.4365],
      [NUTRIENT_FACTORS.pToP2o5, 2.291],
      [NUTRIENT_FACTORS.k2oToK, 0.8301],
      [NUTRIENT_FACTORS.kToK2o, 1.2051],
      [NUTRIENT_FACTORS.nh3ToN, 0.8225],
      [NUTRIENT_FACTORS.nToNh3, 1.2158],
    ];
    for (const [computed, printed] of spes201) expect(Math.abs(computed - printed) / printed).toBeLessThan(5e-4);
    expect(((2 * 39.0 + 16.0) / (2 * 39.0)).toFixed(4)).toBe('1.2051');
    expect(NUTRIENT_FACTORS.kToK2o.toFixed(4)).toBe('1.2046');
    expect(NUTRIENT_FACTORS.p2o5ToP * NUTRIENT_FACTORS.pToP2o5).toBeCloseTo(1, 14);
  });

  it('pure urea is 46.65 % N and pure KCl 63.2 % K2O-equivalent', () => {
    // docs/fertiliser.md §2 [C from atomic weights]: the commercial grades 46-0-0 and 0-0-60 sit just below.
    expect(PURE_COMPOUND.ureaNPct.toFixed(2)).toBe('46.65');
    expect(PURE_COMPOUND.kclK2oPct.toFixed(1)).toBe('63.2');
  });
});

describe('the metric / US switch', () => {
  it('metric values pass through unchanged', () => {
    expect(inUnitSystem(12.5, 't', 'metric')).toEqual({ value: 12.5, unit: 't' });
    expect(unitLabel('kg/ha', 'metric')).toBe('kg/ha');
  });

  it('converts kg, t, ha, rates and prices to lb, short tons and acres', () => {
    expect(inUnitSystem(KG_PER_LB * 10, 'kg', 'us').value).toBeCloseTo(10, 12);
    expect(inUnitSystem(0.90718474, 't', 'us')).toEqual({ value: expect.closeTo(1, 12), unit: 'short ton' });
    expect(inUnitSystem(0.40468564224, 'ha', 'us').value).toBeCloseTo(1, 12);
    expect(inUnitSystem(1.12085115619, 'kg/ha', 'us').value).toBeCloseTo(1, 9);
    // A price of 1000 per t is 907.18474 per short ton.
    expect(inUnitSystem(1000, 'per t', 'us')).toEqual({ value: expect.closeTo(907.18474, 8), unit: 'per short ton' });
    expect(inUnitSystem(1, 'per kg', 'us').value).toBeCloseTo(0.45359237, 12);
  });

  it('with a crop, tonnes become bushels', () => {
    expect(inUnitSystem(1, 't', 'us', { crop: 'corn' })).toEqual({ value: expect.closeTo(39.368261104, 8), unit: 'bu' });
    // 1 t/ha of wheat = 36.743710364 bu/t × 0.40468564224 ha/ac = 14.8696 bu/ac [C].
    expect(inUnitSystem(1, 't/ha', 'us', { crop: 'wheat' }).value).toBeCloseTo(36.743710364 * 0.40468564224, 8);
    expect(inUnitSystem(39.368261104, 'per t', 'us', { crop: 'corn' }).value).toBeCloseTo(1, 8);
    expect(unitLabel('t', 'us', { crop: 'corn' })).toBe('bu');
  });
});
