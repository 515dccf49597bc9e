import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import {
  contrastRatio,
  DARK_TEXT,
  LIGHT_TEXT,
  MISSING_COLOUR,
  mix,
  relativeLuminance,
  SCALE_ABOVE_ZERO,
  SCALE_BELOW_ZERO,
  SCALE_NEUTRAL,
  scaleColour,
  scaleLimit,
} from './colour-scale';
import { ElasticityTable } from './elasticity-table';

/** `rgb(r, g, b)` as the DOM reports a style, from #rrggbb. */
function asRgb(hex: string): string {
  const n = parseInt(hex.slice(1), 16);
  return `rgb(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255})`;
}

describe('relativeLuminance and contrastRatio', () => {
  // WCAG 2.1, "relative luminance" and "contrast ratio" definitions (W3C Recommendation; docs/sources.md §9–§10): white has
  // luminance 1, black 0, and their contrast ratio is (1 + 0.05) / (0 + 0.05) = 21, the maximum.
  it('should give the WCAG end points for white and black', () => {
    expect(relativeLuminance('#ffffff')).toBeCloseTo(1, 12);
    expect(relativeLuminance('#000000')).toBe(0);
    expect(contrastRatio('#000000', '#ffffff')).toBeCloseTo(21, 12);
    expect(contrastRatio('#ffffff', '#000000')).toBeCloseTo(21, 12);
    expect(contrastRatio('#7f3515', '#7f3515')).toBe(1);
  });

  // Mid grey #808080 on white is 3.95:1 in WebAIM's contrast checker (value from memory); by the
  // WCAG formula: L = ((128/255 + 0.055) / 1.055)^2.4 = 0.215861, ratio 1.05 / 0.265861 = 3.9494.
  it('should reproduce the contrast of mid grey on white', () => {
    expect(relativeLuminance('#808080')).toBeCloseTo(0.215861, 6);
    expect(contrastRatio('#808080', '#ffffff')).toBeCloseTo(3.9494, 4);
  });
});

describe('scaleColour', () => {
  it('should give the neutral at zero and the end colours at ± the limit', () => {
    expect(scaleColour(0, 1).background).toBe(SCALE_NEUTRAL);
    expect(scaleColour(1, 1).background).toBe(SCALE_ABOVE_ZERO.at(-1));
    expect(scaleColour(-1, 1).background).toBe(SCALE_BELOW_ZERO.at(-1));
    expect(scaleColour(0.5, 2).background).toBe(SCALE_ABOVE_ZERO[1]);
    expect(scaleColour(-1.5, 2).background).toBe(SCALE_BELOW_ZERO[3]);
  });

  it('should take the end colour past the limit', () => {
    expect(scaleColour(7, 1).background).toBe(SCALE_ABOVE_ZERO.at(-1));
    expect(scaleColour(-7, 1).background).toBe(SCALE_BELOW_ZERO.at(-1));
  });

  it('should mix linearly between neighbouring stops', () => {
    // Half way between the first two stops of the upper side.
    expect(scaleColour(0.125, 1).background).toBe(mix(SCALE_ABOVE_ZERO[0], SCALE_ABOVE_ZERO[1], 0.5));
    // #f7f4ec and #d2e5e6 halved channel by channel: (247+210)/2 = 228.5, (244+229)/2 = 236.5, (236+230)/2 = 233 → e5 ed e9 (halves round up).
    expect(mix('#f7f4ec', '#d2e5e6', 0.5)).toBe('#e5ede9');
  });

  it('should tell falls from rises by hue: clay below zero, blue above', () => {
    for (const v of [0.2, 0.5, 0.9]) {
      const [r1, , b1] = hexChannels(scaleColour(-v, 1).background);
      const [r2, , b2] = hexChannels(scaleColour(v, 1).background);
      expect(r1).toBeGreaterThan(b1);
      expect(b2).toBeGreaterThan(r2);
    }
  });

  it('should darken steadily as the value grows, on both sides', () => {
    for (const sign of [-1, 1]) {
      let last = Infinity;
      for (let k = 0; k <= 20; k++) {
        const l = relativeLuminance(scaleColour((sign * k) / 20, 1).background);
        expect(l).toBeLessThan(last + 1e-12);
        last = l;
      }
    }
  });

  // WCAG 2.1 success criterion 1.4.3: at least 4.5:1 for normal text.
  it('should pick a text colour with at least 4.5:1 contrast everywhere on the scale', () => {
    for (let k = -100; k <= 100; k++) {
      const { background, text } = scaleColour(k / 100, 1);
      expect([DARK_TEXT, LIGHT_TEXT]).toContain(text);
      expect(contrastRatio(background, text)).toBeGreaterThanOrEqual(4.5);
    }
  });

  it('should mark a missing value with its own colour', () => {
    expect(scaleColour(NaN, 1)).toEqual({ background: MISSING_COLOUR, text: DARK_TEXT });
  });
});

describe('scaleLimit', () => {
  it('should round the largest magnitude up to 1, 2.5 or 5 times a power of ten', () => {
    expect(scaleLimit([0.34, -0.8, 0.1])).toBe(1);
    expect(scaleLimit([0.2, -0.05])).toBe(0.25);
    expect(scaleLimit([0.04])).toBe(0.05);
    expect(scaleLimit([-3])).toBe(5);
    expect(scaleLimit([1])).toBe(1);
    expect(scaleLimit([6])).toBe(10);
  });

  it('should fall back to 1 without finite values', () => {
    expect(scaleLimit([])).toBe(1);
    expect(scaleLimit([0, NaN])).toBe(1);
  });
});

describe('ElasticityTable', () => {
  const items = [
    { code: 'wheat', name: 'Wheat', role: 'output' as const },
    { code: 'nitrogen', name: 'Nitrogen (N)', role: 'input' as const },
  ];
  // Rows sum to zero, as homogeneity requires of a price-elasticity matrix.
  const e = [
    [0.3, -0.3],
    [0.8, -0.8],
  ];
  const se = [
    [0.05, 0.05],
    [0.5, 0.1],
  ];

  async function render() {
    TestBed.configureTestingModule({ providers: [provideZonelessChangeDetection()] });
    const fixture = TestBed.createComponent(ElasticityTable);
    fixture.componentRef.setInput('items', items);
    fixture.componentRef.setInput('elasticities', e);
    fixture.componentRef.setInput('standardErrors', se);
    fixture.componentRef.setInput('caption', 'Test elasticities');
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  it('should show every cell with its value, standard error and scale colour', async () => {
    const el = await render();
    const cells = [...el.querySelectorAll('tbody td')] as HTMLElement[];
    expect(cells.map((c) => c.querySelector('.value')?.textContent)).toEqual(['0.30', '−0.30', '0.80', '−0.80']);
    expect(cells.map((c) => c.querySelector('.se')?.textContent)).toEqual(['(0.05)', '(0.05)', '(0.50)', '(0.10)']);
    // Largest |value| 0.8 → limit 1.
    expect(cells[2]!.style.background).toBe(asRgb(scaleColour(0.8, 1).background));
    expect(cells[3]!.style.background).toBe(asRgb(scaleColour(-0.8, 1).background));
    expect(cells[3]!.style.color).toBe(asRgb(scaleColour(-0.8, 1).text));
    expect(el.querySelector('caption')?.textContent).toBe('Test elasticities');
    expect([...el.querySelectorAll('tbody th')].map((h) => h.textContent?.trim())).toEqual(['Wheat supply', 'Nitrogen (N) use']);
  });

  it('should frame own-price cells and dash those within two standard errors of zero', async () => {
    const el = await render();
    const cells = [...el.querySelectorAll('tbody td')];
    expect(cells.map((c) => c.classList.contains('own'))).toEqual([true, false, false, true]);
    // 0.8 < 1.96 × 0.5 → uncertain; the others are clear of zero.
    expect(cells.map((c) => c.classList.contains('uncertain'))).toEqual([false, false, true, false]);
    expect(cells[2]!.textContent).toContain('not clearly different from zero');
  });
});

function hexChannels(hex: string): [number, number, number] {
  const n = parseInt(hex.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}
