import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { COLOUR, FONT, RADIUS, SERIES, SPACE, TYPE } from './design-tokens.js';

const scss = readFileSync(new URL('../src/styles/_tokens.scss', import.meta.url), 'utf8');
const kebab = (name: string) => name.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`);
function sassValue(name: string): string {
  const match = new RegExp(`^\\$np-${name}:\\s*(.+);$`, 'm').exec(scss);
  if (!match) throw new Error(`src/styles/_tokens.scss has no $np-${name}`);
  return match[1]!.trim();
}

/** Relative luminance and contrast ratio as WCAG 2.2 defines them (§ "relative luminance", "contrast ratio"; docs/sources.md §10). */
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
  return 0.2126 * r! + 0.7152 * g! + 0.0722 * b!;
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05);
}

describe('design tokens are declared once: the Sass file repeats shared/design-tokens.ts', () => {
  it('every colour', () => {
    for (const [name, value] of Object.entries(COLOUR)) expect(sassValue(kebab(name)), name).toBe(value);
  });
  it('the chart series, in order', () => {
    expect(sassValue('series')).toBe(`(${SERIES.join(', ')})`);
  });
  it('type, spacing and corners', () => {
    for (const [name, value] of Object.entries(FONT)) expect(sassValue(`font-${name}`), name).toBe(JSON.stringify(value).replace(/\\"/g, '"'));
    for (const [name, value] of Object.entries(TYPE)) expect(sassValue(`type-${name}`), name).toBe(String(value));
    for (const [name, value] of Object.entries(SPACE)) expect(sassValue(`space-${name}`), name).toBe(String(value));
    for (const [name, value] of Object.entries(RADIUS)) expect(sassValue(`radius-${name}`), name).toBe(String(value));
  });
});

describe('contrast (WCAG 2.2: 4.5:1 for text, 3:1 for graphics)', () => {
  // Reference point of the formula: black on white is 21:1 (WCAG 2.2, definition of contrast ratio).
  it('the formula gives 21:1 for black on white', () => {
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 6);
  });
  it('text colours on every background', () => {
    for (const text of [COLOUR.loam, COLOUR.loamSoft, COLOUR.field, COLOUR.fieldDeep, COLOUR.grainText, COLOUR.clay, COLOUR.river]) {
      for (const ground of [COLOUR.paper, COLOUR.paperDeep, COLOUR.card, COLOUR.fieldWash, COLOUR.grainWash]) {
        expect(contrast(text, ground), `${text} on ${ground}`).toBeGreaterThanOrEqual(4.5);
      }
    }
  });
  it('white text on the header band and on the field green', () => {
    expect(contrast('#ffffff', COLOUR.fieldDeep)).toBeGreaterThanOrEqual(4.5);
    expect(contrast('#ffffff', COLOUR.field)).toBeGreaterThanOrEqual(4.5);
  });
  it('every chart series against the sheet it is drawn on', () => {
    for (const colour of SERIES) expect(contrast(colour, COLOUR.card), colour).toBeGreaterThanOrEqual(3);
  });
});
