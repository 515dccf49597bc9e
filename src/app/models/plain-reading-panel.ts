import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { CautionNote } from '../shared/caution-note';
import {
  readBacktest,
  readElasticities,
  readingCaution,
  readShadowValues,
  type BacktestInput,
  type ReadingItem,
  type SampleDescription,
  type ShadowValueInput,
} from './plain-reading';

/** "What this model says", in sentences a board can read, with the caution that goes with them. */
@Component({
  selector: 'np-plain-reading-panel',
  imports: [CautionNote],
  template: `
    <p class="intro">
      Each line takes one price and says what happens when it rises by 10 % while every other price, the land and the trend stay where they were.
      @if (perHectare()) {
        Read from this run's per-hectare model, so the same shares hold for a farm of any size.
      }
    </p>
    <ul class="readings" aria-label="What the model says">
      @for (reading of elasticityReadings(); track reading.price) {
        <li>{{ reading.text }}</li>
      }
      @for (line of shadowReadings(); track $index) {
        <li>{{ line }}</li>
      }
    </ul>
    @if (skillText()) {
      <p class="backtest"><strong>How far to trust it:</strong> {{ skillText() }}</p>
    } @else if (backtestReadings().length) {
      <p class="backtest"><strong>How far to trust it:</strong> {{ backtestReadings().join(' ') }}</p>
    }
    <np-caution-note label="How to read this">
      <p>{{ caution() }}</p>
    </np-caution-note>
  `,
  styles: `
    :host {
      display: flex;
      flex-direction: column;
      gap: 12px;
    }
    .readings {
      margin: 0;
      padding-left: 20px;
      display: flex;
      flex-direction: column;
      gap: 6px;
      max-width: 90ch;
    }
    .intro {
      margin: 0;
      max-width: 90ch;
    }
    .backtest {
      margin: 0;
      max-width: 90ch;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PlainReadingPanel {
  // inputs
  readonly items = input.required<readonly ReadingItem[]>();
  readonly elasticities = input.required<number[][]>();
  readonly standardErrors = input<number[][] | null>(null);
  readonly shadowValues = input<readonly ShadowValueInput[]>([]);
  readonly currency = input('EUR');
  readonly backtest = input<readonly BacktestInput[]>([]);
  readonly backtestSeasons = input(0);
  readonly sample = input<SampleDescription | null>(null);
  /** The elasticities are the per-hectare model's (a per-hectare run). */
  readonly perHectare = input(false);
  /** The forecasting model's back-test in plain words (skill against the plain rules, band coverage); empty: none. */
  readonly skillText = input('');

  protected readonly elasticityReadings = computed(() => readElasticities([...this.items()], this.elasticities(), this.standardErrors()));
  protected readonly shadowReadings = computed(() => readShadowValues([...this.shadowValues()], this.currency()));
  protected readonly backtestReadings = computed(() => readBacktest([...this.items()], [...this.backtest()], this.backtestSeasons()));
  protected readonly caution = computed(() => readingCaution(this.sample()));
}
