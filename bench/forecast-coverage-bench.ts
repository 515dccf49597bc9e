/**
 * Coverage of the forecasting model's 90 % bands with known truth (run on demand; not a test):
 *   npm run bench:forecast-coverage
 * At least 200 replicate panels per design, drawn with farm effects, size-scaled errors and season
 * shocks (server/estimation/synthetic-panel.ts); each is fitted on all seasons but the last, which
 * is projected at its actual prices and land (server/estimation/coverage-study.ts). Target: 87–93 %
 * of outcomes inside the band in every third of farm size and for the co-op total.
 * Writes bench/results/forecast-coverage.json and .md.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runCoverageStudy, type CoverageStudyResult } from '../server/estimation/coverage-study.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const replicates = Number(process.env.REPLICATES ?? 200);
const designs = [
  { name: '120 farms, 8 seasons fitted', farms: 120, seasons: 8, seed: 10_000 },
  { name: '60 farms, 5 seasons fitted', farms: 60, seasons: 5, seed: 20_000 },
  { name: '200 farms, 12 seasons fitted', farms: 200, seasons: 12, seed: 30_000 },
];
// SEASON_GLS=0 fits without the season GLS of docs/forecasting.md §5 (for comparison); default: the
// model's defaults (season GLS on).
const glsOff = process.env.SEASON_GLS === '0';
const glsModel = glsOff ? { seasonGls: false } : {};
const load0 = loadavg();
const t0 = performance.now();
// PART=k runs design k alone and keeps its figures in PART_DIR (one process per design on a
// machine with spare cores); PARTS_FROM=dir then writes the report from the kept parts.
const partDir = process.env.PART_DIR ?? join(tmpdir(), 'netput-coverage-parts');
if (process.env.PART !== undefined) {
  const d = designs[Number(process.env.PART)]!;
  const r = runCoverageStudy({ replicates, farms: d.farms, seasons: d.seasons, seed: d.seed, draws: 2000, model: glsModel });
  mkdirSync(partDir, { recursive: true });
  writeFileSync(join(partDir, `${process.env.PART}.json`), JSON.stringify({ name: d.name, seconds: Math.round((performance.now() - t0) / 1000), load: [load0, loadavg()], ...r }));
  console.log(`${d.name}: done`);
  process.exit(0);
}
const fromParts = process.env.PARTS_FROM !== undefined;
const parts = fromParts ? designs.map((_, k) => JSON.parse(readFileSync(join(partDir, `${k}.json`), 'utf8')) as CoverageStudyResult & { name: string; seconds: number; load: number[][] }) : null;
const results: (CoverageStudyResult & { name: string })[] = parts ?? designs.map((d) => {
  const r = runCoverageStudy({ replicates, farms: d.farms, seasons: d.seasons, seed: d.seed, draws: 2000, model: glsModel });
  console.log(`${d.name}: done`);
  return { name: d.name, ...r };
});
const pc = (c: { share: number }) => `${(100 * c.share).toFixed(1)} %`;
const inTarget = (c: { share: number }) => c.share >= 0.87 && c.share <= 0.93;
const skillOk = results.every((r) => r.skill.every((k) => k.model <= k.perHectare));
const allIn = results.every((r) => [...r.all.thirds, r.all.coop].every(inTarget));
const doc = {
  measuredAt: new Date().toISOString(),
  machine: { cores: cpus().length, node: process.version },
  loadAverage: { start: load0, end: loadavg() },
  seconds: parts ? Math.max(...parts.map((p) => p.seconds)) : Math.round((performance.now() - t0) / 1000),
  ...(parts ? { ranAs: 'one process per design', loadAverageByDesign: parts.map((p) => ({ design: p.name, start: p.load[0], end: p.load[1] })) } : {}),
  level: 0.9,
  target: [0.87, 0.93],
  replicatesPerDesign: replicates,
  allWithinTarget: allIn,
  skillNoWorseThanPerHectareRule: skillOk,
  designs: results,
};
writeFileSync(join(root, 'bench', 'results', 'forecast-coverage.json'), JSON.stringify(doc, null, 2) + '\n');
const skillLine = () => `Farm projections no worse than the per-hectare rule for every item in every design: **${skillOk ? 'yes' : 'no'}**.`;
const lines = [
  '# Coverage of the 90 % bands with known truth',
  '',
  `Measured ${doc.measuredAt}, ${replicates} replicate panels per design (${doc.seconds} s). Each panel: the per-hectare`,
  'technology of `server/estimation/synthetic-panel.ts` with farm effects (15 % of the mean netput per ha), season shocks',
  '(8 %, correlated across items), residuals of 10 % at the median land with per-hectare variance ∝ land^−0.6, prices moving',
  '12 % a season plus a 3 % farm basis; fitted on every season but the last, which is projected at its actual prices and land',
  '(2,000 draws). Target 87–93 % everywhere (binomial standard error of a share near 90 %: ±2.1 % for 200 co-op totals of one',
  'item, ±0.9 % for the 1,000 of all items).',
  '',
  `Season GLS in the SUR step (option seasonGls, docs/forecasting.md §5): **${glsOff ? 'off (SEASON_GLS=0, for comparison)' : 'on (the default)'}**.`,
  '',
  `All thirds and co-op totals (all items) within the target: **${allIn ? 'yes' : 'no'}**.`,
  '',
  skillLine(),
  '',
];
for (const r of results) {
  lines.push(`## ${r.name} (mean t degrees of freedom of the season shock ${r.meanDf.toFixed(1)})`, '');
  lines.push('| item | smallest third | middle third | largest third | all farms | co-op totals |', '|---|---|---|---|---|---|');
  for (const it of r.items) lines.push(`| ${it.item} | ${it.thirds.map(pc).join(' | ')} | ${pc(it.farms)} | ${it.coop.held} of ${it.coop.total} (${pc(it.coop)}) |`);
  lines.push(`| **all items** | ${r.all.thirds.map(pc).join(' | ')} | ${pc(r.all.farms)} | ${r.all.coop.held} of ${r.all.coop.total} (${pc(r.all.coop)}) |`, '');
  lines.push('Median absolute percentage error of the farm projections (every replicate\'s farm outcomes):', '');
  lines.push('| item | this model | last season\'s quantity | own average per ha × land | model / per-hectare rule |', '|---|---|---|---|---|');
  for (const k of r.skill) lines.push(`| ${k.item} | ${k.model.toFixed(1)} % | ${k.lastSeason.toFixed(1)} % | ${k.perHectare.toFixed(1)} % | ${(k.model / k.perHectare).toFixed(2)} |`);
  lines.push('');
}

writeFileSync(join(root, 'bench', 'results', 'forecast-coverage.md'), lines.join('\n'));
console.log(lines.join('\n'));
