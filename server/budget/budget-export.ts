/**
 * CSV and XLSX exports of a budget, with the cautions as rows. Text cells go through the shared
 * formula escaper (server/exports/spreadsheet-writers.ts, OWASP CSV Injection); numbers stay numbers.
 *
 * CSV is one long table (section, scenario, product, month, measure, value, unit) so every figure
 * of every scenario fits; the XLSX has a summary, the scenarios side by side, the product plan,
 * the cash schedule and the cautions, each sheet headed by the cautions.
 */
import { escapeFormula, toCsv, type SheetColumn, type SheetRow } from '../exports/spreadsheet-writers.js';
import type { DisplayedBudgetResult } from './budget-units.js';
import { NUTRIENT_LABEL, NUTRIENTS } from './nutrients.js';

export interface BudgetExportHeader {
  id: number;
  name: string;
  updatedAt: string;
  updatedBy: string | null;
}

const CSV_COLUMNS: SheetColumn[] = [
  { key: 'section', header: 'section' },
  { key: 'scenario', header: 'scenario' },
  { key: 'product', header: 'product' },
  { key: 'month', header: 'month' },
  { key: 'measure', header: 'measure' },
  { key: 'value', header: 'value' },
  { key: 'unit', header: 'unit' },
];

/** Rounds away float noise (1e-6 of a unit) without hiding any figure a reader uses. */
const clean = (v: number) => Math.round(v * 1e6) / 1e6;

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
  return `Published outlook "${d.title}" version ${d.version}, season ${d.seasonLabel}, ${d.scenario} scenario, ${model}`;
}

/** Every figure as rows of the long CSV table. */
export function budgetCsvRows(h: BudgetExportHeader, r: DisplayedBudgetResult): SheetRow[] {
  const u = labels(r);
  const rows: SheetRow[] = [];
  const add = (section: string, measure: string, value: unknown, unit = '', extra: Partial<Record<'scenario' | 'product' | 'month', string>> = {}) =>
    rows.push({ section, scenario: extra.scenario ?? '', product: extra.product ?? '', month: extra.month ?? '', measure, value: typeof value === 'number' ? clean(value) : value, unit });
  r.cautions.forEach((c) => add('caution', 'caution', c));
  add('budget', 'name', h.name);
  add('budget', 'id', h.id);
  add('budget', 'source', sourceLine(r));
  add('budget', 'saved', h.updatedAt);
  if (h.updatedBy) add('budget', 'saved by', h.updatedBy);
  add('budget', 'currency', r.currency);
  add('budget', 'units', r.unitSystem === 'us' ? 'US customary (lb, short ton)' : 'metric (kg, t)');
  add('budget', 'lot rule', r.lotRule);
  add('budget', 'software version', r.softwareVersion);
  for (const n of NUTRIENTS) add('reference price', NUTRIENT_LABEL[n], r.referencePrices.values[n] ?? '', u.perMass);
  if (r.demand.elasticities)
    for (const i of NUTRIENTS) for (const j of NUTRIENTS) add('elasticity', `${NUTRIENT_LABEL[i]} quantity / ${NUTRIENT_LABEL[j]} price`, r.demand.elasticities[i][j], r.demand.elasticitySource);
  for (const s of r.scenarios) {
    const sc = { scenario: s.name };
    for (const n of NUTRIENTS) if (s.priceChanges[n]) add('scenario', `${NUTRIENT_LABEL[n]} price change`, s.priceChanges[n]!, '%', sc);
    for (const n of NUTRIENTS) add('demand', NUTRIENT_LABEL[n], s.demand[n], u.nutrient(n), sc);
    add('demand', 'P (element)', s.demandElements.p, `${u.mass} P`, sc);
    add('demand', 'K (element)', s.demandElements.k, `${u.mass} K`, sc);
    if (s.modelDemand) for (const n of NUTRIENTS) add('demand', `${NUTRIENT_LABEL[n]} (model re-evaluated)`, s.modelDemand[n], u.nutrient(n), sc);
    for (const l of s.mix.lines) {
      const pc = { ...sc, product: l.name };
      add('plan', 'grade', l.grade, 'N-P2O5-K2O', pc);
      add('plan', 'price', l.pricePerT, u.price, pc);
      add('plan', 'least-cost quantity', l.lpTonnes, u.product, pc);
      add('plan', 'lots', l.lots, `lots of ${clean(l.lotT)} ${u.product}`, pc);
      add('plan', 'quantity bought', l.tonnes, u.product, pc);
      add('plan', 'cost', l.cost, r.currency, pc);
    }
    for (const n of NUTRIENTS) add('supply', NUTRIENT_LABEL[n], s.mix.supply[n], u.nutrient(n), sc);
    for (const n of NUTRIENTS) add('over-supply', NUTRIENT_LABEL[n], s.mix.overSupply[n], u.nutrient(n), sc);
    for (const m of s.cash.months) {
      const mc = { ...sc, month: m.month };
      add('cash', 'booked', m.bookedTonnes, u.product, mc);
      add('cash', 'prepaid', m.prepaid, r.currency, mc);
      add('cash', 'on terms', m.onTerms, r.currency, mc);
      add('cash', 'cash out', m.cash, r.currency, mc);
      add('cash', 'cumulative', m.cumulative, r.currency, mc);
    }
    add('totals', 'least-cost mix cost', s.totals.lpCost, r.currency, sc);
    add('totals', 'cost in lots', s.totals.cost, r.currency, sc);
    add('totals', 'prepayment discount', s.totals.prepayDiscount, r.currency, sc);
    add('totals', 'cash', s.totals.cash, r.currency, sc);
    if (s.cash.totals.financingCost !== null) add('totals', 'financing cost of prepaying', s.cash.totals.financingCost, r.currency, sc);
    add('totals', 'change from base', s.totals.changeFromBasePct, '%', sc);
  }
  r.notes.forEach((n) => add('note', 'method', n));
  r.warnings.forEach((w) => add('warning', 'warning', w));
  return rows;
}

export function budgetCsv(h: BudgetExportHeader, r: DisplayedBudgetResult): string {
  return toCsv(budgetCsvRows(h, r), CSV_COLUMNS);
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
