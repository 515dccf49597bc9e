import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { runFitCli } from './cli.js';
import { parseNetputCsv } from './dataset.js';
import { EstimationInputError } from './errors.js';
import { fitProfitFunction } from './fit.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const panel = readFileSync(join(root, 'tests', 'fixtures', 'estimation', 'nq-panel.csv'), 'utf8');
const lines = panel.trim().split('\n');
const header = lines[0]!.split(',');
const dir = mkdtempSync(join(tmpdir(), 'netput-fit-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function writeCsv(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

/** The panel with one cell replaced (row = spreadsheet row, header is row 1). */
function withCell(row: number, column: string, value: string): string {
  const out = lines.map((l) => l.split(','));
  out[row - 1]![header.indexOf(column)] = value;
  return out.map((r) => r.join(',')).join('\n') + '\n';
}

function expectOneLineError(args: string[], pattern: RegExp): void {
  const r = runFitCli(args);
  expect(r.code).toBe(2);
  expect(r.stdout).toBe('');
  expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
  expect(r.stderr).toMatch(pattern);
}

describe('fit command: bad input gets one clear line and exit code 2', () => {
  it('a non-numeric cell names the file, row and column', () => {
    const f = writeCsv('bad-cell.csv', withCell(7, 'price:nitrogen', 'abc'));
    expectOneLineError(['--input', f, '--trend'], /^bad-cell\.csv: row 7, column price:nitrogen: "abc" is not a number$/m);
  });

  it('a non-positive price names the row and column', () => {
    const f = writeCsv('zero-price.csv', withCell(12, 'price:wheat', '0'));
    expectOneLineError(['--input', f], /^zero-price\.csv: row 12, column price:wheat: a price must be positive, got 0$/m);
  });

  it('a priced item without a quantity column is named', () => {
    const text = panel.replace('price:other,', 'price:other,price:urea,').replace(/^(\d{4},F\d+,(?:[^,]*,){5})/gm, '$1' + '900,');
    const f = writeCsv('no-qty.csv', text);
    expectOneLineError(['--input', f], /column price:urea: item "urea" has a price but no quantity column \(output:urea or input:urea\)/);
  });

  it('fewer observations than parameters is refused with the counts', () => {
    const f = writeCsv('short.csv', lines.slice(0, 11).join('\n') + '\n');
    expectOneLineError(['--input', f, '--trend'], /^short\.csv: 10 observations are too few: the other equation has 14 coefficients, so at least 15 observations are needed$/m);
  });

  it('perfectly collinear prices are refused, naming the prices', () => {
    // canola's price always 2.08 × wheat's: collinear with wheat's after normalisation.
    const out = lines.map((l, i) => {
      const c = l.split(',');
      if (i > 0) c[header.indexOf('price:canola')] = String(Number(c[header.indexOf('price:wheat')]) * 2.08);
      return c.join(',');
    });
    const f = writeCsv('collinear.csv', out.join('\n') + '\n');
    expectOneLineError(['--input', f, '--trend'], /^collinear\.csv: perfectly collinear prices: price:canola\/price:other is an exact linear function of price:wheat\/price:other \(in the wheat equation\)$/m);
  });

  it('an empty file says so', () => {
    const f = writeCsv('empty.csv', '');
    expectOneLineError(['--input', f], /^empty\.csv: the file is empty$/m);
  });

  it('other mistakes: unknown column, negative quantity, missing season, bad option values', () => {
    expectOneLineError(['--input', writeCsv('typo.csv', panel.replace('price:wheat', 'prce:wheat'))], /row 1, column prce:wheat: unknown column/);
    expectOneLineError(['--input', writeCsv('neg.csv', withCell(3, 'input:diesel', '-4'))], /row 3, column input:diesel: a quantity must not be negative/);
    expectOneLineError(['--input', writeCsv('noseason.csv', panel.replace(/^season,/gm, 'year,'))], /unknown column|"season" is missing/);
    expectOneLineError(['--input', join(dir, 'missing.csv')], /missing\.csv: cannot read the file \(no such file\)/);
    const ok = writeCsv('ok.csv', panel);
    expectOneLineError(['--input', ok, '--form', 'translog'], /--form must be nq or gl/);
    expectOneLineError(['--input', ok, '--prices', 'wheat=abc'], /--prices: "abc" \(for wheat\) is not a number/);
    expectOneLineError(['--input', ok, '--prices', 'barley=3'], /ok\.csv: prices: "barley" is not an item of the model/);
    expectOneLineError(['--input', ok, '--prices', 'wheat=-3'], /the price of wheat must be a positive number/);
    expectOneLineError(['--input', ok, '--fixed', 'trend=3'], /"trend" is not a fixed factor of the model/);
    expectOneLineError(['--input', ok, '--numeraire', 'urea'], /numeraire "urea" is not an item of the file/);
    expectOneLineError(['--input', ok, '--bogus'], /^fit: Unknown option '--bogus'/m);
  });

  it('as a process: exit code 2, one line on stderr, no stack trace', () => {
    const f = writeCsv('proc.csv', withCell(5, 'output:canola', '12,5'.replace(',', ';')));
    // as npm run fit starts it: the bundled JavaScript of scripts/cli.mjs
    const r = spawnSync(process.execPath, [join(root, 'scripts', 'cli.mjs'), 'fit', '--input', f], { cwd: root, encoding: 'utf8' });
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe('proc.csv: row 5, column output:canola: "12;5" is not a number\n');
    expect(r.stderr).not.toMatch(/\bat .*\.(ts|mjs):\d+/);
    const unknown = spawnSync(process.execPath, [join(root, 'scripts', 'cli.mjs'), 'fitt'], { cwd: root, encoding: 'utf8' });
    expect(unknown.status).toBe(2);
    expect(unknown.stderr).toBe('cli: unknown command "fitt" (commands: fit, project)\n');
  }, 30000);
});

describe('parseNetputCsv and fit options throw EstimationInputError with row and column', () => {
  it('carries row and column for the API to map to 422', () => {
    try {
      parseNetputCsv(withCell(9, 'fixed:land', ''));
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(EstimationInputError);
      expect((e as EstimationInputError).toJSON()).toEqual({ message: 'row 9, column fixed:land: empty cell', row: 9, column: 'fixed:land' });
    }
  });

  it('a trend column clashing with --trend is refused', () => {
    const text = panel.replace('fixed:land', 'fixed:trend');
    expect(() => fitProfitFunction(parseNetputCsv(text), { trend: true })).toThrow(/fixed:trend clashes with the fitted trend/);
  });

  it('accepts season labels like 2014/15, a semicolon delimiter and blank lines', () => {
    const text = panel.replace(/^(\d{4}),/gm, (_, y: string) => `${y}/${String((Number(y) + 1) % 100).padStart(2, '0')},`).replaceAll(',', ';') + '\n\n';
    const ds = parseNetputCsv(text);
    expect(ds.rows).toHaveLength(128);
    expect(ds.seasonYears[0]).toBe(2009);
    expect(ds.seasons[0]).toBe('2009/10');
  });

  it('the fit command runs with the default options (no trend, default numeraire)', () => {
    const r = runFitCli(['--input', writeCsv('plain.csv', panel)]);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout) as { numeraire: string; fixedFactors: string[]; elasticities: number[][] };
    expect(doc.numeraire).toBe('other');
    expect(doc.fixedFactors).toEqual(['land']);
    for (const row of doc.elasticities) expect(Math.abs(row.reduce((a, b) => a + b, 0))).toBeLessThan(1e-12);
  });
});
