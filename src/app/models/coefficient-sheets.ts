import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { spreadsheetSafe } from '../data-desk/data-grid';
import { readEquations, type CoefficientLine } from './coefficient-reading';
import { formatAmount, formatSignificant, ItemLabels } from './model-format';
import type { FitRunResult } from '../../../shared/estimation-types';

const VERDICT_WORDS: Record<CoefficientLine['verdict'], string> = {
  above: 'clearly above zero',
  below: 'clearly below zero',
  unclear: 'could be zero',
};

/**
 * The fitted coefficients, one sheet per netput equation: what each one measures in plain words,
 * its value in the sign of the quantity shown (supply, or use for inputs), and its uncertainty as a
 * 95 % range drawn as a bar against zero.
 */
@Component({
  selector: 'np-coefficient-sheets',
  imports: [MatButton, MatIcon],
  template: `
    <div class="intro">
      <p>
        @if (perHectare()) {
          Each netput equation says how one quantity <strong>per hectare</strong> of a farm's land moves with prices and trend. This run's
          model is per hectare: a farm's figure is its land times the per-hectare figure, plus the farm's own level (shown on the forecast, not
          here). Values are per hectare and season in the item's unit,
        } @else {
          Each netput equation says how one quantity moves with prices, land and trend. Values are per farm and season in the item's unit,
        }
        turned so they read as <strong>supply</strong> for what farms sell and <strong>use</strong> for what they buy: a positive value always
        means more of the quantity shown. The bar is the 95 % range (two standard errors either side); when it crosses the zero line the data
        cannot tell the effect from none.
      </p>
      <button matButton="outlined" type="button" (click)="exportCsv()">
        <mat-icon>download</mat-icon>
        Export CSV
      </button>
    </div>
    @for (eq of equations(); track eq.item) {
      <section class="sheet" [attr.aria-labelledby]="'eq-' + eq.item">
        <header>
          <h3 [id]="'eq-' + eq.item">{{ eq.title }} <span class="unit">{{ eq.unit ? eq.unit + (perHectare() ? '' : ' per farm') : '' }}</span></h3>
          <p class="fit">
            Follows {{ (eq.r2 * 100).toFixed(0) }} % of the variation between farm-seasons{{ perHectare() ? ' per hectare, farm and season effects included' : '' }}; a typical miss is
            {{ formatAmount(eq.rmse) }} {{ eq.unit }}.
          </p>
        </header>
        <ul class="lines" role="list">
          <li class="line head" aria-hidden="true">
            <span>What it measures</span>
            <span class="num">Value ({{ eq.role === 'output' ? '+ more supplied' : '+ more used' }})</span>
            <span class="num">95 % range</span>
            <span class="bar-head">against zero</span>
          </li>
          @for (line of eq.lines; track line.parameter + line.meaning) {
            <li class="line" [attr.data-verdict]="line.verdict">
              <span class="meaning">
                {{ line.meaning }}
                <span class="param">
                  {{ line.parameter }}{{ line.sharedWith.length ? ' · tied to the same figure in ' + line.sharedWith.join(', ') : '' }}
                </span>
              </span>
              <span class="num value"><span class="np-sr-only">value </span>{{ signed(line.value) }}</span>
              <span class="num range"><span class="np-sr-only">95 % range </span>{{ signed(line.low) }} to {{ signed(line.high) }}</span>
              <span class="bar" aria-hidden="true">
                <span class="track">
                  <span class="zero" [style.left.%]="scale(line).zero"></span>
                  <span class="span" [style.left.%]="scale(line).low" [style.width.%]="scale(line).width"></span>
                  <span class="dot" [style.left.%]="scale(line).value"></span>
                </span>
              </span>
              <span class="verdict">{{ verdictWords[line.verdict] }}<span class="np-sr-only">; standard error {{ formatSignificant(line.standardError) }}</span></span>
            </li>
          }
        </ul>
      </section>
    }
  `,
  styles: `
    :host { display: flex; flex-direction: column; gap: var(--np-space-l); }
    .intro { display: flex; flex-wrap: wrap; gap: var(--np-space-m) var(--np-space-xl); align-items: flex-start; }
    .intro p { margin: 0; max-width: 86ch; flex: 1 1 420px; color: var(--np-loam-soft); }
    .sheet { background: var(--np-card); border-radius: var(--np-radius-sheet); box-shadow: 0 0 0 1px var(--np-furrow); border-top: 3px solid var(--np-field); padding: var(--np-space-m) var(--np-space-l) var(--np-space-s); }
    header { display: flex; flex-wrap: wrap; align-items: baseline; gap: var(--np-space-xs) var(--np-space-l); margin-bottom: var(--np-space-s); }
    h3 { font-size: var(--np-type-lead); color: var(--np-field-deep); }
    .unit { font-family: var(--np-font-text); font-size: var(--np-type-small); font-weight: 400; color: var(--np-loam-soft); }
    .fit { margin: 0; font-size: var(--np-type-small); color: var(--np-loam-soft); }
    .lines { list-style: none; margin: 0; padding: 0; }
    .line { display: grid; grid-template-columns: minmax(200px, 1fr) 100px 190px 180px; grid-template-areas: 'meaning value range bar' 'meaning . . verdict'; column-gap: var(--np-space-m); align-items: center; padding: 6px 0; border-bottom: 1px dotted var(--np-furrow); }
    .line:last-child { border-bottom: none; }
    .line.head { grid-template-areas: 'meaning value range bar'; font-size: 12px; font-weight: 700; letter-spacing: 0.04em; text-transform: uppercase; color: var(--np-loam-soft); border-bottom: 2px solid var(--np-field); padding-top: 0; }
    .line.head > :first-child { grid-area: meaning; }
    .meaning { grid-area: meaning; }
    .param { display: block; font-size: 12px; color: var(--np-loam-soft); font-family: var(--np-font-mono); }
    .num { text-align: right; font-variant-numeric: tabular-nums; }
    .value { grid-area: value; font-weight: 650; }
    .range { grid-area: range; color: var(--np-loam-soft); font-size: var(--np-type-small); }
    .bar, .bar-head { grid-area: bar; }
    .verdict { grid-area: verdict; font-size: 12px; color: var(--np-loam-soft); }
    [data-verdict='unclear'] .verdict { color: var(--np-grain-text); }
    .track { position: relative; display: block; height: 14px; }
    .zero { position: absolute; top: -2px; bottom: -2px; width: 2px; margin-left: -1px; background: var(--np-loam); }
    .span { position: absolute; top: 4px; height: 6px; border-radius: 3px; background: var(--np-river); opacity: 0.55; }
    [data-verdict='unclear'] .span { background: var(--np-grain); }
    .dot { position: absolute; top: 2px; width: 10px; height: 10px; margin-left: -5px; border-radius: 50%; background: var(--np-field-deep); }
    @media (max-width: 719.98px) {
      .line { grid-template-columns: 1fr 1fr; grid-template-areas: 'meaning meaning' 'value range' 'bar bar' 'verdict verdict'; row-gap: 4px; }
      .line.head { display: none; }
      .value { text-align: left; }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CoefficientSheets {
  // inputs
  readonly result = input.required<FitRunResult>();
  readonly labels = input.required<ItemLabels>();
  readonly runId = input.required<number>();

  protected readonly formatAmount = formatAmount;
  protected readonly formatSignificant = formatSignificant;
  protected readonly verdictWords = VERDICT_WORDS;

  /** A per-hectare run shows its forecasting model's per-hectare profit function, not the farm-totals fit. */
  protected readonly perHectare = computed(() => {
    const r = this.result();
    return r.spec === 'per-hectare' && r.forecast?.spec === 'per-hectare' && !!r.forecast.fit;
  });

  protected readonly equations = computed(() => {
    const r = this.result();
    if (this.perHectare()) {
      const f = r.forecast!.fit;
      return readEquations(f.equations, f.layout.form, this.labels(), f.layout.factors, true);
    }
    return readEquations(r.fit.equations, r.summary.form, this.labels(), [...r.summary.fixedFactors, ...(r.summary.trend ? ['trend'] : [])]);
  });

  protected signed(v: number): string {
    return formatSignificant(v, 3).replace('-', '−');
  }

  /** Where zero, the range and the value sit on a row's own bar, in % of its width (zero always in view). */
  protected scale(line: CoefficientLine): { zero: number; low: number; width: number; value: number } {
    const lo = Math.min(line.low, 0);
    const hi = Math.max(line.high, 0);
    const span = hi - lo || 1;
    const at = (v: number) => 4 + (92 * (v - lo)) / span;
    return { zero: at(0), low: at(line.low), width: at(line.high) - at(line.low), value: at(line.value) };
  }

  protected exportCsv(): void {
    const rows = [['equation', 'what it measures', 'parameter', this.perHectare() ? 'value per hectare (supply or use)' : 'value (supply or use)', 'standard error', 'range low (95 %)', 'range high (95 %)', 'estimate as fitted (inputs negative)']];
    for (const eq of this.equations())
      for (const l of eq.lines) rows.push([eq.title, l.meaning, l.parameter, String(l.value), String(l.standardError), String(l.low), String(l.high), String(l.raw.estimate)]);
    const csv = rows.map((r) => r.map((cell, k) => `"${String(k < 3 ? spreadsheetSafe(cell) : cell).replace(/"/g, '""')}"`).join(',')).join('\r\n');
    const url = URL.createObjectURL(new Blob([csv], { type: 'text/csv;charset=utf-8' }));
    const link = document.createElement('a');
    link.href = url;
    link.download = `netput-run-${this.runId()}-coefficients.csv`;
    link.click();
    URL.revokeObjectURL(url);
  }
}
