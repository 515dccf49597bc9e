import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { inItemOrder } from './portal-prices';
import { formatBand, formatQuantity } from '../outlook/outlook-format';
import type { ItemProjection } from '../outlook/outlook-api-types';

/**
 * Projected quantities as cards that read on a phone: the model's best estimate at the expected
 * prices (the figure of the e-mail) with the same per hectare beside it, the likely range (the band,
 * described in words above the cards), and the low and high price scenarios.
 */
@Component({
  selector: 'np-quantity-cards',
  template: `
    <ul class="cards" [attr.aria-label]="label()">
      @for (it of ordered(); track it.item) {
        <li class="card" [class.input]="it.role === 'input'">
          <span class="what">{{ it.name }} <span class="role">{{ it.role === 'output' ? 'harvest' : 'use' }}</span></span>
          <span class="value">{{ formatQuantity(it.scenarios['base']?.point) }} <span class="unit">{{ it.unit }}</span></span>
          @if (perHa()[it.item]; as ha) {
            <span class="per-ha">{{ formatQuantity(ha) }} {{ it.unit }}/ha</span>
          }
          <span class="band">Likely range {{ formatBand(it.scenarios['base']) }}</span>
          <span class="scen">Low prices {{ formatQuantity(it.scenarios['low']?.point) }} · high prices {{ formatQuantity(it.scenarios['high']?.point) }}</span>
        </li>
      }
    </ul>
  `,
  styles: `
    .cards {
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(150px, 1fr));
      gap: 8px;
      margin: 0;
      padding: 0;
      list-style: none;
    }
    .card {
      display: flex;
      flex-direction: column;
      gap: 2px;
      padding: 10px 12px;
      min-width: 0;
      border-radius: var(--mat-sys-corner-medium);
      border: 1px solid var(--mat-sys-outline-variant);
      background: var(--mat-sys-surface-container-lowest);
      border-left: 4px solid var(--mat-sys-primary);
    }
    .card.input {
      border-left-color: var(--mat-sys-tertiary);
    }
    .what {
      font: var(--mat-sys-title-small);
    }
    .role {
      display: block;
      font: var(--mat-sys-label-small);
      color: var(--mat-sys-on-surface-variant);
      text-transform: uppercase;
      letter-spacing: 0.04em;
    }
    .value {
      font: var(--mat-sys-title-large);
      font-variant-numeric: tabular-nums;
      white-space: nowrap;
    }
    .unit {
      font: var(--mat-sys-body-medium);
      color: var(--mat-sys-on-surface-variant);
    }
    .per-ha {
      font: var(--mat-sys-body-medium);
      font-variant-numeric: tabular-nums;
    }
    .band,
    .scen {
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class QuantityCards {
  // inputs
  readonly items = input.required<readonly ItemProjection[]>();
  readonly label = input('Projected quantities');
  /** Base figure per hectare by item code (from the server); none shown when absent. */
  readonly perHa = input<Record<string, number | null>>({});
  /** Item codes in the portal's one order. */
  readonly order = input<readonly string[]>([]);

  protected readonly ordered = computed(() => inItemOrder(this.items(), this.order()));

  protected readonly formatQuantity = formatQuantity;
  protected readonly formatBand = formatBand;
}
