import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { nextSeasonLabel, runProjectCli } from './project-cli.js';

// Contract test of the project command (docs/project-command.md): fixtures from
// tests/fixtures/estimation/make-forecast-panel.ts (invented).
const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const fixtures = join(root, 'tests', 'fixtures', 'estimation');
const history = join(fixtures, 'forecast-history.csv');
const next = join(fixtures, 'forecast-next.csv');

interface Band {
  point: number;
  lower: number;
  upper: number;
}
interface Doc {
  model: { form: string; numeraire: string; items: { name: string; role: string }[]; observations: number; curvatureImposed: boolean; specification: string };
  season: string;
  level: number;
  draws: number;
  farms: { farm: string; quantities: Record<string, Band> }[];
  coop: Record<string, Band>;
}

function spawnProject(args: string[]) {
  return spawnSync(process.execPath, ['--import', 'tsx', join(root, 'server', 'estimation', 'project-cli.ts'), ...args], { cwd: root, encoding: 'utf8' });
}

describe('npm run project (contract)', () => {
  const run = spawnProject(['--input', history, '--at', next, '--draws', '1000', '--seed', '7']);

  it('prints one JSON document with the contract keys and exits 0', () => {
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
    const doc = JSON.parse(run.stdout) as Doc;
    expect(Object.keys(doc)).toEqual(expect.arrayContaining(['model', 'season', 'level', 'draws', 'farms', 'coop']));
    expect(Object.keys(doc.model)).toEqual(expect.arrayContaining(['form', 'numeraire', 'items', 'observations', 'curvatureImposed', 'specification']));
    expect(doc.model.form).toBe('normalized-quadratic');
    expect(doc.model.observations).toBe(240);
    expect(doc.model.specification).toMatch(/per hectare/);
    expect(doc.season).toBe('2023');
    expect(doc.level).toBe(0.9);
    expect(doc.draws).toBe(1000);
    const rows = readFileSync(next, 'utf8').trim().split('\n').slice(1);
    expect(doc.farms.map((f) => f.farm)).toEqual(rows.map((r) => r.split(',')[0]));
    const items = doc.model.items.map((i) => i.name);
    for (const f of doc.farms) {
      expect(Object.keys(f.quantities).sort()).toEqual([...items].sort());
      for (const q of Object.values(f.quantities)) expect(0 <= q.lower && q.lower <= q.point && q.point <= q.upper).toBe(true);
    }
    for (const item of items) {
      const c = doc.coop[item]!;
      expect(0 <= c.lower && c.lower <= c.point && c.point <= c.upper).toBe(true);
      // the co-op point is the sum of the farms' points
      const sum = doc.farms.reduce((a, f) => a + f.quantities[item]!.point, 0);
      expect(Math.abs(c.point - sum)).toBeLessThan(1e-9 * sum);
    }
  });

  it('gives the same document for the same seed', () => {
    const again = runProjectCli(['--input', history, '--at', next, '--draws', '1000', '--seed', '7']);
    expect(again.code).toBe(0);
    expect(JSON.parse(again.stdout)).toEqual(JSON.parse(run.stdout));
  });

  it('bad input: exit 2, one line naming the file, row and column, no stack', () => {
    const dir = mkdtempSync(join(tmpdir(), 'netput-project-'));
    const lines = readFileSync(next, 'utf8').split('\n');
    const cells = lines[3]!.split(',');
    cells[2] = 'abc';
    lines[3] = cells.join(',');
    const bad = join(dir, 'next.csv');
    writeFileSync(bad, lines.join('\n'));
    const r = spawnProject(['--input', history, '--at', bad]);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^next\.csv: row 4, column price:canola: "abc" is not a number/);
  });

  it('names a missing column of NEXT.csv and an unknown option', () => {
    const dir = mkdtempSync(join(tmpdir(), 'netput-project-'));
    const noLand = join(dir, 'n.csv');
    writeFileSync(noLand, readFileSync(next, 'utf8').split('\n').map((l) => l.split(',').slice(0, -1).join(',')).join('\n'));
    const r = runProjectCli(['--input', history, '--at', noLand]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('n.csv: row 1: the required column "fixed:land" is missing\n');
    const u = runProjectCli(['--input', history, '--at', next, '--bogus']);
    expect(u.code).toBe(2);
    expect(u.stderr.split('\n').filter(Boolean)).toHaveLength(1);
  });

  it('labels the next season after the last one', () => {
    expect(nextSeasonLabel('2023')).toBe('2024');
    expect(nextSeasonLabel('2023/24')).toBe('2024/25');
    expect(nextSeasonLabel('2099/2100')).toBe('2100/2101');
  });
});

describe('npm run fit --spec per-hectare', () => {
  it('keeps the contract keys and reports levels at the chosen land (per-hectare values × land)', async () => {
    const { runFitCli } = await import('./cli.js');
    const r = runFitCli(['--input', history, '--spec', 'per-hectare', '--fixed', 'land=200']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout) as {
      netputs: Record<string, number>;
      profit: number;
      evaluatedAt: { fixed: Record<string, number> };
      elasticities: number[][];
      specification: string;
      perHectare: { netputs: Record<string, number>; profit: number };
    };
    expect(doc.evaluatedAt.fixed.land).toBe(200);
    for (const [item, v] of Object.entries(doc.perHectare.netputs)) expect(doc.netputs[item]).toBeCloseTo(200 * v, 9);
    expect(doc.profit).toBeCloseTo(200 * doc.perHectare.profit, 6);
    expect(doc.specification).toMatch(/per hectare/);
    // homogeneity of degree zero: every elasticity row sums to zero (docs/profit-functions.md)
    for (const row of doc.elasticities) expect(Math.abs(row.reduce((a, v) => a + v, 0))).toBeLessThan(1e-9);
    const bad = runFitCli(['--input', history, '--spec', 'hectare']);
    expect(bad.code).toBe(2);
  });
});
