import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import type { MemberPlain } from '../outlook/outlook-api-types';
import { formatQuantity } from '../outlook/outlook-format';
import { formatMoney, formatPricePer } from '../budget/budget-format';

/**
 * The member's own fertiliser estimate: kg of N, P2O5 and K2O the model expects the farm to use,
 * per hectare and in total, and the bill at the outlook's expected prices (low and high beside it),
 * with the agronomic caution. The figures come from the server (server/outlook/member-plain.ts).
 */
@Component({
  selector: 'np-portal-fertiliser',
  template: `
    @let f = fertiliser();
    <p>
      At the outlook's expected prices your farm's fertiliser would cost about
      <strong>{{ money(f.total) }}</strong> ({{ money(f.totalLow) }} in the low scenario, {{ money(f.totalHigh) }} in the high one).
    </p>
    <div class="np-table-scroll" tabindex="0" role="region" aria-label="Your fertiliser estimate">
      <table class="fert">
        <thead>
          <tr>
            <th scope="col">Nutrient</th>
            <th scope="col" class="num">Need</th>
            <th scope="col" class="num">Bill</th>
          </tr>
        </thead>
        <tbody>
          @for (l of f.lines; track l.item) {
            <tr>
              <th scope="row">{{ l.name }}</th>
              <td class="num">
                {{ l.kgPerHa === null ? '—' : formatQuantity(l.kgPerHa) + ' ' + l.unit + '/ha' }}
                <span class="sub">{{ formatQuantity(l.kg) }} {{ l.unit }} in all</span>
              </td>
              <td class="num">
                {{ money(l.cost) }}
                <span class="sub">at {{ pricePer(l.pricePerKg, l.unit) }}</span>
              </td>
            </tr>
          }
        </tbody>
        <tfoot>
          <tr>
            <th scope="row" colspan="2">Total</th>
            <td class="num"><strong>{{ money(f.total) }}</strong></td>
          </tr>
        </tfoot>
      </table>
    </div>
    <p class="caution">{{ f.caution }}</p>
  `,
  styles: `
    @use '../shared/tables';
    @include tables.portal-table('.fert');
    th,
    td {
      vertical-align: top;
    }
    tfoot th,
    tfoot td {
      border-bottom: none;
    }
    .sub {
      display: block;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .caution {
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PortalFertiliser {
  // inputs
  readonly fertiliser = input.required<NonNullable<MemberPlain['fertiliser']>>();

  protected readonly formatQuantity = formatQuantity;
  protected money(v: number): string {
    return formatMoney(v, this.fertiliser().currency);
  }
  protected pricePer(v: number, unit: string): string {
    return formatPricePer(v, this.fertiliser().currency, unit);
  }
}
