/**
 * Units shared by server and client: exact mass and area conversions, bushel weights by crop,
 * nutrient oxide ↔ element factors, and the metric / US display switch.
 *
 * Every factor names its source. Provenance tags as in docs/README.md:
 *   [S] confirmed from a cited source, [C] computed here from [S] values, [M] from memory,
 *   "common practice, no source" where the trade uses a value no stored source confirms.
 */

// ---------------------------------------------------------------------------------------------
// Exact length, mass and area definitions
// ---------------------------------------------------------------------------------------------

/**
 * 1 lb (international avoirdupois pound) = 0.45359237 kg exactly, by the international yard and
 * pound agreement of 1959 (effective in the US on 1 July 1959). [S: docs/sources.md §6, citing
 * units.wikia.com/wiki/Pound_(United_States_customary_avoirdupois)]
 */
export const KG_PER_LB = 0.45359237;

/**
 * 1 short ton = 2000 lb (US customary), so 907.18474 kg exactly [C]. [S: secondary,
 * en.wikipedia.org/?title=Short_ton&oldid=807481176: "2,000 pounds (907.18474 kg)"]
 */
export const LB_PER_SHORT_TON = 2000;
export const KG_PER_SHORT_TON = LB_PER_SHORT_TON * KG_PER_LB;

/** 1 t (tonne, metric ton) = 1000 kg (SI). */
export const KG_PER_TONNE = 1000;

/** 1 international yard = 0.9144 m exactly, by the same 1959 agreement (NBS, Federal Register doc. 59-5442) [S: secondary, en.academic.ru "Acre"]. */
export const M_PER_YARD = 0.9144;

/**
 * 1 international acre = 4840 square yards = 4046.8564224 m² exactly [C from the yard]. The value
 * is also the UK statutory acre (Units of Measurement Regulations 1995) [S: secondary,
 * fixedreference.org "Acre"]; docs/fertiliser.md §4 derives it from the yard. The US survey acre
 * (4046.8726 m²) is a different, older unit and is not used here.
 */
export const SQ_YARDS_PER_ACRE = 4840;
export const M2_PER_ACRE = SQ_YARDS_PER_ACRE * M_PER_YARD * M_PER_YARD;

/** 1 ha = 10 000 m² (SI, hectare accepted for use with the SI). */
export const M2_PER_HECTARE = 10_000;

/** Hectares in one acre: 0.40468564224 [C]. */
export const HA_PER_ACRE = M2_PER_ACRE / M2_PER_HECTARE;

// ---------------------------------------------------------------------------------------------
// Bushel weights
// ---------------------------------------------------------------------------------------------

export interface BushelWeight {
  /** Pounds per bushel by convention. */
  lb: number;
  /** Where the value comes from, honestly. */
  source: string;
  /** 'official' for the USDA weights, 'common-practice' where no stored source confirms it. */
  status: 'official' | 'common-practice';
}

const USDA =
  "USDA official weight per bushel [S: docs/sources.md §6 — en.wikipedia.org/wiki/Test_weight (\"USDA's official weight per bushel\"), agriconverter.com citing USDA FSA grain standards]";

/**
 * Pounds per bushel used to turn bushels into mass. Test weight affects grade, not this
 * conversion. Canola/rapeseed: 50 lb/bu is the convention of the Canadian trade — common
 * practice, no source: recalled from memory [M], not confirmed by any stored source.
 */
export const BUSHEL_WEIGHTS = {
  wheat: { lb: 60, source: USDA, status: 'official' },
  soybeans: { lb: 60, source: USDA, status: 'official' },
  corn: { lb: 56, source: USDA, status: 'official' },
  sorghum: { lb: 56, source: USDA, status: 'official' },
  rye: { lb: 56, source: USDA, status: 'official' },
  barley: { lb: 48, source: USDA, status: 'official' },
  oats: { lb: 32, source: USDA, status: 'official' },
  rice: { lb: 45, source: USDA, status: 'official' },
  canola: { lb: 50, source: 'Common practice, no source (Canadian trade convention, from memory [M])', status: 'common-practice' },
} as const satisfies Record<string, BushelWeight>;

export type BushelCrop = keyof typeof BUSHEL_WEIGHTS;

/** Crop names that mean the same bushel (the demo calls rapeseed "canola"). */
const CROP_ALIASES: Record<string, BushelCrop> = {
  rapeseed: 'canola',
  soybean: 'soybeans',
  soya: 'soybeans',
  maize: 'corn',
};

/** The bushel weight of a crop by name or alias (case-insensitive), or null when none is known. */
export function bushelWeightOf(crop: string): BushelWeight | null {
  const key = crop.trim().toLowerCase();
  const name = (key in BUSHEL_WEIGHTS ? key : CROP_ALIASES[key]) as BushelCrop | undefined;
  return name ? BUSHEL_WEIGHTS[name] : null;
}

function requireBushel(crop: string): BushelWeight {
  const w = bushelWeightOf(crop);
  if (!w) throw new RangeError(`No bushel weight is known for "${crop}" (known: ${Object.keys(BUSHEL_WEIGHTS).join(', ')})`);
  return w;
}

/** Kilograms in one bushel of a crop, e.g. corn 56 × 0.45359237 = 25.40117272 kg. */
export function kgPerBushel(crop: string): number {
  return requireBushel(crop).lb * KG_PER_LB;
}

export function tonnesToBushels(tonnes: number, crop: string): number {
  return (tonnes * KG_PER_TONNE) / kgPerBushel(crop);
}

export function bushelsToTonnes(bushels: number, crop: string): number {
  return (bushels * kgPerBushel(crop)) / KG_PER_TONNE;
}

// ---------------------------------------------------------------------------------------------
// Simple conversions
// ---------------------------------------------------------------------------------------------

export const kgToLb = (kg: number) => kg / KG_PER_LB;
export const lbToKg = (lb: number) => lb * KG_PER_LB;
export const tonnesToShortTons = (t: number) => (t * KG_PER_TONNE) / KG_PER_SHORT_TON;
export const shortTonsToTonnes = (st: number) => (st * KG_PER_SHORT_TON) / KG_PER_TONNE;
export const haToAcres = (ha: number) => ha / HA_PER_ACRE;
export const acresToHa = (ac: number) => ac * HA_PER_ACRE;

// ---------------------------------------------------------------------------------------------
// Nutrient oxide ↔ element factors, from atomic weights
// ---------------------------------------------------------------------------------------------

/**
 * IUPAC conventional / standard atomic weights, as docs/fertiliser.md §2 lists them for the computed
 * factors: P 30.973762, O 15.999, K 39.0983, N 14.007, H 1.008. Cl 35.45 and C 12.011 are the
 * IUPAC conventional values from memory [M]; they enter only the informational KCl and urea figures.
 */
export const ATOMIC_WEIGHTS = { P: 30.973762, O: 15.999, K: 39.0983, N: 14.007, H: 1.008, Cl: 35.45, C: 12.011 } as const;

const A = ATOMIC_WEIGHTS;
const M_P2O5 = 2 * A.P + 5 * A.O;
const M_K2O = 2 * A.K + A.O;
const M_NH3 = A.N + 3 * A.H;

/**
 * Mass fractions [C from ATOMIC_WEIGHTS]. Published check values (docs/sources.md §7; each within
 * one unit of the fourth decimal — K2O→K is 0.8301513, which rounds to 0.8302 but is printed 0.8301):
 * P2O5→P 0.4364 (VT SPES-201: 0.4365, the reciprocal of its rounded 2.2910), P→P2O5 2.2913,
 * K2O→K 0.8301 (SPES-201: 0.8301), K→K2O 1.2046 (SPES-201: 1.2051), NH3→N 0.8224 (SPES-201: 0.8225).
 * The computed K→K2O 1.2046 is the right one; SPES-201's 1.2051 is what rounded weights (K 39.0,
 * O 16.0) give (docs/fertiliser.md §2).
 */
export const NUTRIENT_FACTORS = {
  p2o5ToP: (2 * A.P) / M_P2O5,
  pToP2o5: M_P2O5 / (2 * A.P),
  k2oToK: (2 * A.K) / M_K2O,
  kToK2o: M_K2O / (2 * A.K),
  nh3ToN: A.N / M_NH3,
  nToNh3: M_NH3 / A.N,
} as const;

export const p2o5ToP = (kgP2o5: number) => kgP2o5 * NUTRIENT_FACTORS.p2o5ToP;
export const pToP2o5 = (kgP: number) => kgP * NUTRIENT_FACTORS.pToP2o5;
export const k2oToK = (kgK2o: number) => kgK2o * NUTRIENT_FACTORS.k2oToK;
export const kToK2o = (kgK: number) => kgK * NUTRIENT_FACTORS.kToK2o;

/** Pure-compound nutrient contents [C], for comparing with commercial grades (46-0-0, 0-0-60). */
export const PURE_COMPOUND = {
  /** Urea CO(NH2)2: 46.65 % N; the 46-0-0 grade is the guaranteed commercial analysis. */
  ureaNPct: (100 * 2 * A.N) / (A.C + A.O + 2 * (A.N + 2 * A.H)),
  /** KCl as K2O-equivalent: 63.2 %; commercial muriate of potash is 60–62 %. */
  kclK2oPct: (100 * (A.K / (A.K + A.Cl))) / NUTRIENT_FACTORS.k2oToK,
};

// ---------------------------------------------------------------------------------------------
// The metric / US switch
// ---------------------------------------------------------------------------------------------

export type UnitSystem = 'metric' | 'us';

/** The metric units Netput stores; each has one US counterpart. */
export type MetricUnit = 'kg' | 't' | 'ha' | 'kg/ha' | 't/ha' | 'per kg' | 'per t' | 'per ha';

/** US customary counterpart of each metric unit (bushels instead of short tons when a crop is named). */
export const US_UNIT: Record<MetricUnit, string> = {
  kg: 'lb',
  t: 'short ton',
  ha: 'ac',
  'kg/ha': 'lb/ac',
  't/ha': 'short ton/ac',
  'per kg': 'per lb',
  'per t': 'per short ton',
  'per ha': 'per ac',
};

const BUSHEL_UNIT: Partial<Record<MetricUnit, string>> = { t: 'bu', 't/ha': 'bu/ac', 'per t': 'per bu' };

export interface Converted {
  value: number;
  unit: string;
}

/**
 * A metric quantity in the chosen unit system. With `crop`, tonnes of that crop become bushels
 * (t → bu, t/ha → bu/ac, per t → per bu); without it, tonnes become short tons.
 */
export function inUnitSystem(value: number, unit: MetricUnit, system: UnitSystem, options: { crop?: string } = {}): Converted {
  if (system === 'metric') return { value, unit };
  const crop = options.crop;
  if (crop && BUSHEL_UNIT[unit]) {
    const buPerT = tonnesToBushels(1, crop);
    if (unit === 't') return { value: value * buPerT, unit: 'bu' };
    if (unit === 't/ha') return { value: (value * buPerT) * HA_PER_ACRE, unit: 'bu/ac' };
    return { value: value / buPerT, unit: 'per bu' };
  }
  switch (unit) {
    case 'kg':
      return { value: kgToLb(value), unit: US_UNIT[unit] };
    case 't':
      return { value: tonnesToShortTons(value), unit: US_UNIT[unit] };
    case 'ha':
      return { value: haToAcres(value), unit: US_UNIT[unit] };
    case 'kg/ha':
      return { value: kgToLb(value) * HA_PER_ACRE, unit: US_UNIT[unit] };
    case 't/ha':
      return { value: tonnesToShortTons(value) * HA_PER_ACRE, unit: US_UNIT[unit] };
    case 'per kg':
      return { value: value * KG_PER_LB, unit: US_UNIT[unit] };
    case 'per t':
      return { value: (value * KG_PER_SHORT_TON) / KG_PER_TONNE, unit: US_UNIT[unit] };
    case 'per ha':
      return { value: value * HA_PER_ACRE, unit: US_UNIT[unit] };
  }
}

/** Just the unit label of a metric unit in a unit system. */
export function unitLabel(unit: MetricUnit, system: UnitSystem, options: { crop?: string } = {}): string {
  if (system === 'metric') return unit;
  if (options.crop && BUSHEL_UNIT[unit]) return BUSHEL_UNIT[unit]!;
  return US_UNIT[unit];
}
