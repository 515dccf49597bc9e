import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { formatMass, formatMoney, formatMonth, formatPct, formatTonnes } from './budget-format';
import { NUTRIENT_LABEL, NUTRIENTS, type BudgetResult, type ScenarioResult } from './budget-api-types';
import { unitLabels } from './budget-units';

export interface ComparisonCell {
  text: string;
  /** A second, smaller line: the change from base, lots. */
  sub?: string;
  /** Marks a rise (+) or fall (−) against the base, for colour. */
  trend?: 'up' | 'down' | null;
}

export interface ComparisonRow {
  group: string;
  label: string;
  cells: ComparisonCell[];
}

const trendOf = (pct: number): ComparisonCell['trend'] => (Math.abs(pct) < 0.05 ? null : pct > 0 ? 'up' : 'down');

/** Every scenario of a budget as one column: price changes, demand, product tonnes and money. */
export function comparisonRows(r: BudgetResult): ComparisonRow[] {
  const u = unitLabels(r.unitSystem, r.currency);
  const s = r.scenarios;
  const rows: ComparisonRow[] = [];
  const add = (group: string, label: string, cell: (x: ScenarioResult) => ComparisonCell) => rows.push({ group, label, cells: s.map(cell) });

  for (const n of NUTRIENTS)
    add('Price change', `${NUTRIENT_LABEL[n]} price`, (x) => ({ text: x.priceChanges[n] ? formatPct(x.priceChanges[n], { signed: true }) : '—' }));

  const demandGroup = `Nutrient demand, ${u.mass}`;
  for (const n of NUTRIENTS)
    add(demandGroup, NUTRIENT_LABEL[n], (x) => ({
      text: formatMass(x.demand[n]),
      sub: x.name === s[0]?.name ? undefined : formatPct(x.demandChangePct[n], { signed: true }),
      trend: trendOf(x.demandChangePct[n]),
    }));
  add(demandGroup, 'P (element)', (x) => ({ text: formatMass(x.demandElements.p) }));
  add(demandGroup, 'K (element)', (x) => ({ text: formatMass(x.demandElements.k) }));
  if (s.some((x) => x.modelDemand))
    for (const n of NUTRIENTS) add(`Model re-evaluated, ${u.mass}`, NUTRIENT_LABEL[n], (x) => ({ text: formatMass(x.modelDemand?.[n]) }));

  const products = [...new Set(s.flatMap((x) => x.mix.lines.map((l) => l.name)))];
  for (const p of products)
    add(`Bought, ${u.productPlural}`, p, (x) => {
      const line = x.mix.lines.find((l) => l.name === p);
      return line ? { text: formatTonnes(line.tonnes), sub: `${line.lots} lot${line.lots === 1 ? '' : 's'}` } : { text: '—' };
    });

  const money = `Money, ${r.currency}`;
  add(money, 'Least-cost mix', (x) => ({ text: formatMoney(x.totals.lpCost, r.currency) }));
  add(money, 'Cost in whole lots', (x) => ({ text: formatMoney(x.totals.cost, r.currency) }));
  add(money, 'Prepayment discount', (x) => ({ text: formatMoney(x.totals.prepayDiscount, r.currency) }));
  add(money, 'Cash paid', (x) => ({
    text: formatMoney(x.totals.cash, r.currency),
    sub: x.name === s[0]?.name ? undefined : formatPct(x.totals.changeFromBasePct, { signed: true }),
    trend: trendOf(x.totals.changeFromBasePct),
  }));
  add(money, 'Busiest month', (x) => ({
    text: x.cash.totals.peakMonth ? formatMonth(x.cash.totals.peakMonth) : '—',
    sub: x.cash.totals.peakMonth ? formatMoney(x.cash.totals.peakCash, r.currency) : undefined,
  }));
  return rows;
}

/** The scenarios side by side; the first column is the base. */
@Component({
  selector: 'np-scenario-comparison',
  template: `
    <div class="np-table-scroll" tabindex="0">
      <table class="numbers" aria-label="Scenarios side by side">
        <thead>
          <tr>
            <th scope="col"><span class="np-sr-only">Figure</span></th>
            @for (s of result().scenarios; track s.name) {
              <th scope="col" class="num">{{ s.name }}</th>
            }
          </tr>
        </thead>
        @for (g of groups(); track g.name) {
          <tbody>
            <tr class="group">
              <th scope="rowgroup" [attr.colspan]="result().scenarios.length + 1">{{ g.name }}</th>
            </tr>
            @for (row of g.rows; track row.label) {
              <tr>
                <th scope="row">{{ row.label }}</th>
                @for (c of row.cells; track $index) {
                  <td class="num">
                    {{ c.text }}
                    @if (c.sub) {
                      <span class="sub" [class.up]="c.trend === 'up'" [class.down]="c.trend === 'down'">{{ c.sub }}</span>
                    }
                  </td>
                }
              </tr>
            }
          </tbody>
        }
      </table>
    </div>
  `,
  styleUrl: './scenario-comparison.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ScenarioComparison {
  // inputs
  readonly result = input.required<BudgetResult>();

  protected readonly groups = computed(() => {
    const out: { name: string; rows: ComparisonRow[] }[] = [];
    for (const row of comparisonRows(this.result())) {
      const last = out.at(-1);
      if (last?.name === row.group) last.rows.push(row);
      else out.push({ name: row.group, rows: [row] });
    }
    return out;
  });
}
