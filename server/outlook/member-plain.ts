/**
 * The member portal's plain reading of a published outlook (issue 16): season labels instead of
 * years, per-hectare figures beside the totals, the farm's fertiliser need and its bill at the
 * outlook's expected prices, one item order for every section, and sentences without method names.
 * Everything here is derived from the frozen version and the item list; nothing is re-estimated.
 */
import type { Db } from '../db/client.js';
import type { FarmOutlook, ItemProjection, MemberPlain, OutlookSnapshot, PlainFertiliserLine } from '../../shared/outlook-types.js';
import { bandCoverWords, SCENARIO_WORDS } from '../../shared/band-words.js';
import { dayText } from '../../shared/number-format.js';
import { seasonLabel } from '../../shared/season-calendar.js';
import { landOfFarmParts } from './outlook-repository.js';
import { itemsWithCodes, seasonLabelsStartingIn } from './projection-repository.js';

/** The nutrient a fertiliser item carries entirely (100 % N, P2O5 or K2O), if it is one. */
function nutrientOf(row: { category: string | null; nPct: number | null; p2o5Pct: number | null; k2oPct: number | null }): PlainFertiliserLine['nutrient'] | null {
  if (row.nPct === 100) return 'N';
  if (row.p2o5Pct === 100) return 'P2O5';
  if (row.k2oPct === 100) return 'K2O';
  return null;
}

const base = (it: ItemProjection) => it.scenarios['base']?.point ?? null;

/** Season label of a first calendar year, from the seasons table ("2006" → "2006/07"). */
async function seasonLabels(db: Db, years: number[]): Promise<Map<number, string>> {
  const rows = await seasonLabelsStartingIn(db, years);
  return new Map(rows.map((r) => [r.startYear, r.label]));
}

export async function memberPlain(db: Db, versionId: number, s: OutlookSnapshot, farm: FarmOutlook | null): Promise<MemberPlain> {
  const { first, last } = s.model.sampleSeasons;
  const labels = await seasonLabels(db, [first, last]);
  const firstLabel = labels.get(first) ?? seasonLabel(first);
  const lastLabel = labels.get(last) ?? seasonLabel(last);

  // The co-op's land: the sum over the farms projected (a total, no farm's own figure).
  const coopLand = (await landOfFarmParts(db, versionId)).reduce<number>((sum, land) => sum + (land ?? 0), 0);
  const farmLand = farm?.fixed['land_ha'] ?? null;

  // One order everywhere: outputs first, then inputs, each in the model's order.
  const order = [...s.projection.coop.items].sort((a, b) => (a.role === b.role ? 0 : a.role === 'output' ? -1 : 1)).map((i) => i.item);

  const perHa = (list: ItemProjection[] | undefined, land: number | null) =>
    Object.fromEntries((list ?? []).map((it) => [it.item, land && land > 0 && base(it) !== null ? base(it)! / land : null])) as Record<string, number | null>;

  // The farm's fertiliser need and bill at the outlook's expected prices, for each scenario.
  let fertiliser: MemberPlain['fertiliser'] = null;
  if (farm) {
    const codes = farm.items.filter((i) => i.role === 'input').map((i) => i.item);
    const rows = (await itemsWithCodes(db, codes)).filter((r) => r.category === 'fertiliser');
    const lines: PlainFertiliserLine[] = [];
    for (const it of farm.items) {
      const row = rows.find((r) => r.code === it.item);
      const nutrient = row ? nutrientOf(row) : null;
      const price = s.expectations.find((e) => e.item === it.item);
      if (!nutrient || !price) continue;
      // The expected price is per the item's own unit (e.g. EUR/kg N); anything else is left out rather than guessed.
      if (price.priceUnit !== `${price.currency}/${it.unit}`) continue;
      const kg = base(it) ?? 0;
      lines.push({
        item: it.item,
        name: it.name,
        nutrient,
        unit: it.unit,
        kg,
        kgPerHa: farmLand && farmLand > 0 ? kg / farmLand : null,
        pricePerKg: price.base,
        cost: kg * price.base,
        costLow: (it.scenarios['low']?.point ?? kg) * price.low,
        costHigh: (it.scenarios['high']?.point ?? kg) * price.high,
      });
    }
    if (lines.length)
      fertiliser = {
        lines: lines.sort((a, b) => order.indexOf(a.item) - order.indexOf(b.item)),
        total: lines.reduce((t, l) => t + l.cost, 0),
        totalLow: lines.reduce((t, l) => t + l.costLow, 0),
        totalHigh: lines.reduce((t, l) => t + l.costHigh, 0),
        currency: s.currency,
        caution:
          'An estimate from the model at the outlook’s expected prices, not a recommendation: the rate your fields need follows your soil tests, local agronomic guidance and the nutrient-management rules that apply to you, and a certified adviser has the last word. The bill leaves out delivery, spreading and any discount the co-op negotiates.',
      };
  }

  const sample = `${firstLabel} to ${lastLabel}`;
  return {
    itemOrder: order,
    sampleSeasons: { first: firstLabel, last: lastLabel },
    farmLandHa: farmLand,
    coopLandHa: coopLand > 0 ? coopLand : null,
    farmPerHa: farm ? perHa(farm.items, farmLand) : {},
    coopPerHa: perHa(s.projection.coop.items, coopLand > 0 ? coopLand : null),
    fertiliser,
    bandWords: bandCoverWords(s.projection.band ?? null),
    scenarioWords: `${SCENARIO_WORDS} The prices of each are in the table below.`,
    source: `The co-op’s planner made these figures from the member farms’ records of ${sample} (${s.model.observations.toLocaleString('en-GB')} farm seasons) and the expected prices below${s.publishedBy ? `; ${s.publishedBy} published them on ${dayText(s.publishedAt)}` : `, and published them on ${dayText(s.publishedAt)}`}.`,
  };
}
