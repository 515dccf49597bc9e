/**
 * CSV and XLSX exports of a budget, with the cautions as rows. Text cells go through the shared
 * formula escaper (server/exports/spreadsheet-writers.ts, OWASP CSV Injection); numbers stay numbers.
 *
 * The CSV is for the board: a cash-flow table (one row per month) and a purchase table (one row per
 * product), scenarios side by side, money in whole currency units. The XLSX keeps full precision:
 * a summary, the scenarios side by side, the product plan, the cash schedule and the cautions, each
 * sheet headed by the cautions.
 */
import { DateTime } from 'luxon';
import { monthWords } from '../../shared/season-calendar.js';
import { escapeFormula, toCsvBlocks } from '../exports/spreadsheet-writers.js';
import type { DisplayedBudgetResult } from './budget-units.js';
import { NUTRIENT_LABEL, NUTRIENTS } from './nutrients.js';

export interface BudgetExportHeader {
  id: number;
  name: string;
  updatedAt: string;
  updatedBy: string | null;
}


function labels(r: DisplayedBudgetResult) {
  const us = r.unitSystem === 'us';
  const mass = us ? 'lb' : 'kg';
  return {
    mass,
    nutrient: (n: (typeof NUTRIENTS)[number]) => `${mass} ${NUTRIENT_LABEL[n]}`,
    product: us ? 'short ton' : 't',
    price: us ? `${r.currency}/short ton` : `${r.currency}/t`,
    perMass: `${r.currency}/${mass}`,
  };
}

function sourceLine(r: DisplayedBudgetResult): string {
  const d = r.source.detail as { runId?: number; modelName?: string; seasonLabel?: string | null; title?: string; version?: number; scenario?: string };
  const model = `model run ${d.runId}${d.modelName ? ` (${d.modelName})` : ''}`;
  if (r.source.kind === 'model-run') return `Model run ${d.runId}${d.modelName ? ` (${d.modelName})` : ''}, season ${d.seasonLabel ?? 'as fitted'}`;
  if (r.source.kind === 'manual') return 'Nutrient demand entered by hand';
  if (r.source.kind === 'contracted') return `Contracted output: outlook ${(r.source.detail as { outlookId?: number }).outlookId}, season ${d.seasonLabel}, contract evaluation ${(r.source.detail as { evaluationId?: number }).evaluationId} (signed contracts at committed output, other farms as projected), ${model}`;
  return `Published outlook "${d.title}" version ${d.version}, season ${d.seasonLabel}, ${d.scenario} scenario, ${model}`;
}

const whole = (v: number) => Math.round(v) || 0;
const tenth = (v: number) => Math.round(v * 10) / 10 || 0;

/** "2026-12-03T14:05:00.000Z" → "3 Dec 2026, 14:05 UTC". */
function savedWords(iso: string): string {
  const d = DateTime.fromISO(iso, { zone: 'utc' });
  return d.isValid ? `${d.toFormat('d LLL yyyy, HH:mm')} UTC` : iso;
}

/**
 * The board's CSV: a short heading (budget, source, saved, money basis, cautions), then a cash-flow
 * table with one row per month and a purchase table with one row per product, every scenario side
 * by side, headings in words; money rounded to whole currency units, tonnes to 0.1. The XLSX keeps
 * full precision.
 */
export function budgetCsvTables(h: BudgetExportHeader, r: DisplayedBudgetResult): (string | number | null)[][][] {
  const u = labels(r);
  const cur = r.currency;
  const head: (string | number | null)[][] = [
    ['Fertiliser budget', h.name],
    ['Source', sourceLine(r)],
    ['Saved', `${savedWords(h.updatedAt)}${h.updatedBy ? ` by ${h.updatedBy}` : ''}`],
    ['Money', `${cur}, rounded to whole units (the XLSX export keeps full precision)`],
    ['Quantities', r.unitSystem === 'us' ? 'short tons of product, rounded to 0.1' : 'tonnes of product, rounded to 0.1'],
    ...r.cautions.map((c) => ['Caution', c]),
  ];

  const months = [...new Set(r.scenarios.flatMap((s) => s.cash.months.map((m) => m.month)))].sort();
  const cashHead = ['Month', ...r.scenarios.flatMap((s) => [`${s.name}: booked (${u.product})`, `${s.name}: paid in the month (${cur})`, `${s.name}: paid to date (${cur})`])];
  const cashRows = months.map((month) => [
    monthWords(month),
    ...r.scenarios.flatMap((s) => {
      const m = s.cash.months.find((x) => x.month === month);
      const before = s.cash.months.filter((x) => x.month <= month).at(-1);
      return [tenth(m?.bookedTonnes ?? 0), whole(m?.cash ?? 0), whole(before?.cumulative ?? 0)];
    }),
  ]);
  const cashTotal = ['Total', ...r.scenarios.flatMap((s) => [tenth(s.cash.months.reduce((a, m) => a + m.bookedTonnes, 0)), whole(s.totals.cash), whole(s.totals.cash)])];

  const products = [...new Set(r.scenarios.flatMap((s) => s.mix.lines.map((l) => l.name)))];
  const grade = (name: string) => r.scenarios.flatMap((s) => s.mix.lines).find((l) => l.name === name)?.grade ?? '';
  const buyHead = ['Product', 'Grade (N-P2O5-K2O)', ...r.scenarios.flatMap((s) => [`${s.name}: price (${u.price})`, `${s.name}: bought (${u.product})`, `${s.name}: cost (${cur})`])];
  const buyRows = products.map((name) => [
    name,
    grade(name),
    ...r.scenarios.flatMap((s) => {
      const l = s.mix.lines.find((x) => x.name === name);
      const price = s.productPrices.find((p) => p.name === name)?.pricePerT ?? null;
      return [price === null ? null : whole(price), tenth(l?.tonnes ?? 0), whole(l?.cost ?? 0)];
    }),
  ]);
  const buyTotal = ['Total', '', ...r.scenarios.flatMap((s) => [null, tenth(s.mix.lines.reduce((a, l) => a + l.tonnes, 0)), whole(s.totals.cost)])];
  const totals = [
    ['Scenario', `Cost in delivery lots (${cur})`, `Prepayment discount (${cur})`, `Cash paid (${cur})`, 'Change from base (%)'],
    ...r.scenarios.map((s) => [s.name, whole(s.totals.cost), whole(s.totals.prepayDiscount), whole(s.totals.cash), Math.round(s.totals.changeFromBasePct * 10) / 10 || 0]),
  ];
  const notes = [...r.warnings.map((w) => ['Warning', w]), ...r.notes.map((n) => ['Method', n])];
  return [head, [['Cash flow by month'], cashHead, ...cashRows, cashTotal], [['Purchases by product'], buyHead, ...buyRows, buyTotal], [['Totals by scenario'], ...totals], ...(notes.length ? [notes] : [])];
}

export function budgetCsv(h: BudgetExportHeader, r: DisplayedBudgetResult): string {
  return toCsvBlocks(budgetCsvTables(h, r));
}

const MONEY = '#,##0.00';
const MASS = '#,##0.0';
const TONNES = '#,##0.000';
const PCT = '0.00';

type Cell = string | number | null;
const text = (v: Cell): Cell => (typeof v === 'string' ? escapeFormula(v) : v);

export async function budgetXlsx(h: BudgetExportHeader, r: DisplayedBudgetResult): Promise<Buffer> {
  const { default: Excel } = await import('exceljs');
  const u = labels(r);
  const wb = new Excel.Workbook();
  wb.creator = 'Netput';
  type Sheet = ReturnType<typeof wb.addWorksheet>;
  const sheet = (name: string, widths: number[]): Sheet => {
    const ws = wb.addWorksheet(name);
    ws.columns = widths.map((width) => ({ width }));
    for (const c of r.cautions) {
      const row = ws.addRow([text(c)]);
      row.font = { italic: true };
    }
    ws.addRow([]);
    return ws;
  };
  const header = (ws: Sheet, cells: string[]) => {
    const row = ws.addRow(cells.map(text));
    row.font = { bold: true };
  };
  const addRow = (ws: Sheet, cells: Cell[], formats: (string | null)[] = []) => {
    const row = ws.addRow(cells.map(text));
    formats.forEach((f, i) => {
      if (f) row.getCell(i + 1).numFmt = f;
    });
  };

  const summary = sheet('Summary', [34, 22, 16, 16, 16]);
  header(summary, ['Budget', h.name]);
  for (const [k, v] of [
    ['Id', h.id],
    ['Source', sourceLine(r)],
    ['Saved', h.updatedAt],
    ['Saved by', h.updatedBy ?? ''],
    ['Currency', r.currency],
    ['Units', r.unitSystem === 'us' ? 'US customary (lb, short ton)' : 'metric (kg, t)'],
    ['Lot rule', r.lotRule],
    ['Software version', r.softwareVersion],
  ] as [string, Cell][])
    addRow(summary, [k, v]);
  summary.addRow([]);
  header(summary, ['Base demand', 'Amount', 'Unit', 'Reference price', 'Per']);
  for (const n of NUTRIENTS) addRow(summary, [NUTRIENT_LABEL[n], r.demand.base[n], u.nutrient(n), r.referencePrices.values[n], u.perMass], [null, MASS, null, '0.0000']);
  addRow(summary, ['P (element)', r.demand.elements.p, `${u.mass} P`], [null, MASS]);
  addRow(summary, ['K (element)', r.demand.elements.k, `${u.mass} K`], [null, MASS]);
  if (r.demand.elasticities) {
    summary.addRow([]);
    header(summary, [`Elasticities (${r.demand.elasticitySource}): quantity ↓ / price →`, ...NUTRIENTS.map((n) => NUTRIENT_LABEL[n])]);
    for (const i of NUTRIENTS) addRow(summary, [NUTRIENT_LABEL[i], ...NUTRIENTS.map((j) => r.demand.elasticities![i][j])], [null, '0.000', '0.000', '0.000']);
  }

  const sideBySide = sheet('Scenarios', [34, ...r.scenarios.map(() => 16)]);
  header(sideBySide, ['', ...r.scenarios.map((s) => s.name)]);
  const line = (label: string, f: (s: (typeof r.scenarios)[number]) => number | null, fmt: string) =>
    addRow(sideBySide, [label, ...r.scenarios.map(f)], [null, ...r.scenarios.map(() => fmt)]);
  for (const n of NUTRIENTS) line(`${NUTRIENT_LABEL[n]} price change, %`, (s) => s.priceChanges[n] ?? 0, PCT);
  for (const n of NUTRIENTS) line(`Demand, ${u.nutrient(n)}`, (s) => s.demand[n], MASS);
  if (r.scenarios[0]?.modelDemand) for (const n of NUTRIENTS) line(`Model re-evaluated, ${u.nutrient(n)}`, (s) => s.modelDemand?.[n] ?? null, MASS);
  const names = [...new Set(r.scenarios.flatMap((s) => s.mix.lines.map((l) => l.name)))];
  for (const p of names) line(`${p}, ${u.product}`, (s) => s.mix.lines.find((l) => l.name === p)?.tonnes ?? 0, TONNES);
  for (const n of NUTRIENTS) line(`Over-supply, ${u.nutrient(n)}`, (s) => s.mix.overSupply[n], MASS);
  line(`Least-cost mix cost, ${r.currency}`, (s) => s.totals.lpCost, MONEY);
  line(`Cost in lots, ${r.currency}`, (s) => s.totals.cost, MONEY);
  line(`Prepayment discount, ${r.currency}`, (s) => s.totals.prepayDiscount, MONEY);
  line(`Cash, ${r.currency}`, (s) => s.totals.cash, MONEY);
  line('Change from base, %', (s) => s.totals.changeFromBasePct, PCT);

  const plan = sheet('Plan', [18, 22, 12, 14, 16, 8, 10, 16, 16, 14, 14, 14]);
  header(plan, ['Scenario', 'Product', 'Grade', `Price, ${u.price}`, `Least-cost, ${u.product}`, 'Lots', `Lot, ${u.product}`, `Bought, ${u.product}`, `Cost, ${r.currency}`, ...NUTRIENTS.map((n) => u.nutrient(n))]);
  for (const s of r.scenarios)
    for (const l of s.mix.lines)
      addRow(plan, [s.name, l.name, l.grade, l.pricePerT, l.lpTonnes, l.lots, l.lotT, l.tonnes, l.cost, l.supplies.nitrogen, l.supplies.phosphate, l.supplies.potash], [null, null, null, MONEY, TONNES, '0', TONNES, TONNES, MONEY, MASS, MASS, MASS]);

  const cash = sheet('Cash', [18, 10, 14, 16, 16, 16, 16, 16]);
  header(cash, ['Scenario', 'Month', `Booked, ${u.product}`, `Booked value, ${r.currency}`, 'Prepaid', 'On terms', 'Cash out', 'Cumulative']);
  for (const s of r.scenarios)
    for (const m of s.cash.months)
      addRow(cash, [s.name, m.month, m.bookedTonnes, m.bookedValue, m.prepaid, m.onTerms, m.cash, m.cumulative], [null, null, TONNES, MONEY, MONEY, MONEY, MONEY, MONEY]);

  const notes = sheet('Cautions', [140]);
  header(notes, ['Method']);
  for (const n of r.notes) addRow(notes, [n]);
  if (r.warnings.length) {
    header(notes, ['Warnings']);
    for (const w of r.warnings) addRow(notes, [w]);
  }
  return Buffer.from(await wb.xlsx.writeBuffer());
}
