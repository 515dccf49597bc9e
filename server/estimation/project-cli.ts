/**
 * The project command (docs/project-command.md):
 *   npm run --silent project -- --input HISTORY.csv --at NEXT.csv [--numeraire ITEM] [--trend]
 *                               [--form nq|gl] [--level 0.9] [--draws 10000] [--seed 1] [--spec per-hectare|pooled]
 * Fits the default forecasting model (per hectare with farm and season effects when HISTORY.csv
 * records farms and land; docs/forecasting.md) and projects every farm of NEXT.csv for one season.
 * Prints one JSON document on stdout and exits 0. Bad input: one line on stderr naming the file, row
 * and column (or the cause), exit code 2, never a stack trace.
 */
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import { numberCell, parseNetputCsv, SEASON, type NetputDataset } from './dataset.js';
import { EstimationInputError, isEstimationInputError } from './errors.js';
import { farmRows, readFarmFile } from './farm-file.js';
import { projectForecast, type ForecastFarm } from './forecast.js';
import { fitForecastModel, landFactorIndex } from './panel.js';

class UsageError extends Error {}

const USAGE =
  'usage: project --input HISTORY.csv --at NEXT.csv [--numeraire ITEM] [--trend] [--form nq|gl] [--level 0.9] [--draws 10000] [--seed 1] [--spec per-hectare|pooled]';

export interface NextSeason {
  farms: ForecastFarm[];
  /** Season label from the file, or null. */
  season: string | null;
}

/**
 * Parse NEXT.csv against the history: `farm`, `price:<item>` for every item, `fixed:<name>` for
 * every fixed factor, optional `season`.
 * @throws EstimationInputError naming the row and column
 */
export function parseNextCsv(text: string, history: NetputDataset): NextSeason {
  const file = readFarmFile(text, (h) => {
    const m = /^(price|fixed):(.+)$/.exec(h);
    const ok =
      h === 'farm' ||
      h === 'season' ||
      (m && m[1] === 'price' && history.items.some((it) => it.name === m[2])) ||
      (m && m[1] === 'fixed' && history.fixedFactors.includes(m[2]!));
    if (!ok)
      throw new EstimationInputError(
        `row 1, column ${h}: unknown column (expected farm, season, price:<item> for an item of the history, fixed:<name> for a fixed factor of the history)`,
        { row: 1, column: h },
      );
  });
  const { col } = file;
  const required = ['farm', ...history.items.map((it) => `price:${it.name}`), ...history.fixedFactors.map((f) => `fixed:${f}`)];
  for (const r of required) if (!col.has(r)) throw new EstimationInputError(`row 1: the required column "${r}" is missing`, { row: 1, column: r });
  const landIdx = landFactorIndex(history);
  const landName = landIdx >= 0 ? history.fixedFactors[landIdx]! : null;
  const farms: ForecastFarm[] = [];
  let season: string | null = null;
  for (const { row, cells, farm } of farmRows(file)) {
    const prices: Record<string, number> = {};
    for (const it of history.items) {
      const c = `price:${it.name}`;
      const p = numberCell(cells[col.get(c)!], row, c);
      if (!(p > 0)) throw new EstimationInputError(`row ${row}, column ${c}: a price must be positive, got ${p}`, { row, column: c });
      prices[it.name] = p;
    }
    const fixed: Record<string, number> = {};
    for (const f of history.fixedFactors) {
      const c = `fixed:${f}`;
      const v = numberCell(cells[col.get(c)!], row, c);
      if (f === landName && !(v > 0)) throw new EstimationInputError(`row ${row}, column ${c}: land must be more than 0 ha, got ${v}`, { row, column: c });
      fixed[f] = v;
    }
    if (col.has('season')) {
      const s = cells[col.get('season')!]!.trim();
      if (!SEASON.test(s)) throw new EstimationInputError(`row ${row}, column season: "${s}" is not a year (2014) or a season (2014/15)`, { row, column: 'season' });
      if (season !== null && s !== season)
        throw new EstimationInputError(`row ${row}, column season: "${s}" differs from "${season}" above (one season is projected at a time)`, { row, column: 'season' });
      season = s;
    }
    farms.push({ farm, fixed, prices });
  }
  if (!farms.length) throw new EstimationInputError('the file has a header but no farm rows');
  return { farms, season };
}

/** The label of the season after `label` ("2023" → "2024", "2023/24" → "2024/25"). */
export function nextSeasonLabel(label: string): string {
  const m = SEASON.exec(label.trim());
  if (!m) return label;
  const y = Number(m[1]) + 1;
  if (m[2] === undefined) return String(y);
  return m[2].length === 2 ? `${y}/${String((y + 1) % 100).padStart(2, '0')}` : `${y}/${y + 1}`;
}

function numberOption(name: string, text: string | undefined, check: (v: number) => boolean, what: string): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(text) || !check(v)) throw new UsageError(`--${name}: "${text}" is not ${what}`);
  return v;
}

export function runProjectCli(argv: string[]): { code: number; stdout: string; stderr: string } {
  let label = 'project';
  try {
    const { values } = parseArgs({
      args: argv,
      options: {
        input: { type: 'string' },
        at: { type: 'string' },
        numeraire: { type: 'string' },
        trend: { type: 'boolean' },
        form: { type: 'string' },
        level: { type: 'string' },
        draws: { type: 'string' },
        seed: { type: 'string' },
        spec: { type: 'string' },
        help: { type: 'boolean' },
      },
      strict: true,
      allowPositionals: false,
    });
    if (values.help) return { code: 0, stdout: USAGE + '\n', stderr: '' };
    if (!values.input) throw new UsageError(`--input HISTORY.csv is required (${USAGE})`);
    if (!values.at) throw new UsageError(`--at NEXT.csv is required (${USAGE})`);
    if (values.form !== undefined && values.form !== 'nq' && values.form !== 'gl') throw new UsageError(`--form must be nq or gl, not "${values.form}"`);
    if (values.spec !== undefined && values.spec !== 'per-hectare' && values.spec !== 'pooled') throw new UsageError(`--spec must be per-hectare or pooled, not "${values.spec}"`);
    const level = numberOption('level', values.level, (v) => v > 0 && v < 1, 'a probability between 0 and 1');
    const draws = numberOption('draws', values.draws, (v) => Number.isInteger(v) && v >= 100 && v <= 1_000_000, 'a whole number from 100 to 1,000,000');
    const seed = numberOption('seed', values.seed, (v) => Number.isInteger(v) && v >= 0 && v < 2 ** 32, 'a whole number from 0 to 4294967295');
    const read = (path: string): string => {
      label = basename(path);
      try {
        return readFileSync(path, 'utf8');
      } catch (e) {
        const code = (e as NodeJS.ErrnoException).code;
        throw new UsageError(`${label}: cannot read the file (${code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : (code ?? 'read error')})`);
      }
    };
    const history = parseNetputCsv(read(values.input));
    const next = parseNextCsv(read(values.at), history);
    label = basename(values.input);
    const model = fitForecastModel(history, {
      ...(values.spec ? { spec: values.spec as 'per-hectare' | 'pooled' } : {}),
      ...(values.form ? { form: values.form as 'nq' | 'gl' } : {}),
      ...(values.numeraire !== undefined ? { numeraire: values.numeraire } : {}),
      trend: values.trend ?? false,
    });
    const lastLabel = model.seasons.labels.at(-1)!;
    const seasonLabel = next.season ?? nextSeasonLabel(lastLabel);
    const seasonYear = Number(SEASON.exec(seasonLabel)![1]);
    label = basename(values.at);
    const proj = projectForecast(model, {
      farms: next.farms,
      season: seasonYear,
      ...(level !== undefined ? { level } : {}),
      ...(draws !== undefined ? { draws } : {}),
      ...(seed !== undefined ? { seed } : {}),
    });
    const band = (q: { point: number; lower: number; upper: number; median: number }) => ({ point: q.point, lower: q.lower, upper: q.upper, median: q.median });
    const doc = {
      model: {
        form: model.fit.layout.form,
        numeraire: model.fit.layout.numeraire,
        items: model.fit.layout.items.map((it) => ({ name: it.name, role: it.role })),
        observations: model.fit.observations,
        curvatureImposed: model.fit.curvature.imposed,
        specification: model.specification,
        spec: model.spec,
        seasonShockDf: proj.seasonShockDf,
        warnings: model.fit.warnings,
      },
      season: seasonLabel,
      level: proj.level,
      draws: proj.draws,
      seed: proj.seed,
      farms: proj.farms.map((f) => ({
        farm: f.farm,
        known: f.known,
        quantities: Object.fromEntries(Object.entries(f.quantities).map(([k, q]) => [k, band(q)])),
      })),
      coop: Object.fromEntries(Object.entries(proj.coop).map(([k, q]) => [k, band(q)])),
      caution: proj.caution,
    };
    return { code: 0, stdout: JSON.stringify(doc, null, 2) + '\n', stderr: '' };
  } catch (e) {
    if (isEstimationInputError(e)) return { code: 2, stdout: '', stderr: `${label}: ${(e as Error).message}\n` };
    if (e instanceof UsageError) return { code: 2, stdout: '', stderr: `${e.message}\n` };
    if (e instanceof Error && (e as NodeJS.ErrnoException).code?.startsWith('ERR_PARSE_ARGS')) return { code: 2, stdout: '', stderr: `project: ${e.message.split('\n')[0]} (${USAGE})\n` };
    const msg = e instanceof Error ? e.message : String(e);
    return { code: 1, stdout: '', stderr: `project: internal error: ${msg.split('\n')[0]}\n` };
  }
}

const isMain = process.argv[1] !== undefined && /project-cli\.(ts|js|mjs|cjs)$/.test(process.argv[1]);
if (isMain) {
  const r = runProjectCli(process.argv.slice(2));
  if (r.stdout) process.stdout.write(r.stdout);
  if (r.stderr) process.stderr.write(r.stderr);
  process.exitCode = r.code;
}
