import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { ColDef } from 'ag-grid-community';
import type { UnitSystem } from '../../../shared/units';
import { AgGridAngular, denseGridTheme, FIT_FIGURES, WRAPPED_HEADINGS } from '../shared/grid';
import { formatLot, formatMass, formatMoney, formatTonnes } from './budget-format';
import { priceText } from '../../../shared/number-format';
import { NUTRIENT_LABEL, NUTRIENTS, type MixLine, type ScenarioResult } from './budget-api-types';
import { unitLabels } from './budget-units';

/** One scenario's least-cost product mix in delivery lots, and what it supplies against the need. */
@Component({
  selector: 'np-product-plan',
  imports: [AgGridAngular],
  template: `
    <ag-grid-angular
      class="grid"
      [attr.aria-label]="'Product plan, ' + scenario().name"
      [theme]="theme"
      [rowData]="scenario().mix.lines"
      [columnDefs]="columns()"
      [defaultColDef]="defaultColDef"
      [autoSizeStrategy]="fitFigures"
      domLayout="autoHeight"
      [overlayNoRowsTemplate]="'Nothing to buy: the nutrient demand is zero.'"
    />
    <p class="total">
      In all {{ tonnes(total().tonnes) }} {{ labels().productPlural }} of product for {{ money(scenario().mix.cost) }}; the continuous
      least-cost mix would cost {{ money(scenario().mix.lpCost) }}, so whole lots add {{ money(scenario().mix.cost - scenario().mix.lpCost) }}.
    </p>
    <div class="np-table-scroll balance" tabindex="0">
      <table class="numbers" [attr.aria-label]="'Nutrients needed and supplied, ' + scenario().name">
        <thead>
          <tr>
            <th scope="col">Nutrient, {{ labels().mass }}</th>
            <th scope="col" class="num">Needed</th>
            <th scope="col" class="num">Supplied</th>
            <th scope="col" class="num">Over the need</th>
          </tr>
        </thead>
        <tbody>
          @for (n of nutrients; track n) {
            <tr>
              <th scope="row">{{ label[n] }}</th>
              <td class="num">{{ mass(scenario().mix.demand[n]) }}</td>
              <td class="num">{{ mass(scenario().mix.supply[n]) }}</td>
              <td class="num">{{ mass(scenario().mix.overSupply[n]) }}</td>
            </tr>
          }
        </tbody>
      </table>
    </div>
  `,
  styleUrl: './product-plan.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProductPlan {
  // inputs
  readonly scenario = input.required<ScenarioResult>();
  readonly currency = input.required<string>();
  readonly system = input.required<UnitSystem>();

  protected readonly theme = denseGridTheme;
  protected readonly nutrients = NUTRIENTS;
  protected readonly label = NUTRIENT_LABEL;
  protected readonly mass = formatMass;
  protected readonly labels = computed(() => unitLabels(this.system(), this.currency()));
  protected readonly defaultColDef = WRAPPED_HEADINGS;
  protected readonly fitFigures = FIT_FIGURES;
  protected readonly tonnes = formatTonnes;
  protected readonly total = computed(() => ({ tonnes: this.scenario().mix.lines.reduce((a, l) => a + l.tonnes, 0) }));

  protected money(v: number): string {
    return formatMoney(v, this.currency());
  }

  protected readonly columns = computed<ColDef<MixLine>[]>(() => {
    const u = this.labels();
    const c = this.currency();
    // "short tons" needs wider columns than "t" for its headers to show whole.
    const wide = u.system === 'us' ? 30 : 0;
    const num = (headerName: string, value: (l: MixLine) => number, format: (v: number) => string, width = 130): ColDef<MixLine> => ({
      headerName,
      type: 'numericColumn',
      width,
      valueGetter: (p) => (p.data ? value(p.data) : null),
      valueFormatter: (p) => (p.value == null ? '' : format(p.value as number)),
    });
    return [
      { field: 'name', headerName: 'Product', pinned: 'left', width: 150 },
      { field: 'grade', headerName: 'Grade', width: 90 },
      // The headings carry the currency, so the cells hold plain figures (narrower, so kg K2O fits at 1280 px).
      num(`Price, ${u.pricePerProduct}`, (l) => l.pricePerT, (v) => priceText(v), 110 + wide * 1.6),
      num(`Least-cost, ${u.productPlural}`, (l) => l.lpTonnes, (v) => formatTonnes(v, 2), 120 + wide),
      {
        headerName: 'Lots',
        type: 'numericColumn',
        width: 110,
        valueGetter: (p) => p.data?.lots ?? null,
        valueFormatter: (p) => (p.data ? `${p.data.lots} × ${formatLot(p.data.lotT)}` : ''),
      },
      num(`Bought, ${u.productPlural}`, (l) => l.tonnes, (v) => formatTonnes(v), 115 + wide),
      num(`Cost, ${c}`, (l) => l.cost, (v) => formatMoney(v, '').trim(), 115),
      ...NUTRIENTS.map((n) => num(u.nutrient(n), (l) => l.supplies[n], formatMass, 110)),
    ];
  });
}
