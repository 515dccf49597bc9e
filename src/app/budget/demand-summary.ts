import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { RouterLink } from '@angular/router';
import { formatMass, formatPrice, formatPricePer, formatRatio } from './budget-format';
import { NUTRIENT_LABEL, NUTRIENTS, type BudgetResult, type Nutrient } from './budget-api-types';
import { unitLabels } from './budget-units';

const ELASTICITY_SOURCE: Record<BudgetResult['demand']['elasticitySource'], string> = {
  'model-run': "the model run's co-op elasticities at the expected prices",
  outlook: "the outlook's model run at the published prices and farms",
  contracts:
    "contracting farms: the cost side's conditional responses at their contracted tonnage (only the input mix moves); every other farm: the outlook's model run at the outlook's farms",
  given: 'entered with the demand',
  none: 'none: price scenarios change prices but hold the demand fixed',
};

const REFERENCE_BASIS: Record<BudgetResult['referencePrices']['basis'][Nutrient], string> = {
  given: 'given',
  'model-run': "the model's expected price",
  products: 'cheapest product',
  none: 'none',
};

/** Where a budget's demand comes from, the base nutrient demand and the elasticities the scenarios use. */
@Component({
  selector: 'np-demand-summary',
  imports: [DatePipe, RouterLink],
  templateUrl: './demand-summary.html',
  styleUrl: './demand-summary.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DemandSummary {
  // inputs
  readonly result = input.required<BudgetResult>();

  protected readonly nutrients = NUTRIENTS;
  protected readonly nutrientLabel = NUTRIENT_LABEL;
  protected readonly formatMass = formatMass;
  protected readonly formatRatio = formatRatio;

  protected readonly labels = computed(() => unitLabels(this.result().unitSystem, this.result().currency));
  protected readonly detail = computed(() => this.result().source.detail);
  protected readonly kind = computed(() => this.result().source.kind);
  protected readonly elasticitySource = computed(() => ELASTICITY_SOURCE[this.result().demand.elasticitySource]);
  protected readonly bands = computed(() => this.detail().bands ?? null);
  /**
   * "Wheat EUR 212.10/t (last season); Nitrogen (N) EUR 1.322/kg N (given); ..." in the items' own
   * units, formatted as the reference prices are (formatPrice), so one price reads the same on both lines.
   * Results saved before item names came with them show the item codes.
   */
  protected readonly prices = computed(() => {
    const d = this.detail();
    const currency = this.result().currency;
    return Object.entries(d.prices ?? {})
      .map(([code, value]) => {
        const item = d.priceItems?.[code];
        const basis = d.priceBasis?.[code] ? ` (${d.priceBasis[code]})` : '';
        return `${item?.name ?? code} ${formatPricePer(value, currency, item?.unit ?? '')}${basis}`;
      })
      .join('; ');
  });
  protected readonly references = computed(() =>
    NUTRIENTS.map((n) => ({
      label: NUTRIENT_LABEL[n],
      value: formatPrice(this.result().referencePrices.values[n], this.result().currency),
      basis: REFERENCE_BASIS[this.result().referencePrices.basis[n]],
    })),
  );
  /** A contract-based budget: the same outlook's unconditional demand, "N 41,200 kg · P2O5 …". */
  protected readonly outlookBasis = computed(() => {
    const o = this.detail().outlookDemand;
    if (!o) return null;
    const l = this.labels();
    return NUTRIENTS.map((n) => `${this.nutrientLabel[n]} ${formatMass(o[n])} ${l.nutrient(n)}`).join(' · ');
  });
  protected readonly farms = computed(() => this.detail().farms?.length ?? null);
  /** The plain reading of nitrogen's own-price elasticity (docs/profit-functions.md §9: "a 10 % rise in the nitrogen price..."). */
  protected readonly plainReading = computed(() => {
    const e = this.result().demand.elasticities?.nitrogen.nitrogen;
    if (e === undefined || !Number.isFinite(e)) return null;
    const pct = Math.abs(e * 10).toFixed(1);
    const held = this.kind() === 'contracted' ? ', with the contracted output held at its tonnage' : '';
    return `A 10 % rise in the nitrogen price goes with about a ${pct} % ${e < 0 ? 'fall' : 'rise'} in the co-op's nitrogen use${held}, other things equal.`;
  });

  protected element(n: Nutrient): string | null {
    const r = this.result();
    if (n === 'phosphate') return `${formatMass(r.demand.elements.p)} ${this.labels().mass} P`;
    if (n === 'potash') return `${formatMass(r.demand.elements.k)} ${this.labels().mass} K`;
    return null;
  }
}
