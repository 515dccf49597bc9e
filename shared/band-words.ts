/**
 * What an outlook's band covers, in words, for the staff pages, the member portal and the e-mail
 * alike (docs/forecasting.md §6). The band is the central 90 % of the simulated outcomes.
 */
export interface BandFacts {
  /** The forecasting model's specification; null for a run projected with its profit function alone. */
  spec: 'per-hectare' | 'pooled' | null;
  /** The draws include how far the expectation methods' prices missed in past seasons. */
  priceRisk: boolean;
  /** Past seasons of price errors drawn from (0 without price risk). */
  priceRiskSeasons: number;
  /** Degrees of freedom of the season shock's t predictive (null: no season shock in the model). */
  seasonShockDf: number | null;
}

/** "9 in 10 outcomes should fall inside the band. It allows for …" */
export function bandCoverWords(b: BandFacts | null | undefined): string {
  const head = 'The band is where 9 in 10 outcomes should fall.';
  if (!b || b.spec !== 'per-hectare') {
    const price = b?.priceRisk ? ' and how far the expected prices missed in past seasons' : '';
    return `${head} It allows for the uncertainty of the model’s estimates and each farm’s own ups and downs${price}, but not for a good or bad season that moves every farm together, so the co-op’s band is likely too narrow.${b?.priceRisk ? '' : ' Prices other than expected are in the low and high scenarios, not in the band.'}`;
  }
  const parts = [
    'the uncertainty of the model’s estimates',
    'each farm’s own ups and downs (larger on larger farms)',
    'a good or bad season that moves every farm and every item together',
  ];
  if (b.priceRisk) parts.push(`how far the expected prices missed in the past ${b.priceRiskSeasons} seasons`);
  const list = `${parts.slice(0, -1).join(', ')} and ${parts.at(-1)}`;
  const tail = b.priceRisk ? '' : ' Prices other than expected are in the low and high scenarios, not in the band.';
  return `${head} It allows for ${list}.${tail}`;
}

/** The low and high price scenarios in plain words, without the rule's formula (portal and e-mail). */
export const SCENARIO_WORDS =
  'The low and high scenarios are the same season at lower and at higher prices for everything the co-op buys and sells.';
