/**
 * The fit command (docs/fit-command.md):
 *   npm run --silent fit -- --input FILE.csv [--numeraire ITEM] [--trend] [--form nq|gl]
 *                           [--prices item=value,...] [--fixed name=value,...]
 * Prints the contract JSON on stdout and exits 0. Bad input: one line on stderr naming the row and
 * column or the cause, exit code 2, never a stack trace.
 */
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import { fitToContractJson } from './contract.js';
import { parseNetputCsv } from './dataset.js';
import { isEstimationInputError } from './errors.js';
import { fitProfitFunction } from './fit.js';

class UsageError extends Error {}

const USAGE = 'usage: fit --input FILE.csv [--numeraire ITEM] [--trend] [--form nq|gl] [--prices item=value,...] [--fixed name=value,...]';

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
        help: { type: 'boolean' },
      },
      strict: true,
      allowPositionals: false,
    });
    if (values.help) return { code: 0, stdout: USAGE + '\n', stderr: '' };
    if (!values.input) throw new UsageError(`--input FILE.csv is required (${USAGE})`);
    if (values.form !== undefined && values.form !== 'nq' && values.form !== 'gl') throw new UsageError(`--form must be nq or gl, not "${values.form}"`);
    const prices = parsePairs('prices', values.prices);
    const fixed = parsePairs('fixed', values.fixed);
    label = basename(values.input);
    let text: string;
    try {
      text = readFileSync(values.input, 'utf8');
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      throw new UsageError(`${label}: cannot read the file (${code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : (code ?? 'read error')})`);
    }
    const dataset = parseNetputCsv(text);
    const fit = fitProfitFunction(dataset, {
      ...(values.form ? { form: values.form as 'nq' | 'gl' } : {}),
      ...(values.numeraire !== undefined ? { numeraire: values.numeraire } : {}),
      trend: values.trend ?? false,
    });
    const json = fitToContractJson(fit, { prices, fixed });
    return { code: 0, stdout: JSON.stringify(json, null, 2) + '\n', stderr: '' };
  } catch (e) {
    if (isEstimationInputError(e)) return { code: 2, stdout: '', stderr: `${label}: ${(e as Error).message}\n` };
    if (e instanceof UsageError) return { code: 2, stdout: '', stderr: `${e.message}\n` };
    if (e instanceof Error && (e as NodeJS.ErrnoException).code?.startsWith('ERR_PARSE_ARGS')) return { code: 2, stdout: '', stderr: `fit: ${e.message.split('\n')[0]} (${USAGE})\n` };
    const msg = e instanceof Error ? e.message : String(e);
    return { code: 1, stdout: '', stderr: `fit: internal error: ${msg.split('\n')[0]}\n` };
  }
}

const isMain = process.argv[1] !== undefined && /cli\.(ts|js)$/.test(process.argv[1]);
if (isMain) {
  const r = runFitCli(process.argv.slice(2));
  if (r.stdout) process.stdout.write(r.stdout);
  if (r.stderr) process.stderr.write(r.stderr);
  process.exitCode = r.code;
}
