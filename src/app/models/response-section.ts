import { ChangeDetectionStrategy, Component, computed, inject, input, linkedSignal, resource } from '@angular/core';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatProgressBar } from '@angular/material/progress-bar';
import { NgxEchartsDirective } from 'ngx-echarts';
import { errorMessage } from '../core/api-error';
import { responseOption } from './chart-options';
import { quantityText } from '../../../shared/number-format';
import { formatAmount, ItemLabels } from './model-format';
import type { FitRunResult } from '../../../shared/estimation-types';
import { ModelsApi } from './models-api';

/** Points of a cross-price curve, each one evaluation by the server: half to one and a half times the mean price. */
const CROSS_POINTS = Array.from({ length: 11 }, (_, k) => 0.5 + k * 0.1);

interface Curve {
  prices: number[];
  quantities: number[];
}

/**
 * One netput as a function of one price, every other price, land and the trend at their sample
 * means. Own-price curves are stored with the run; a curve against another price is evaluated by
 * the server at 11 prices (GET /api/model-runs/:id/evaluate).
 */
@Component({
  selector: 'np-response-section',
  imports: [MatFormField, MatLabel, MatSelect, MatOption, MatProgressBar, NgxEchartsDirective],
  template: `
    <div class="picks">
      <mat-form-field>
        <mat-label>Quantity</mat-label>
        <mat-select [value]="quantity()" (valueChange)="quantity.set($event)">
          @for (item of items(); track item.name) {
            <mat-option [value]="item.name">{{ labels().name(item.name) }} {{ item.role === 'output' ? 'supply' : 'demand' }}</mat-option>
          }
        </mat-select>
      </mat-form-field>
      <mat-form-field>
        <mat-label>As a function of the price of</mat-label>
        <mat-select [value]="price()" (valueChange)="price.set($event)">
          @for (item of items(); track item.name) {
            <mat-option [value]="item.name">{{ labels().name(item.name) }}</mat-option>
          }
        </mat-select>
      </mat-form-field>
    </div>
    @if (cross.isLoading()) {
      <mat-progress-bar mode="indeterminate" aria-label="Evaluating the model at 11 prices" />
    }
    @if (cross.error(); as e) {
      <p class="np-error-text" role="alert">The curve could not be evaluated: {{ message(e) }}</p>
    }
    @if (curve(); as c) {
      <div class="chart" echarts [options]="options()!" [initOpts]="{ renderer: 'svg' }" role="img" [attr.aria-label]="caption()"></div>
      <p class="np-muted">{{ caption() }}. {{ words() }}</p>
    }
  `,
  styles: `
    :host { display: flex; flex-direction: column; gap: 8px; }
    .picks { display: flex; flex-wrap: wrap; gap: 8px 16px; }
    .picks mat-form-field { flex: 0 1 300px; }
    .chart { height: 320px; width: 100%; }
    p { margin: 0; font: var(--mat-sys-body-small); max-width: 90ch; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResponseSection {
  // services
  readonly #api = inject(ModelsApi);

  // inputs
  readonly runId = input.required<number>();
  readonly result = input.required<FitRunResult>();
  readonly labels = input.required<ItemLabels>();
  readonly currency = input('EUR');

  protected readonly items = computed(() => this.result().summary.items);
  protected readonly quantity = linkedSignal(() => this.items().find((i) => i.role === 'input')?.name ?? this.items()[0]?.name ?? '');
  /** Starts on the quantity's own price; follows the quantity until the planner picks another price. */
  protected readonly price = linkedSignal(() => this.quantity());

  readonly #meanPrice = computed(() => {
    const i = this.items().findIndex((x) => x.name === this.price());
    return this.result().fit.means.prices[i] ?? NaN;
  });

  protected readonly cross = resource({
    params: () => (this.price() === this.quantity() ? undefined : { run: this.runId(), price: this.price(), quantity: this.quantity(), mean: this.#meanPrice() }),
    loader: async ({ params }): Promise<Curve> => {
      const prices = CROSS_POINTS.map((f) => f * params.mean);
      const answers = await Promise.all(prices.map((p) => this.#api.evaluate(params.run, { [params.price]: p })));
      const i = answers[0]!.items.findIndex((x) => x.name === params.quantity);
      const sign = answers[0]!.items[i]!.role === 'output' ? 1 : -1;
      return { prices, quantities: answers.map((a) => sign * a.netputs[i]!) };
    },
  });

  protected readonly curve = computed<Curve | null>(() => {
    if (this.price() === this.quantity()) {
      const stored = this.result().responseCurves.find((c) => c.item === this.quantity());
      return stored ? { prices: stored.prices, quantities: stored.quantities } : null;
    }
    return this.cross.hasValue() ? this.cross.value() : null;
  });

  protected readonly caption = computed(() => {
    const l = this.labels();
    const q = this.items().find((i) => i.name === this.quantity());
    return `${l.name(this.quantity())} ${q?.role === 'output' ? 'supply' : 'demand'} against the price of ${l.name(this.price())}`;
  });

  protected readonly words = computed(() => {
    const c = this.curve();
    if (!c || c.prices.length < 2) return '';
    const l = this.labels();
    const unit = l.unit(this.quantity());
    const pu = l.priceUnit(this.price(), this.currency());
    return (
      `Every other price, the land and the trend stay at their sample means. ` +
      `From ${formatAmount(c.prices[0])} to ${formatAmount(c.prices.at(-1))} ${pu} (half to one and a half times the mean), ` +
      `an average farm's quantity goes from about ${quantityText(c.quantities[0])} to ${quantityText(c.quantities.at(-1)!)} ${unit}.`
    );
  });

  protected readonly options = computed(() => {
    const c = this.curve();
    if (!c) return null;
    const l = this.labels();
    return responseOption(c.prices, c.quantities, `Price of ${l.name(this.price())} (${l.priceUnit(this.price(), this.currency())})`, l.withUnit(this.quantity()), this.#meanPrice());
  });

  protected message(error: unknown): string {
    return errorMessage(error);
  }
}
