import { DateTime } from 'luxon';
import { buildTechnology, DEMO_ITEMS, MID_TREND, netputsPerHa, BASE_LAND_HA } from './technology.js';
import { seededRandom } from './random.js';

/**
 * The invented demo co-operative: Larkfield Grain & Supply. Every name, farm and figure is made up;
 * e-mail addresses are on example.org.
 */
export const DEMO_PASSWORD = 'netput-demo';
export const DEMO_ACCOUNTS = [
  { email: 'admin@example.org', name: 'Alex Admin', role: 'admin' as const },
  { email: 'planner@example.org', name: 'Priya Planner', role: 'planner' as const },
  { email: 'treasurer@example.org', name: 'Tomas Treasurer', role: 'treasurer' as const },
  { email: 'member@example.org', name: 'Maren Hollis', role: 'member' as const },
];

export const DEMO_SETTINGS = {
  coopName: 'Larkfield Grain & Supply Co-operative',
  currency: 'EUR',
  unitSystem: 'metric' as const,
  decimalMark: 'point' as const,
  storageCapacityT: 60000,
  handlingCapacityTPerDay: 2500,
};

export const FIRST_SEASON = 2006;
export const SEASON_COUNT = 20;

const REGIONS = ['Riverlands', 'North Wold', 'Clayvale'];
export const DELIVERY_POINTS = [
  { name: 'Larkfield terminal', kind: 'delivery point' as const, region: 'Riverlands' },
  { name: 'Ashby elevator', kind: 'delivery point' as const, region: 'North Wold' },
  { name: 'Millbrook store', kind: 'delivery point' as const, region: 'Clayvale' },
  { name: 'Co-op input depot', kind: 'delivery point' as const, region: 'Riverlands' },
];
const INPUT_DEPOT = 'Co-op input depot';

const FARM_NAMES = [
  'Hollybrook Farm', 'Ashcombe Fields', 'Bramble End', 'Cold Harbour Farm', 'Dunmore Acres', 'Elder Lane Farm',
  'Fernhill', 'Greystones', 'Hazel Bottom', 'Iris Meadow', 'Juniper Rise', 'Kestrel Farm', 'Longacre',
  'Marsh Gate', 'Nettlebed Farm', 'Oakhanger', 'Pennywell', 'Quarry Hill Farm', 'Redwater', 'Stonybrook',
];
const OWNER_NAMES = [
  'Maren Hollis', 'Jonah Ashby', 'Ines Bramwell', 'Callum Reade', 'Dora Linnet', 'Emil Varga', 'Freya Colter',
  'Gideon Marsh', 'Hana Okafor', 'Ivo Lindqvist', 'Jude Penrose', 'Keira Doyle', 'Luca Ferrant', 'Mina Sato',
  'Nils Brekke', 'Orla Quinlan', 'Pavel Novak', 'Rosa Alder', 'Soren Holt', 'Tessa Wynn',
];

export interface DemoCoop {
  settings: typeof DEMO_SETTINGS;
  items: typeof DEMO_ITEMS;
  seasons: { label: string; startYear: number; startMonth: number; startsOn: string }[];
  deliveryPoints: typeof DELIVERY_POINTS;
  farms: { code: string; name: string; region: string; landHa: number; ownerEmail: string; ownerName: string }[];
  prices: { item: string; season: string; deliveryPoint: string; price: number; source: string; observedOn: string }[];
  /** Quantities ≥ 0 in each item's unit; land per farm and season in `land`. */
  records: { farm: string; season: string; item: string; quantity: number }[];
  land: { farm: string; season: string; landHa: number }[];
  deflator: { name: string; base: string; source: string };
  deflatorValues: { season: string; value: number }[];
}

export function seasonLabel(startYear: number) {
  return `${startYear}/${String((startYear + 1) % 100).padStart(2, '0')}`;
}

/** Season-level price multipliers: shocks the demo's history shares (invented, loosely like recent decades). */
const SHOCKS: Record<number, { grain?: number; fert?: number; fuel?: number }> = {
  2007: { grain: 0.3, fert: 0.2, fuel: 0.15 },
  2008: { grain: -0.1, fert: 0.55, fuel: 0.2 },
  2010: { grain: 0.15 },
  2012: { grain: 0.25, fert: 0.1 },
  2014: { grain: -0.15, fuel: -0.1 },
  2015: { fuel: -0.25, fert: -0.1 },
  2021: { grain: 0.2, fert: 0.45, fuel: 0.2 },
  2022: { grain: 0.3, fert: 0.7, fuel: 0.35 },
  2023: { grain: -0.1, fert: -0.2, fuel: 0.05 },
};

const MIN_FARM_HA = 40;
const MAX_FARM_HA = 900;

/**
 * Spread of the records around the technology, as shares of each item's per-hectare level at base
 * prices (invented): `farm` = how much the farm's productivity moves the item, `weather` = the
 * item's response to one standard deviation of the season's weather, `season` = the item's own
 * season-wide shock, `own` = the farm's own error in a season.
 */
const NOISE: Record<string, { farm: number; weather: number; season: number; own: number }> = {
  wheat: { farm: 1, weather: 0.09, season: 0.025, own: 0.07 },
  canola: { farm: 1, weather: 0.12, season: 0.03, own: 0.1 },
  nitrogen: { farm: 0.8, weather: 0.035, season: 0.02, own: 0.06 },
  phosphate: { farm: 0.6, weather: 0.02, season: 0.025, own: 0.09 },
  potash: { farm: 0.6, weather: 0.02, season: 0.025, own: 0.1 },
  diesel: { farm: 0.5, weather: 0.04, season: 0.02, own: 0.06 },
  labour: { farm: 0.4, weather: 0.05, season: 0.025, own: 0.08 },
};

/** Seasons whose weather the demo fixes (standard deviations; invented): a drought and a wet harvest. */
const WEATHER_YEARS: Record<number, number> = { 2018: -2, 2012: -1.2 };

export function buildDemoCoop(seed = 20261201): DemoCoop {
  const rnd = seededRandom(seed);
  const tech = buildTechnology();
  const seasons = Array.from({ length: SEASON_COUNT }, (_, k) => {
    const y = FIRST_SEASON + k;
    return { label: seasonLabel(y), startYear: y, startMonth: 7, startsOn: DateTime.utc(y, 7, 1).toISODate()! };
  });

  // Co-op wide price paths: AR(1) in logs around each base price, with shared shocks.
  const level: Record<string, number[]> = {};
  for (const it of DEMO_ITEMS) {
    let dev = 0;
    level[it.code] = seasons.map((s) => {
      dev = 0.55 * dev + 0.07 * rnd.normal();
      const shock = SHOCKS[s.startYear] ?? {};
      const group = it.category === 'grain' || it.category === 'oilseed' ? shock.grain : it.category === 'fertiliser' ? shock.fert : it.category === 'fuel' ? shock.fuel : undefined;
      const wageDrift = it.category === 'labour' ? 0.025 * (s.startYear - FIRST_SEASON - MID_TREND) : 0;
      const inflation = 0.015 * (s.startYear - FIRST_SEASON - MID_TREND);
      return it.basePrice * Math.exp(dev + (group ?? 0) + wageDrift + inflation * (it.category === 'labour' ? 0 : 1));
    });
  }

  const prices: DemoCoop['prices'] = [];
  const basis: Record<string, number> = { 'Larkfield terminal': 0, 'Ashby elevator': -4, 'Millbrook store': -7 };
  seasons.forEach((s, k) => {
    for (const it of DEMO_ITEMS) {
      const p = level[it.code][k];
      if (it.role === 'output') {
        for (const dp of DELIVERY_POINTS.filter((d) => d.name !== INPUT_DEPOT)) {
          const perT = p + basis[dp.name] * (it.code === 'canola' ? 1.5 : 1) + 1.5 * rnd.normal();
          prices.push({
            item: it.code,
            season: s.label,
            deliveryPoint: dp.name,
            price: round(perT, 2),
            source: 'Co-op grain desk harvest bid',
            observedOn: DateTime.utc(s.startYear, 8, 15).toISODate()!,
          });
        }
      } else {
        // Inputs: the autumn booking price list and the spring list.
        for (const [month, day, f, source] of [
          [10, 1, 0.97, 'Co-op input price list (autumn booking)'],
          [3, 1, 1.03, 'Co-op input price list (spring)'],
        ] as const) {
          const year = month >= 7 ? s.startYear : s.startYear + 1;
          prices.push({
            item: it.code,
            season: s.label,
            deliveryPoint: INPUT_DEPOT,
            price: round(p * f * (1 + 0.01 * rnd.normal()), it.basePrice < 5 ? 3 : 2),
            source,
            observedOn: DateTime.utc(year, month, day).toISODate()!,
          });
        }
      }
    }
  });

  // Farm sizes spread evenly in logs from about 40 to 900 ha, in a shuffled order of the farm list.
  const sizeRank = FARM_NAMES.map((_, i) => ({ i, key: rnd.next() })).sort((a, b) => a.key - b.key).map((r) => r.i);
  const farms = FARM_NAMES.map((name, i) => {
    const region = REGIONS[i % REGIONS.length];
    const share = (sizeRank.indexOf(i) + 0.2 + 0.6 * rnd.next()) / FARM_NAMES.length;
    const landHa = round(Math.exp(Math.log(MIN_FARM_HA) + share * Math.log(MAX_FARM_HA / MIN_FARM_HA)), 0);
    const ownerName = OWNER_NAMES[i];
    const ownerEmail = i === 0 ? 'member@example.org' : `${ownerName.toLowerCase().replace(/[^a-z]+/g, '.')}@example.org`;
    return { code: `F${String(i + 1).padStart(2, '0')}`, name, region, landHa, ownerEmail, ownerName };
  });
  const dpOfRegion: Record<string, string> = { Riverlands: 'Larkfield terminal', 'North Wold': 'Ashby elevator', Clayvale: 'Millbrook store' };

  // Per-hectare level of every item at base prices: the unit of the effects and errors below.
  const unitHa = Object.fromEntries(DEMO_ITEMS.map((it) => [it.code, it.baseQuantity / BASE_LAND_HA]));
  // Season-wide weather, shared by every farm: a good season raises all crops and the inputs with them.
  const weather = seasons.map((s) => WEATHER_YEARS[s.startYear] ?? rnd.normal());
  const seasonShock = seasons.map((_, k) =>
    Object.fromEntries(DEMO_ITEMS.map((it) => [it.code, NOISE[it.code].weather * weather[k] + NOISE[it.code].season * rnd.normal()])),
  );
  const records: DemoCoop['records'] = [];
  const land: DemoCoop['land'] = [];
  for (const farm of farms) {
    // The farm's own productivity: one level for all its items, plus a little of each item's own.
    const skill = 0.12 * rnd.normal();
    const farmEffect = Object.fromEntries(DEMO_ITEMS.map((it) => [it.code, NOISE[it.code].farm * skill + 0.05 * rnd.normal()]));
    // Land changes now and then (a field rented or given up); the register holds the latest.
    let landHa = farm.landHa;
    seasons.forEach((s, k) => {
      if (k > 0 && rnd.next() < 0.12) landHa = landHa * Math.exp(0.08 * rnd.normal());
      landHa = round(landHa, 1);
      land.push({ farm: farm.code, season: s.label, landHa });
      const faced: Record<string, number> = {};
      for (const it of DEMO_ITEMS) {
        const obs = prices.filter((p) => p.item === it.code && p.season === s.label && (it.role === 'input' || p.deliveryPoint === dpOfRegion[farm.region]));
        faced[it.code] = obs.reduce((a, p) => a + p.price, 0) / obs.length;
      }
      const perHa = netputsPerHa(tech, faced, k);
      for (const it of DEMO_ITEMS) {
        // Additive per hectare: the technology, the farm, the season, and the farm's own error (its
        // spread per hectare is the same on every farm, so in tonnes it grows with the land).
        const shock = farmEffect[it.code] + seasonShock[k][it.code] + NOISE[it.code].own * rnd.normal();
        const quantity = Math.max(0, landHa * (Math.abs(perHa[it.code]) + unitHa[it.code] * shock));
        records.push({ farm: farm.code, season: s.label, item: it.code, quantity: round(quantity, it.unit === 't' ? 1 : 0) });
      }
    });
    farm.landHa = round(landHa, 0);
  }
  const deflator = { name: 'Consumer prices (demo)', base: `${seasonLabel(FIRST_SEASON + MID_TREND)} = 100`, source: 'Invented for the demo co-op' };
  const deflatorValues = seasons.map((s) => ({ season: s.label, value: round(100 * Math.exp(0.015 * (s.startYear - FIRST_SEASON - MID_TREND)), 1) }));
  return { settings: DEMO_SETTINGS, items: DEMO_ITEMS, seasons, deliveryPoints: DELIVERY_POINTS, farms, prices, records, land, deflator, deflatorValues };
}

function round(x: number, digits: number) {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}
