import type { Item } from '../../../shared/api-types';
import { coefficientMeaning, readEquations } from './coefficient-reading';
import { ItemLabels } from './model-format';
import type { EquationFit } from '../../../shared/estimation-types';

const labels = new ItemLabels([
  { code: 'wheat', name: 'Wheat', unit: 't' },
  { code: 'nitrogen', name: 'Nitrogen (N)', unit: 'kg N' },
] as unknown as Item[]);

const equations: EquationFit[] = [
  {
    item: 'nitrogen',
    role: 'input',
    r2: 0.8,
    rmse: 4,
    ssr: 1,
    coefficients: [
      { name: 'nitrogen_(Intercept)', parameter: 'a[nitrogen]', estimate: -150, standardError: 5 },
      { name: 'nitrogen_p_wheat', parameter: 'b[wheat,nitrogen]', estimate: -2, standardError: 0.5 },
      { name: 'nitrogen_trend', parameter: 'e[nitrogen,trend]', estimate: -0.5, standardError: 1 },
    ],
  } as EquationFit,
];

describe('coefficient sheets of a per-hectare run', () => {
  it('should say per hectare in the unit and the words, and read inputs as use', () => {
    const [eq] = readEquations(equations, 'normalized-quadratic', labels, ['trend'], true);
    expect(eq!.title).toBe('Nitrogen (N) use');
    expect(eq!.unit).toBe('kg N per ha');
    expect(eq!.lines.map((l) => l.meaning)).toEqual(['Base level per hectare, before prices and trend', 'Response to the wheat price', 'Drift per hectare from one season to the next']);
    expect(eq!.lines[0]!.value).toBe(150);
    expect(eq!.lines[1]!.verdict).toBe('above');
    expect(eq!.lines[2]!.verdict).toBe('unclear');
  });

  it('should keep the farm-totals words for a pooled run', () => {
    const [eq] = readEquations(equations, 'normalized-quadratic', labels, ['land_ha', 'trend']);
    expect(eq!.unit).toBe('kg N');
    expect(eq!.lines[0]!.meaning).toBe('Base level, before prices, land and trend');
    expect(coefficientMeaning('land_ha', 'nitrogen', 'normalized-quadratic', labels, ['land_ha'])).toBe('Change per extra hectare of land');
  });
});
