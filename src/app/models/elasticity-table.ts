import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { elasticityScaleLimit, scaleColour, scaleGradient } from './colour-scale';
import { formatRatio } from './model-format';

export interface MatrixItem {
  code: string;
  /** Shown in headers, e.g. "Nitrogen (N)". */
  name: string;
  role: 'output' | 'input';
}

/** 1.96: two-sided 95 % normal quantile. */
const Z95 = 1.96;

/**
 * A price-elasticity matrix as a colour-scaled table: row = the quantity that responds, column =
 * the price that moves, cell = % change of the row's quantity per 1 % rise of the column's price,
 * with its standard error. Cells within two standard errors of zero are outlined with dashes.
 */
@Component({
  selector: 'np-elasticity-table',
  templateUrl: './elasticity-table.html',
  styleUrl: './elasticity-table.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ElasticityTable {
  // inputs
  readonly items = input.required<readonly MatrixItem[]>();
  readonly elasticities = input.required<readonly (readonly number[])[]>();
  readonly standardErrors = input<readonly (readonly number[])[] | null>(null);
  readonly caption = input('Price elasticities');
  /** A fixed scale limit (e.g. shared by two tables side by side); default: see `elasticityScaleLimit`. */
  readonly limit = input<number | null>(null);

  protected readonly scale = computed(() => this.limit() ?? elasticityScaleLimit(this.elasticities().flat()));
  /** Some cells lie beyond the scale and show its end colours. */
  protected readonly clipped = computed(() => this.elasticities().some((row) => row.some((v) => Math.abs(v) > this.scale())));
  protected readonly gradient = scaleGradient();
  protected readonly rows = computed(() => {
    const items = this.items();
    const se = this.standardErrors();
    const limit = this.scale();
    return items.map((quantity, i) => ({
      quantity,
      what: quantity.role === 'output' ? 'supply' : 'use',
      cells: items.map((price, j) => {
        const value = this.elasticities()[i]?.[j] ?? NaN;
        const error = se?.[i]?.[j];
        const colour = scaleColour(value, limit);
        const uncertain = error !== undefined && Number.isFinite(error) && Math.abs(value) < Z95 * error;
        return {
          key: price.code,
          value: formatRatio(value),
          se: error === undefined ? null : formatRatio(error),
          own: i === j,
          uncertain,
          background: colour.background,
          text: colour.text,
          title:
            `A 1 % rise in the price of ${price.name} changes ${quantity.name} ${quantity.role === 'output' ? 'supply' : 'use'} by ${formatRatio(value)} %` +
            (error === undefined ? '' : ` (standard error ${formatRatio(error)})`) +
            (uncertain ? '; not clearly different from zero' : ''),
        };
      }),
    }));
  });
  protected readonly formatRatio = formatRatio;
}
