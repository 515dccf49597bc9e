import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { runFitCli } from './cli.js';

// The fit command's committed-output options (docs/fit-command.md §5, docs/cost-duality.md §7) on the
// invented panel of tests/fixtures/estimation/nq-panel.csv.
const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const input = join(root, 'tests', 'fixtures', 'estimation', 'nq-panel.csv');
const dir = mkdtempSync(join(tmpdir(), 'netput-committed-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const write = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};
const run = (args: string[]) => {
  const r = runFitCli(['--input', input, ...args]);
  if (r.code !== 0) throw new Error(r.stderr);
  return JSON.parse(r.stdout);
};
const oneLine = (args: string[], pattern: RegExp) => {
  const r = runFitCli(['--input', input, ...args]);
  expect(r.code).toBe(2);
  expect(r.stdout).toBe('');
  expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
  expect(r.stderr).toMatch(pattern);
};
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('fit --committed', () => {
  const plain = run([]);

  it('adds the key `committed` and leaves every other key of the document as it was', () => {
    const doc = run(['--committed', 'wheat=1500,canola=400', '--draws', '0']);
    const { committed, ...rest } = doc;
    expect(rest).toEqual(plain);
    expect(Object.keys(doc).at(-1)).toBe('committed');
    expect(committed.farms[0].farm).toBe('evaluation point');
    expect(committed.draws).toBe(0);
  });

  it('round trip: committing the fitted supply at the evaluation point gives its prices back as marginal costs, and the fitted input demands as conditional ones', () => {
    const doc = run(['--committed', `wheat=${plain.netputs.wheat},canola=${plain.netputs.canola}`, '--draws', '0']);
    const f = doc.committed.farms[0];
    expect(rel(f.outputs.wheat.marginalCost.point, plain.evaluatedAt.prices.wheat)).toBeLessThan(1e-9);
    expect(rel(f.outputs.canola.marginalCost.point, plain.evaluatedAt.prices.canola)).toBeLessThan(1e-9);
    for (const input of ['nitrogen', 'diesel', 'other']) expect(rel(f.inputs[input].point, -plain.netputs[input])).toBeLessThan(1e-9);
    // cost = p·y* − π = input spending here (every output committed)
    expect(rel(f.cost.point, plain.netputs.wheat * plain.evaluatedAt.prices.wheat + plain.netputs.canola * plain.evaluatedAt.prices.canola - plain.profit)).toBeLessThan(1e-9);
  });

  it('gives bands from the draws, the same for the same seed', () => {
    const a = run(['--committed', 'wheat=1500', '--draws', '300', '--seed', '7']);
    const b = run(['--committed', 'wheat=1500', '--draws', '300', '--seed', '7']);
    expect(a.committed).toEqual(b.committed);
    const mc = a.committed.farms[0].outputs.wheat.marginalCost;
    expect(mc.lower).toBeLessThan(mc.point);
    expect(mc.upper).toBeGreaterThan(mc.point);
    expect(a.committed.farms[0].freeOutputs.canola.point).toBeGreaterThan(0);
  });

  it('reads several farms from --committed-file, with contract prices and the evaluation point for what a row leaves out', () => {
    const file = write('committed.csv', 'farm,committed:wheat,committed:canola,contract-price:wheat,fixed:land\nA,1400,,240,400\nB,900,250,,300\n');
    const doc = run(['--committed-file', file, '--draws', '0']);
    const [a, b] = doc.committed.farms;
    expect(a.outputs.wheat.contractPrice).toBe(240);
    expect(rel(a.outputs.wheat.margin.point, 240 - a.outputs.wheat.marginalCost.point)).toBeLessThan(1e-12);
    expect(Object.keys(a.outputs)).toEqual(['wheat']);
    expect(Object.keys(b.outputs)).toEqual(['wheat', 'canola']);
    expect(doc.committed.coop.quantities).toEqual({ wheat: 2300, canola: 250 });
  });

  it('with --spec per-hectare, a farm of the history uses its own level and the commitment is divided by its land', () => {
    const file = write('per-ha.csv', 'farm,committed:wheat,fixed:land\nF001,1400,440\nNEW,1400,440\n');
    const doc = run(['--spec', 'per-hectare', '--committed-file', file, '--draws', '0']);
    const [known, fresh] = doc.committed.farms;
    expect(doc.committed.spec).toBe('per-hectare');
    expect(known.known).toBe(true);
    expect(fresh.known).toBe(false);
    expect(known.outputs.wheat.perHectare).toBeCloseTo(1400 / 440, 12);
    expect(known.outputs.wheat.marginalCost.point).not.toBeCloseTo(fresh.outputs.wheat.marginalCost.point, 3);
  });

  it('bad options and files get one line naming what and where', () => {
    oneLine(['--committed', 'barley=3'], /--committed: "barley" is not an item of the model \(outputs: wheat, canola\)/);
    oneLine(['--committed', 'nitrogen=3'], /--committed: nitrogen is an input; only outputs can be committed/);
    oneLine(['--committed', 'wheat=0'], /--committed: the quantity of wheat must be more than 0, got 0/);
    oneLine(['--committed', 'wheat=x'], /--committed: "x" \(for wheat\) is not a number/);
    oneLine(['--draws', '500'], /--draws applies to committed outputs only/);
    oneLine(['--committed', 'wheat=1', '--draws', '50'], /--draws: "50" is not 0 or a whole number from 100/);
    oneLine(['--committed', 'wheat=1', '--committed-file', 'x.csv'], /either --committed or --committed-file, not both/);
    oneLine(['--committed-file', join(dir, 'none.csv')], /none\.csv: cannot read the file \(no such file\)/);
    const badCell = write('bad-cell.csv', 'farm,committed:wheat\nA,1400\nB,abc\n');
    oneLine(['--committed-file', badCell], /bad-cell\.csv: row 3, column committed:wheat: "abc" is not a number/);
    const badCol = write('bad-col.csv', 'farm,committed:nitrogen\nA,3\n');
    oneLine(['--committed-file', badCol], /bad-col\.csv: row 1, column committed:nitrogen: nitrogen is an input/);
    const nothing = write('nothing.csv', 'farm,committed:wheat\nA,\n');
    oneLine(['--committed-file', nothing], /nothing\.csv: row 2: farm "A" commits no output/);
    const orphan = write('orphan.csv', 'farm,committed:wheat,contract-price:canola\nA,3,200\n');
    oneLine(['--committed-file', orphan], /orphan\.csv: row 1, column contract-price:canola: a contract price without its committed:canola column/);
  });
});

