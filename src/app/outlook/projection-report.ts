import { ChangeDetectionStrategy, Component, computed, input, linkedSignal } from '@angular/core';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSlideToggle } from '@angular/material/slide-toggle';
import { DeliveriesCapacity } from './deliveries-capacity';
import { FanChart, fanInputFor } from './fan-chart';
import { FarmsGrid } from './farms-grid';
import { describeFixed, describeFixedSource, formatPrice, formatShare, landSentence } from './outlook-format';
import { SCENARIO_NAMES, scenarioLabel, type CoopProjection, type FarmOutlook, type ItemExpectation, type ScenarioPrices } from './outlook-api-types';
import { ProjectionGrid } from './projection-grid';

/** Recorded seasons before the fan: enough to see the trend, few enough that the projected season stands out. */
export const FAN_HISTORY = 12;

/**
 * The projection of a season as staff read it (draft or published version): the co-op's supply and
 * input demand per scenario with bands, deliveries against capacity, fan charts, and every farm at its
 * own fixed factors with one farm's detail.
 */
@Component({
  selector: 'np-projection-report',
  imports: [MatFormField, MatLabel, MatSelect, MatOption, MatSlideToggle, ProjectionGrid, DeliveriesCapacity, FanChart, FarmsGrid],
  templateUrl: './projection-report.html',
  styleUrl: './projection-report.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProjectionReport {
  // inputs
  readonly coop = input.required<CoopProjection>();
  readonly farms = input<readonly FarmOutlook[]>([]);
  readonly season = input.required<string>();
  readonly draws = input<number | null>(null);
  /** What the band covers, in words (null for projections made before it was recorded). */
  readonly bandWords = input<string | null>(null);
  readonly scenarios = input<readonly ScenarioPrices[]>([]);
  readonly scenarioRuleText = input('');
  /** The expected prices the scenarios were made from: they carry each item's price unit. */
  readonly expectations = input<readonly ItemExpectation[]>([]);
  /** Prefix of exported file names, e.g. "netput-outlook-2026-27-v1". */
  readonly filePrefix = input('netput-outlook');

  protected readonly tonnes = linkedSignal(() => false);
  protected readonly items = computed(() => this.coop().items);
  /** The item the fan charts show; the first output to begin with. */
  protected readonly item = linkedSignal(() => (this.coop().items.find((i) => i.role === 'output') ?? this.coop().items[0])?.item ?? '');
  protected readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  protected readonly farm = computed(() => this.farms().find((f) => f.farmId === this.farmId()) ?? null);
  protected readonly describeFixed = describeFixed;
  protected readonly describeFixedSource = describeFixedSource;
  protected readonly landSentence = landSentence;

  protected readonly coopFan = computed(() => {
    const it = this.coop().items.find((i) => i.item === this.item());
    return it ? fanInputFor(it, this.coop().history, this.season(), { maxHistory: FAN_HISTORY }) : null;
  });
  protected readonly farmFan = computed(() => {
    const f = this.farm();
    const it = f?.items.find((i) => i.item === this.item());
    return f && it ? fanInputFor(it, f.history, this.season(), { maxHistory: FAN_HISTORY }) : null;
  });

  /** Item × scenario prices the projection was made at, each with its unit ("EUR/t", "EUR/kg N"). */
  protected readonly priceRows = computed(() => {
    const byName = new Map(this.scenarios().map((s) => [s.name, s]));
    const unitOf = new Map(this.expectations().map((e) => [e.item, e.priceUnit]));
    return this.coop().items.map((it) => ({
      name: it.name,
      unit: unitOf.get(it.item) ?? '',
      prices: SCENARIO_NAMES.map((n) => formatPrice(byName.get(n)?.prices[it.item])),
    }));
  });
  protected readonly curvature = computed(() =>
    SCENARIO_NAMES.map((n) => this.scenarios().find((s) => s.name === n))
      .filter((s): s is ScenarioPrices => !!s)
      .map((s) => ({ label: scenarioLabel(s.name), share: formatShare(s.curvatureViolationShare) })),
  );
  protected readonly scenarioNames = SCENARIO_NAMES;
  protected readonly scenarioLabel = scenarioLabel;
  protected readonly fileSafeSeason = computed(() => this.season().replace('/', '-'));
}
