import { describe, expect, it } from 'vitest';
import type { BackTestResult } from './forecast-types.js';
import { skillSummary } from './skill-words.js';

const err = (mdape: number) => ({ mdape, rmse: mdape, coopError: 3, count: 100 });
const cov = (held: number, total: number) => ({ held, total, share: held / total });

function result(spec: 'per-hectare' | 'pooled'): BackTestResult {
  return {
    spec,
    level: 0.9,
    thirds: { by: 'land', cuts: [100, 300] },
    origins: Array.from({ length: 5 }, (_, k) => ({ fittedThrough: `${2018 + k}`, season: `${2019 + k}`, farms: 20, coop: {}, error: null })),
    items: [
      {
        item: 'wheat',
        role: 'output',
        model: err(9),
        rules: { lastSeason: err(18), perHectare: err(10) },
        ratios: { lastSeason: { mdape: 0.5, rmse: 0.5 }, perHectare: { mdape: 0.9, rmse: 0.9 } },
        coverage: { byThird: [cov(30, 33), cov(31, 34), cov(30, 33)], farms: cov(91, 100), coop: cov(5, 5) },
        beatsRule: true,
      },
    ],
  };
}

// docs/forecasting.md §7: the back-test in words on the model and outlook pages.
describe('skill and coverage in plain words', () => {
  it('states skill against both plain rules and coverage by third and for the co-op', () => {
    const s = skillSummary(result('per-hectare'), (c) => (c === 'wheat' ? 'Wheat' : c));
    expect(s.text).toBe(
      'Projecting each of the last 5 seasons from the seasons before it, this model’s farm projections were 50 % closer than last season’s figures and 10 % closer than the farm’s own average per hectare times its land (the middle item’s median farm error). ' +
        'Its 90 % bands held 91 % of farm outcomes (smallest third of farms 91 %, middle third 91 %, largest third 91 %) and 5 of 5 co-op totals. That is about as often as 90 % bands should hold.',
    );
    expect(s.weakItems).toEqual([]);
  });

  it('says plainly what the pooled model’s bands leave out', () => {
    const s = skillSummary(result('pooled'), (c) => c);
    expect(s.coverage).toContain('These are the pooled model’s bands');
    expect(s.coverage).toContain('not for a good or bad season that moves every farm together');
    expect(s.text.endsWith('so its co-op bands are likely too narrow.')).toBe(true);
  });
});
