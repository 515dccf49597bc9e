import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { readBacktest, readElasticities, readingCaution, readShadowValues, sizeInWords, type ReadingItem } from './plain-reading';
import { PlainReadingPanel } from './plain-reading-panel';

// An elasticity e_ij is the % change of quantity i per 1 % change of price j (textbook definition;
// see docs/profit-functions.md §9: "a 10% rise in N price is associated with about a 3% fall
// in N use … when e = −0.3"). A 10 % rise is therefore read as about 10·e %.
const nitrogen: ReadingItem = { code: 'nitrogen', name: 'Nitrogen', role: 'input' };
const maize: ReadingItem = { code: 'maize', name: 'Maize', role: 'output' };

describe('readElasticities', () => {
  it('should read the issue example: a 10 % nitrogen price rise lowers nitrogen use by about 3 % and maize supply by about 1 %', () => {
    // Rows: quantity (maize, nitrogen); columns: price (maize, nitrogen). Rows sum to zero.
    const e = [
      [0.1, -0.1],
      [0.3, -0.3],
    ];
    const readings = readElasticities([maize, nitrogen], e, null);
    expect(readings[1]).toEqual({
      price: 'nitrogen',
      text: 'In this model a 10 % rise in the price of nitrogen lowers nitrogen use by about 3 % and maize supply by about 1 %.',
    });
    expect(readings[0]!.text).toBe('In this model a 10 % rise in the price of maize raises maize supply by about 1 % and nitrogen use by about 3 %.');
  });

  it('should name the verb again when the direction changes', () => {
    const wheat: ReadingItem = { code: 'wheat', name: 'Wheat', role: 'output' };
    const canola: ReadingItem = { code: 'canola', name: 'Canola (rapeseed)', role: 'output' };
    const labour: ReadingItem = { code: 'labour', name: 'Hired labour', role: 'input' };
    // Column 0 (wheat price): wheat +0.34, canola −0.12, labour +0.22; rows sum to zero.
    const e = [
      [0.34, -0.1, -0.24],
      [-0.12, 0.45, -0.33],
      [0.22, 0.1, -0.32],
    ];
    const [reading] = readElasticities([wheat, canola, labour], e, null);
    expect(reading!.text).toBe(
      'In this model a 10 % rise in the price of wheat raises wheat supply by about 3 %, lowers canola (rapeseed) supply by about 1 % and raises hired labour use by about 2 %.',
    );
  });

  it('should give tenths below 1 % and call tiny effects practically unchanged', () => {
    const e = [
      [0.02, -0.02],
      [0.003, -0.003],
    ];
    const readings = readElasticities([maize, nitrogen], e, null);
    expect(readings[1]!.text).toBe(
      'In this model a 10 % rise in the price of nitrogen leaves nitrogen use practically unchanged and lowers maize supply by about 0.2 %.',
    );
  });

  it('should say when an effect is within two standard errors of zero', () => {
    const e = [
      [0.1, -0.1],
      [0.3, -0.3],
    ];
    // Maize's response to the nitrogen price: |−0.1| < 1.96 × 0.08 → not told apart from zero;
    // nitrogen's own: |−0.3| > 1.96 × 0.05.
    const se = [
      [0.08, 0.08],
      [0.05, 0.05],
    ];
    const readings = readElasticities([maize, nitrogen], e, se);
    expect(readings[1]!.text).toBe(
      'In this model a 10 % rise in the price of nitrogen lowers nitrogen use by about 3 % and maize supply by about 1 %. ' +
        'The effect on maize supply is too uncertain to tell apart from no change.',
    );
  });

  it('should mention the own quantity, every output and the most affected other input, at most four', () => {
    const items: ReadingItem[] = [
      { code: 'wheat', name: 'Wheat', role: 'output' },
      { code: 'nitrogen', name: 'Nitrogen (N)', role: 'input' },
      { code: 'phosphate', name: 'Phosphate (P2O5)', role: 'input' },
      { code: 'diesel', name: 'Diesel', role: 'input' },
    ];
    const e = [
      [0.3, -0.05, -0.02, -0.23],
      [0.2, -0.4, -0.06, 0.26],
      [0.1, -0.09, -0.5, 0.49],
      [0.05, 0.01, 0.02, -0.08],
    ];
    const nitrogenReading = readElasticities(items, e, null)[1]!.text;
    expect(nitrogenReading).toBe(
      'In this model a 10 % rise in the price of nitrogen (N) lowers nitrogen (N) use by about 4 %, wheat supply by about 0.5 % and phosphate (P2O5) use by about 0.9 %.',
    );
  });
});

describe('sizeInWords', () => {
  it('should round to whole percent from about 1 % and to tenths below', () => {
    expect(sizeInWords(-3.4)).toBe('about 3 %');
    expect(sizeInWords(0.96)).toBe('about 1 %');
    expect(sizeInWords(0.44)).toBe('about 0.4 %');
    expect(sizeInWords(12.6)).toBe('about 13 %');
  });
});

describe('readShadowValues', () => {
  it('should say what one more hectare and a season of technical change are worth, with a 95 % margin', () => {
    const lines = readShadowValues(
      [
        { factor: 'land_ha', value: 808.5, standardError: 7.25 },
        { factor: 'trend', value: 6162.2, standardError: 216.3 },
      ],
      'EUR',
    );
    // 1.96 × 7.25 = 14.21 → €14; 1.96 × 216.3 = 423.9 → €424.
    expect(lines).toEqual([
      "One more hectare of land adds about €809 to an average farm's season return over the modelled variable inputs at average prices (give or take €14).",
      "A season of technical change (the trend) adds about €6,162 to an average farm's return over the modelled variable inputs at unchanged prices and land (give or take €424).",
      'Returns over the modelled variable inputs only: revenue from the modelled outputs less the cost of the modelled inputs; land, machinery, buildings and other costs outside the model are not deducted, so this is not a farm profit.',
    ]);
  });
});

describe('readBacktest', () => {
  it('should give the average miss, the closest and furthest item, and any lean', () => {
    const lines = readBacktest(
      [maize, nitrogen],
      [
        { item: 'maize', mape: 1.5, bias: 0.2 },
        { item: 'nitrogen', mape: 4.5, bias: -3.1 },
      ],
      5,
    );
    expect(lines).toEqual([
      "Fitted each time on the seasons before, the model projected the co-op's totals of the last 5 seasons 3.0 % off on average across the 2 items.",
      'Closest: maize supply, 1.5 % off. Furthest: nitrogen use, 4.5 % off.',
      'On average it under-projects nitrogen use by 3.1 %.',
    ]);
  });

  it('should group the items it over- and under-projects into one sentence', () => {
    const diesel: ReadingItem = { code: 'diesel', name: 'Diesel', role: 'input' };
    const lines = readBacktest(
      [maize, nitrogen, diesel],
      [
        // Leans: |bias| ≥ 0.5 % and at least half the mean absolute error.
        { item: 'maize', mape: 1.2, bias: 1.2 },
        { item: 'nitrogen', mape: 1.7, bias: 1.1 },
        { item: 'diesel', mape: 2.0, bias: -1.7 },
      ],
      3,
    );
    expect(lines.at(-1)).toBe('On average it over-projects maize supply by 1.2 % and nitrogen use by 1.1 %, and under-projects diesel use by 1.7 %.');
  });

  it('should say nothing without back-tested seasons', () => {
    expect(readBacktest([maize], [{ item: 'maize', mape: NaN, bias: NaN }], 0)).toEqual([]);
  });
});

describe('readingCaution', () => {
  it('should say the figures are estimates from past behaviour, name the sample and carry the usual cautions', () => {
    const text = readingCaution({ firstSeason: '2006/07', lastSeason: '2025/26', observations: 400 });
    expect(text).toContain("estimates from past behaviour of the co-op's farms in 2006/07 to 2025/26 (400 farm-seasons)");
    expect(text).toContain('not a forecast of what members will do');
    expect(text).toContain('Not financial advice');
    expect(text).toContain('a certified adviser has the last word');
  });
});

describe('PlainReadingPanel', () => {
  it('should list one sentence per price, the shadow values, the back-test and the caution', async () => {
    TestBed.configureTestingModule({ providers: [provideZonelessChangeDetection()] });
    const fixture = TestBed.createComponent(PlainReadingPanel);
    fixture.componentRef.setInput('items', [maize, nitrogen]);
    fixture.componentRef.setInput('elasticities', [
      [0.1, -0.1],
      [0.3, -0.3],
    ]);
    fixture.componentRef.setInput('shadowValues', [{ factor: 'land_ha', value: 500, standardError: 10 }]);
    fixture.componentRef.setInput('currency', 'EUR');
    fixture.componentRef.setInput('backtest', [{ item: 'maize', mape: 2, bias: 0.1 }]);
    fixture.componentRef.setInput('backtestSeasons', 3);
    fixture.componentRef.setInput('sample', { firstSeason: '2010/11', lastSeason: '2019/20', observations: 120 });
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;

    const items = [...el.querySelectorAll('ul[aria-label="What the model says"] li')].map((li) => li.textContent?.trim());
    expect(items).toEqual([
      'In this model a 10 % rise in the price of maize raises maize supply by about 1 % and nitrogen use by about 3 %.',
      'In this model a 10 % rise in the price of nitrogen lowers nitrogen use by about 3 % and maize supply by about 1 %.',
      "One more hectare of land adds about €500 to an average farm's season return over the modelled variable inputs at average prices (give or take €20).",
      'Returns over the modelled variable inputs only: revenue from the modelled outputs less the cost of the modelled inputs; land, machinery, buildings and other costs outside the model are not deducted, so this is not a farm profit.',
    ]);
    expect(el.querySelector('.backtest')?.textContent).toContain('last 3 seasons 2.0 % off on average');
    expect(el.querySelector('np-caution-note')?.textContent).toContain('2010/11 to 2019/20 (120 farm-seasons)');
  });
});
