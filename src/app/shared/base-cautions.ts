/** That projections are estimates: shown wherever the app shows a projection or figures that feed one. */
export const PROJECTION_CAUTION =
  'Projections are estimates from past behaviour, not financial advice, nor a recommendation to buy, sell, book, store or hedge.';

/** That fertiliser rates are not ours to set: shown wherever the app shows fertiliser figures. */
export const FERTILISER_RATE_CAUTION =
  'Fertiliser rates follow soil tests, local agronomic guidance and nutrient-management rules, and a certified adviser has the last word.';

/** The cautions every outlook page shows when the server has not sent its own list (yet). */
export const BASE_CAUTIONS: readonly string[] = [PROJECTION_CAUTION, FERTILISER_RATE_CAUTION];
