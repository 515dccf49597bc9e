/**
 * The fit command (docs/fit-command.md):
 *   npm run --silent fit -- --input FILE.csv [--numeraire ITEM] [--trend] [--form nq|gl]
 *                           [--prices item=value,...] [--fixed name=value,...] [--spec pooled|per-hectare]
 *                           [--committed item=quantity,... | --committed-file FILE.csv] [--draws N] [--seed N] [--level P]
 * `--committed` / `--committed-file` add the marginal costs and conditional input demands of committed
 * outputs under the key `committed` (contracted-cli.ts; docs/cost-duality.md); the other keys are unchanged.
 * `--spec per-hectare` fits the forecasting model of docs/forecasting.md (netputs per hectare of land,
 * farm and season effects) and reports it in the same keys, in levels at the evaluation point's land.
 * Prints the contract JSON on stdout and exits 0. Bad input: one line on stderr naming the row and
 * column or the cause, exit code 2, never a stack trace.
 */
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import { committedSection, parseCommittedCsv, pooledModelOf, type CommittedRequest } from './contracted-cli.js';
import { fitToContractJson } from './contract.js';
import { parseNetputCsv, type NetputDataset } from './dataset.js';
import { isEstimationInputError } from './errors.js';
import { fitProfitFunction } from './fit.js';
import { fitForecastModel, type ForecastModel } from './panel.js';

class UsageError extends Error {}

const USAGE =
  'usage: fit --input FILE.csv [--numeraire ITEM] [--trend] [--form nq|gl] [--prices item=value,...] [--fixed name=value,...] [--spec pooled|per-hectare] [--committed item=quantity,... | --committed-file FILE.csv] [--draws N] [--seed N] [--level P]';

function numberOption(name: string, text: string | undefined, check: (v: number) => boolean, what: string): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(text) || !check(v)) throw new UsageError(`--${name}: "${text}" is not ${what}`);
  return v;
}

function readText(path: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new UsageError(`${basename(path)}: cannot read the file (${code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : (code ?? 'read error')})`);
  }
}

function parsePairs(option: string, text: string | undefined): Record<string, number> {
  const out: Record<string, number> = {};
  if (text === undefined) return out;
  for (const part of text.split(',')) {
    const m = /^\s*([^=\s][^=]*?)\s*=\s*(\S+)\s*$/.exec(part);
    if (!m) throw new UsageError(`--${option}: "${part}" is not name=value`);
    const v = Number(m[2]);
    if (!/^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(m[2]!) || !Number.isFinite(v)) throw new UsageError(`--${option}: "${m[2]}" (for ${m[1]}) is not a number`);
    if (m[1]! in out) throw new UsageError(`--${option}: ${m[1]} is given twice`);
    out[m[1]!] = v;
  }
  return out;
}

export function runFitCli(argv: string[]): { code: number; stdout: string; stderr: string } {
  let label = 'fit';
  try {
    const { values } = parseArgs({
      args: argv,
      options: {
        input: { type: 'string' },
        numeraire: { type: 'string' },
        trend: { type: 'boolean' },
        form: { type: 'string' },
        prices: { type: 'string' },
        fixed: { type: 'string' },
        spec: { type: 'string' },
        committed: { type: 'string' },
        'committed-file': { type: 'string' },
        draws: { type: 'string' },
        seed: { type: 'string' },
        level: { type: 'string' },
        help: { type: 'boolean' },
      },
      strict: true,
      allowPositionals: false,
    });
    if (values.help) return { code: 0, stdout: USAGE + '\n', stderr: '' };
    if (!values.input) throw new UsageError(`--input FILE.csv is required (${USAGE})`);
    if (values.form !== undefined && values.form !== 'nq' && values.form !== 'gl') throw new UsageError(`--form must be nq or gl, not "${values.form}"`);
    if (values.spec !== undefined && values.spec !== 'pooled' && values.spec !== 'per-hectare') throw new UsageError(`--spec must be pooled or per-hectare, not "${values.spec}"`);
    const prices = parsePairs('prices', values.prices);
    const fixed = parsePairs('fixed', values.fixed);
    if (values.committed !== undefined && values['committed-file'] !== undefined) throw new UsageError('give either --committed or --committed-file, not both');
    const wantsCommitted = values.committed !== undefined || values['committed-file'] !== undefined;
    if (!wantsCommitted)
      for (const o of ['draws', 'seed', 'level'] as const) if (values[o] !== undefined) throw new UsageError(`--${o} applies to committed outputs only: add --committed or --committed-file`);
    const committedPairs = values.committed !== undefined ? parsePairs('committed', values.committed) : null;
    if (committedPairs && !Object.keys(committedPairs).length) throw new UsageError('--committed: give at least one item=quantity');
    const draws = numberOption('draws', values.draws, (v) => Number.isInteger(v) && (v === 0 || (v >= 100 && v <= 1_000_000)), '0 or a whole number from 100 to 1,000,000') ?? 1000;
    const seed = numberOption('seed', values.seed, (v) => Number.isInteger(v) && v >= 0 && v < 2 ** 32, 'a whole number from 0 to 4294967295') ?? 1;
    const level = numberOption('level', values.level, (v) => v > 0 && v < 1, 'a probability between 0 and 1') ?? 0.9;
    label = basename(values.input);
    const text = readText(values.input);
    const committedText = values['committed-file'] !== undefined ? readText(values['committed-file']) : null;
    const dataset = parseNetputCsv(text);
    const options = {
      ...(values.form ? { form: values.form as 'nq' | 'gl' } : {}),
      ...(values.numeraire !== undefined ? { numeraire: values.numeraire } : {}),
      trend: values.trend ?? false,
    };
    let model: ForecastModel;
    let json: ReturnType<typeof fitToContractJson> | ReturnType<typeof perHectareContractJson>;
    if (values.spec === 'per-hectare') {
      model = fitForecastModel(dataset, { ...options, spec: 'per-hectare' });
      json = perHectareContractJson(model, dataset, prices, fixed);
    } else {
      const fit = fitProfitFunction(dataset, options);
      json = fitToContractJson(fit, { prices, fixed });
      model = pooledModelOf(fit, null);
    }
    if (!wantsCommitted) return { code: 0, stdout: JSON.stringify(json, null, 2) + '\n', stderr: '' };
    if (committedPairs)
      for (const [name, q] of Object.entries(committedPairs)) {
        const it = model.fit.layout.items.find((x) => x.name === name);
        if (!it) throw new UsageError(`--committed: "${name}" is not an item of the model (outputs: ${model.fit.layout.items.filter((x) => x.role === 'output').map((x) => x.name).join(', ')})`);
        if (it.role !== 'output') throw new UsageError(`--committed: ${name} is an input; only outputs can be committed`);
        if (!(q > 0)) throw new UsageError(`--committed: the quantity of ${name} must be more than 0, got ${q}`);
      }
    const point = { prices: json.evaluatedAt.prices, fixed: json.evaluatedAt.fixed };
    let committedFarms: CommittedRequest['farms'] = null;
    if (committedText !== null) {
      label = basename(values['committed-file']!);
      committedFarms = parseCommittedCsv(committedText, model, point);
    }
    const request: CommittedRequest = { pairs: committedPairs, farms: committedFarms, draws, seed, level };
    const doc = { ...json, committed: committedSection(model, point, request) };
    return { code: 0, stdout: JSON.stringify(doc, null, 2) + '\n', stderr: '' };
  } catch (e) {
    if (isEstimationInputError(e)) return { code: 2, stdout: '', stderr: `${label}: ${(e as Error).message}\n` };
    if (e instanceof UsageError) return { code: 2, stdout: '', stderr: `${e.message}\n` };
    if (e instanceof Error && (e as NodeJS.ErrnoException).code?.startsWith('ERR_PARSE_ARGS')) return { code: 2, stdout: '', stderr: `fit: ${e.message.split('\n')[0]} (${USAGE})\n` };
    const msg = e instanceof Error ? e.message : String(e);
    return { code: 1, stdout: '', stderr: `fit: internal error: ${msg.split('\n')[0]}\n` };
  }
}

/**
 * The contract keys for the per-hectare model, in levels: the per-hectare fit is evaluated at the
 * point's other factors per hectare and its netputs and profit scaled by the land (default: the
 * sample mean). Elasticities are the same per hectare and in levels (constant returns to land).
 */
function perHectareContractJson(model: ForecastModel, ds: NetputDataset, prices: Record<string, number>, fixed: Record<string, number>) {
  const landName = model.landFactor!;
  const k = ds.fixedFactors.indexOf(landName);
  const land = fixed[landName] ?? ds.fixed[k]!.reduce((a, v) => a + v, 0) / ds.fixed[k]!.length;
  if (!(land > 0)) throw new UsageError(`--fixed: ${landName} must be more than 0 ha`);
  const perHa = Object.fromEntries(Object.entries(fixed).filter(([f]) => f !== landName).map(([f, v]) => [f, f === 'trend' ? v : v / land]));
  const json = fitToContractJson(model.fit, { prices, fixed: perHa });
  const scale = (r: Record<string, number>): Record<string, number> => Object.fromEntries(Object.entries(r).map(([f, v]) => [f, v * land]));
  const levels = Object.fromEntries(Object.entries(json.evaluatedAt.fixed).map(([f, v]) => [f, f === 'trend' ? v : v * land]));
  return {
    ...json,
    evaluatedAt: { prices: json.evaluatedAt.prices, fixed: { [landName]: land, ...levels } },
    netputs: scale(json.netputs),
    profit: json.profit * land,
    specification: model.specification,
    perHectare: {
      note: 'netputs and profit above are per-hectare values × the land at the evaluation point; equations, coefficients and residual covariance are per hectare',
      land,
      netputs: json.netputs,
      profit: json.profit,
    },
  };
}

const isMain = process.argv[1] !== undefined && /(^|[/\\])cli\.(ts|js)$/.test(process.argv[1]);
if (isMain) {
  const r = runFitCli(process.argv.slice(2));
  if (r.stdout) process.stdout.write(r.stdout);
  if (r.stderr) process.stderr.write(r.stderr);
  process.exitCode = r.code;
}
