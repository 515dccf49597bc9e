import type { NetputDataset } from '../server/estimation/index.js';
import type { DemoCoop } from './demo-coop.js';
import { DEMO_ITEMS } from './technology.js';

/** The demo's items as the model orders them: outputs first, then inputs. */
export const DEMO_ORDER = [...DEMO_ITEMS.filter((i) => i.role === 'output'), ...DEMO_ITEMS.filter((i) => i.role === 'input')];
const dpOfRegion: Record<string, string> = { Riverlands: 'Larkfield terminal', 'North Wold': 'Ashby elevator', Clayvale: 'Millbrook store' };

/**
 * A demo co-op's records as the model sample sees them (as server/models/model-data.ts builds it
 * from the database): prices faced per region (inputs: the co-op's price lists), land per farm and
 * season, one observation per farm and season.
 */
export function demoDataset(demo: DemoCoop): NetputDataset {
  const rec = new Map(demo.records.map((r) => [`${r.farm}/${r.season}/${r.item}`, r.quantity]));
  const land = new Map(demo.land.map((r) => [`${r.farm}/${r.season}`, r.landHa]));
  const ds: NetputDataset = { items: DEMO_ORDER.map((i) => ({ name: i.code, role: i.role })), fixedFactors: ['land_ha'], seasons: [], seasonYears: [], farms: [], prices: DEMO_ORDER.map(() => []), quantities: DEMO_ORDER.map(() => []), fixed: [[]], rows: [] };
  for (const s of demo.seasons)
    for (const f of demo.farms) {
      ds.seasons.push(s.label);
      ds.seasonYears.push(s.startYear);
      ds.farms!.push(f.code);
      ds.rows.push(ds.rows.length + 2);
      DEMO_ORDER.forEach((it, k) => {
        const obs = demo.prices.filter((p) => p.item === it.code && p.season === s.label && (it.role === 'input' || p.deliveryPoint === dpOfRegion[f.region]));
        ds.prices[k].push(obs.reduce((a, p) => a + p.price, 0) / obs.length);
        ds.quantities[k].push(rec.get(`${f.code}/${s.label}/${it.code}`)!);
      });
      ds.fixed[0].push(land.get(`${f.code}/${s.label}`)!);
    }
  return ds;
}
