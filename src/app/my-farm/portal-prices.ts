import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { ItemExpectation } from '../outlook/outlook-api-types';
import { formatPrice } from '../outlook/outlook-format';

/**
 * The expected prices as a member reads them: item, the expected price and the low and high
 * scenarios' prices, in the portal's one item order. How each price was set (the method) is for
 * the planner, behind "How this was made".
 */
@Component({
  selector: 'np-portal-prices',
  template: `
    <div class="np-table-scroll" tabindex="0" role="region" aria-label="Expected prices">
      <table>
        <thead>
          <tr>
            <th scope="col">Item</th>
            <th scope="col" class="num">Low</th>
            <th scope="col" class="num">Expected</th>
            <th scope="col" class="num">High</th>
          </tr>
        </thead>
        <tbody>
          @for (e of ordered(); track e.item) {
            <tr>
              <th scope="row">
                {{ e.name }}
                <span class="unit">{{ e.priceUnit }}</span>
              </th>
              <td class="num">{{ formatPrice(e.low) }}</td>
              <td class="num"><strong>{{ formatPrice(e.base) }}</strong></td>
              <td class="num">{{ formatPrice(e.high) }}</td>
            </tr>
          }
        </tbody>
      </table>
    </div>
  `,
  styles: `
    @use '../shared/tables';
    @include tables.portal-table;
    .unit {
      display: block;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PortalPrices {
  // inputs
  readonly expectations = input.required<readonly ItemExpectation[]>();
  readonly order = input<readonly string[]>([]);

  protected readonly ordered = computed(() => inItemOrder(this.expectations(), this.order()));
  protected readonly formatPrice = formatPrice;
}

/** The portal's one item order (the server's `plain.itemOrder`); items it does not name keep their place at the end. */
export function inItemOrder<T extends { item: string }>(list: readonly T[], order: readonly string[]): T[] {
  const at = (code: string) => {
    const i = order.indexOf(code);
    return i < 0 ? order.length : i;
  };
  return [...list].sort((a, b) => at(a.item) - at(b.item));
}
