import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { formatBand, formatQuantity, formatShare } from './outlook-format';
import { SCENARIO_NAMES, scenarioLabel, type CoopProjection, type ItemProjection } from './outlook-api-types';

/** Deliveries to the co-op in tonnes, per scenario, against its storage and daily handling capacity. */
@Component({
  selector: 'np-deliveries-capacity',
  template: `
    @if (coop().deliveries; as d) {
      <p class="lead">
        Grain and oilseed delivered ({{ itemNames() }}), in tonnes, against the storage of
        @if (coop().capacity; as c) {
          {{ formatQuantity(c.storageCapacityT) }} t and an intake of {{ formatQuantity(c.handlingCapacityTPerDay) }} t a day
        }
        entered in the co-op settings.
      </p>
      <div class="np-table-scroll" tabindex="0">
        <table aria-label="Deliveries against capacity">
          <thead>
            <tr>
              <th scope="col">Scenario</th>
              <th scope="col" class="num">Delivered, t</th>
              <th scope="col" class="num">5–95 %, t</th>
              <th scope="col" class="num">Share of storage</th>
              <th scope="col" class="num">Days of intake</th>
            </tr>
          </thead>
          <tbody>
            @for (s of rows(); track s.name) {
              <tr [class.over]="s.over">
                <th scope="row">{{ s.label }}</th>
                <td class="num">{{ formatQuantity(s.total.point) }}</td>
                <td class="num">{{ formatBand(s.total) }}</td>
                <td class="num">
                  @if (s.storage; as st) {
                    {{ formatShare(st.point) }} <span class="np-muted">({{ formatShare(st.p5) }}–{{ formatShare(st.p95) }})</span>
                  } @else {
                    —
                  }
                </td>
                <td class="num">
                  @if (s.days; as dd) {
                    {{ formatQuantity(dd.point) }} <span class="np-muted">({{ formatQuantity(dd.p5) }}–{{ formatQuantity(dd.p95) }})</span>
                  } @else {
                    —
                  }
                </td>
              </tr>
            }
          </tbody>
        </table>
      </div>
      @if (anyOver()) {
        <p class="warn" role="note">At the 95 % point of at least one scenario the season's deliveries exceed the storage capacity.</p>
      }
      <p class="np-muted small">{{ coop().capacity?.note }} {{ d.bandNote }}</p>
    } @else {
      <p class="np-muted">The model has no output counted in tonnes, so there are no deliveries to compare with the stores.</p>
    }
  `,
  styles: `
    @use '../shared/tables';
    :host {
      display: block;
    }
    .lead,
    .small,
    .warn {
      margin: 0 0 8px;
    }
    .small {
      font: var(--mat-sys-body-small);
      margin-top: 8px;
    }
    .warn {
      margin-top: 8px;
      color: var(--mat-sys-error);
    }
    table {
      @include tables.figures($head-font: var(--mat-sys-label-large));
    }
    tr.over td:nth-child(4) {
      color: var(--mat-sys-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeliveriesCapacity {
  // inputs
  readonly coop = input.required<CoopProjection>();

  protected readonly formatQuantity = formatQuantity;
  protected readonly formatShare = formatShare;
  protected readonly formatBand = formatBand;

  protected readonly itemNames = computed(() => {
    const d = this.coop().deliveries;
    if (!d) return '';
    const byCode = new Map<string, ItemProjection>(this.coop().items.map((i) => [i.item, i]));
    return d.items.map((c) => byCode.get(c)?.name ?? c).join(', ');
  });

  protected readonly rows = computed(() => {
    const c = this.coop();
    const d = c.deliveries;
    if (!d) return [];
    return SCENARIO_NAMES.filter((s) => d.scenarios[s]).map((s) => {
      const storage = c.capacity?.scenarios[s]?.storageShare ?? null;
      return { name: s, label: scenarioLabel(s), total: d.scenarios[s]!, storage, days: c.capacity?.scenarios[s]?.handlingDays ?? null, over: !!storage && storage.p95 > 1 };
    });
  });
  protected readonly anyOver = computed(() => this.rows().some((r) => r.over));
}
