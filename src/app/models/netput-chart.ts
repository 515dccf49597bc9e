import { ChangeDetectionStrategy, Component, input, model } from '@angular/core';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatOption, MatSelect } from '@angular/material/select';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { EChartsCoreOption } from 'echarts/core';
import { ItemLabels } from './model-format';

/**
 * A chart of one netput with the choice of netput above it and the words about it (the content)
 * below: the parent draws the chart for the chosen `item` and describes it in `caption`.
 */
@Component({
  selector: 'np-netput-chart',
  imports: [MatFormField, MatLabel, MatSelect, MatOption, NgxEchartsDirective],
  template: `
    <mat-form-field class="pick">
      <mat-label>Netput</mat-label>
      <mat-select [value]="item()" (valueChange)="item.set($event)">
        @for (code of codes(); track code) {
          <mat-option [value]="code">{{ labels().name(code) }}</mat-option>
        }
      </mat-select>
    </mat-form-field>
    <div class="chart" echarts [options]="options()" [initOpts]="{ renderer: 'svg' }" role="img" [attr.aria-label]="caption()"></div>
    <ng-content />
  `,
  styles: `
    :host { display: flex; flex-direction: column; gap: 8px; }
    .pick { max-width: 320px; }
    .chart { height: 320px; width: 100%; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NetputChart {
  // inputs
  /** The netputs to choose from, by code. */
  readonly codes = input.required<readonly string[]>();
  readonly labels = input.required<ItemLabels>();
  readonly options = input.required<EChartsCoreOption>();
  /** The chart's description for screen readers. */
  readonly caption = input.required<string>();
  // two-way
  readonly item = model.required<string>();
}
