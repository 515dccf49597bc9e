import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { BackTestResult, CoverageCount } from '../../../shared/forecast-types';
import { SPEC_WORDS } from '../../../shared/model-schemas';
import { skillSummary } from '../../../shared/skill-words';
import { ItemLabels } from './model-format';

interface Row {
  item: string;
  name: string;
  model: string;
  last: string;
  perHa: string;
  closer: string;
  beats: boolean;
  farms: string;
  thirds: string[];
  coop: string;
}

/** Errors to one decimal: medians of a few per cent differ in the decimal. */
const pct = (v: number | null | undefined) => (v == null || !Number.isFinite(v) ? '—' : `${v.toFixed(1)} %`);
const share = (c: CoverageCount) => (c.share === null ? '—' : `${Math.round(c.share * 100)} %`);

/**
 * The forecasting model's back-test in plain words and per item: its farm projections against the
 * two plain rules (last season's figure; the farm's own average per hectare × its land), and how
 * often its bands held what happened, by third of farm size and for the co-op total.
 */
@Component({
  selector: 'np-skill-section',
  template: `
    <p class="lead"><strong>How well it forecast:</strong> {{ summary().text }}</p>
    @if (summary().weakItems.length) {
      <div class="warn" role="note">
        <p><strong>Not better than a plain rule:</strong></p>
        <ul>
          @for (w of summary().weakItems; track w.item) {
            <li>{{ w.sentence }}</li>
          }
        </ul>
        <p>An outlook from this run warns about these items before it is published.</p>
      </div>
    }
    <p class="caption" id="skill-caption">
      Median farm error in the back-tested seasons ({{ specLabel() }}), and the share of outcomes inside the {{ level() }} % bands
    </p>
    <div class="scroll" tabindex="0" role="region" aria-label="Back-test against the plain rules, per item">
      <table aria-describedby="skill-caption">
        <thead>
          <tr>
            <th scope="col" rowspan="2">Item</th>
            <th scope="colgroup" colspan="3">Median farm error</th>
            <th scope="col" rowspan="2" class="num">Than the per-hectare rule</th>
            <th scope="colgroup" [attr.colspan]="thirdsByLand() ? 4 : 1">Farm outcomes inside the band</th>
            <th scope="col" rowspan="2" class="num">Co-op totals inside</th>
          </tr>
          <tr>
            <th scope="col" class="num">This model</th>
            <th scope="col" class="num">Last season's figure</th>
            <th scope="col" class="num">Per-hectare rule</th>
            <th scope="col" class="num">All farms</th>
            @if (thirdsByLand()) {
              <th scope="col" class="num">Smallest third</th>
              <th scope="col" class="num">Middle third</th>
              <th scope="col" class="num">Largest third</th>
            }
          </tr>
        </thead>
        <tbody>
          @for (r of rows(); track r.item) {
            <tr>
              <th scope="row">{{ r.name }}</th>
              <td class="num">{{ r.model }}</td>
              <td class="num">{{ r.last }}</td>
              <td class="num">{{ r.perHa }}</td>
              <td class="num" [class.bad]="!r.beats">{{ r.closer }}</td>
              <td class="num">{{ r.farms }}</td>
              @if (thirdsByLand()) {
                @for (t of r.thirds; track $index) {
                  <td class="num">{{ t }}</td>
                }
              }
              <td class="num">{{ r.coop }}</td>
            </tr>
          }
        </tbody>
      </table>
    </div>
    @if (thirdsByLand() && cuts(); as c) {
      <p class="np-muted small">Thirds of farm size: up to {{ c[0] }} ha, {{ c[0] }}–{{ c[1] }} ha, above {{ c[1] }} ha. Errors are of farms with a positive actual.</p>
    }
  `,
  styles: `
    :host { display: flex; flex-direction: column; gap: 10px; }
    p { margin: 0; max-width: 90ch; }
    .warn { border-left: 4px solid var(--mat-sys-error); padding: 4px 12px; background: var(--mat-sys-error-container); color: var(--mat-sys-on-error-container); border-radius: 4px; }
    .warn ul { margin: 4px 0; padding-left: 20px; }
    .scroll { overflow-x: auto; max-width: 100%; }
    table { border-collapse: collapse; font: var(--mat-sys-body-medium); min-width: 100%; }
    .caption { font: var(--mat-sys-label-large); color: var(--mat-sys-on-surface-variant); }
    th, td { padding: 6px 8px; border-bottom: 1px solid var(--mat-sys-outline-variant); text-align: left; white-space: nowrap; }
    thead th { font: var(--mat-sys-label-medium); color: var(--mat-sys-on-surface-variant); vertical-align: bottom; white-space: normal; min-width: 64px; }
    .num { text-align: right; font-variant-numeric: tabular-nums; }
    th[scope='colgroup'] { text-align: center; }
    .bad { color: var(--mat-sys-error); font-weight: 500; }
    .small { font: var(--mat-sys-body-small); }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SkillSection {
  // inputs
  readonly skill = input.required<BackTestResult>();
  readonly labels = input.required<ItemLabels>();

  protected readonly summary = computed(() => skillSummary(this.skill(), (c) => this.labels().name(c)));
  protected readonly level = computed(() => Math.round(this.skill().level * 100));
  protected readonly specLabel = computed(() => SPEC_WORDS[this.skill().spec].label.toLowerCase());
  protected readonly thirdsByLand = computed(() => this.skill().thirds.by === 'land');
  protected readonly cuts = computed(() => this.skill().thirds.cuts?.map((c) => Math.round(c)) ?? null);
  protected readonly rows = computed<Row[]>(() => {
    const words = new Map(this.summary().items.map((i) => [i.item, i]));
    return this.skill().items.map((it) => {
      const w = words.get(it.item)!;
      const gain = w.vsPerHectare ?? w.vsLastSeason;
      return {
        item: it.item,
        name: this.labels().name(it.item),
        model: pct(it.model.mdape),
        last: pct(it.rules.lastSeason.mdape),
        perHa: pct(it.rules.perHectare?.mdape),
        closer: gain === null ? '—' : gain >= 0 ? `${Math.round(gain * 100)} % closer` : `${Math.round(-gain * 100)} % further off`,
        beats: it.beatsRule,
        farms: share(it.coverage.farms),
        thirds: it.coverage.byThird.map(share),
        coop: it.coverage.coop.total ? `${it.coverage.coop.held} of ${it.coverage.coop.total}` : '—',
      };
    });
  });
}
