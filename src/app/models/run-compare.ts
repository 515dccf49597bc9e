import { RETURN_HEADING } from '../../../shared/return-words';
import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, resource, signal, untracked } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import type { Item } from '../../../shared/api-types';
import { SPEC_WORDS } from '../../../shared/model-schemas';
import { skillSummary } from '../../../shared/skill-words';
import { errorMessage } from '../core/api-error';
import { SettingsStore } from '../core/settings-store';
import { CautionNote } from '../shared/caution-note';
import { elasticityScaleLimit } from './colour-scale';
import { ElasticityTable, type MatrixItem } from './elasticity-table';
import { FORM_LABELS, ItemLabels, formatAmount, formatPercent, formatRatio, shortHash } from './model-format';
import type { FitRunResult } from '../../../shared/estimation-types';
import { type Evaluation, type ModelSummary, type RunDetail } from './models-api-types';
import { ModelsApi } from './models-api';

/** B against A in %, signed ("+1.2 %"), or a dash when either is missing or A is zero. */
function signedPercent(a: number | null, b: number | null): string {
  if (a === null || b === null || a === 0) return '—';
  const d = (100 * (b - a)) / Math.abs(a);
  return `${d > 0 ? '+' : ''}${formatPercent(d)}`;
}

interface Side {
  run: RunDetail;
  model: ModelSummary | null;
}

interface Point {
  prices: Record<string, number>;
  land: number | null;
}

/** `/models/compare?a=&b=`: two finished runs side by side: fit, elasticities and projections at the same prices. */
/** One run's back-test against the plain rules in a line: items beaten, farm coverage, co-op totals held. */
function skillLine(r: FitRunResult): string {
  if (!r.skill?.items.length) return 'none (run stored before forecasting models, or back-test off)';
  const s = skillSummary(r.skill, (c) => c);
  const beat = s.items.filter((i) => i.beatsRule).length;
  const cov = s.farmCoverage.share === null ? '' : `; ${Math.round(s.level * 100)} % bands held ${Math.round(s.farmCoverage.share * 100)} % of farm outcomes and ${s.coopCoverage.held} of ${s.coopCoverage.total} co-op totals`;
  return `beat the per-hectare rule for ${beat} of ${s.items.length} items${cov}`;
}

@Component({
  selector: 'np-run-compare',
  imports: [
    DatePipe,
    RouterLink,
    MatButton,
    MatFormField,
    MatLabel,
    MatHint,
    MatSuffix,
    MatIcon,
    MatInput,
    MatSelect,
    MatOption,
    MatProgressBar,
    CautionNote,
    ElasticityTable,
  ],
  templateUrl: './run-compare.html',
  styleUrl: './run-compare.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RunCompare {
  // services
  readonly #api = inject(ModelsApi);
  readonly #router = inject(Router);
  readonly #settings = inject(SettingsStore);

  // inputs (query parameters)
  readonly a = input<string | undefined>();
  readonly b = input<string | undefined>();

  protected readonly models = httpResource<ModelSummary[]>(() => '/api/models');
  protected readonly items = httpResource<Item[]>(() => '/api/items');
  protected readonly runA = httpResource<RunDetail>(() => (this.a() ? `/api/model-runs/${encodeURIComponent(this.a()!)}` : undefined));
  protected readonly runB = httpResource<RunDetail>(() => (this.b() ? `/api/model-runs/${encodeURIComponent(this.b()!)}` : undefined));

  protected readonly labels = computed(() => new ItemLabels(this.items.hasValue() ? this.items.value() : []));
  protected readonly currency = computed(() => this.#settings.settings()?.currency ?? 'EUR');
  protected readonly formLabels = FORM_LABELS;
  protected readonly shortHash = shortHash;
  protected readonly formatAmount = formatAmount;
  protected readonly formatRatio = formatRatio;
  protected readonly formatPercent = formatPercent;

  /** Finished runs to choose from, newest first. */
  protected readonly choices = computed(() =>
    (this.models.hasValue() ? this.models.value() : [])
      .flatMap((m) => m.runs.filter((r) => r.status === 'succeeded').map((r) => ({ id: r.id, model: m.name, at: r.finishedAt ?? r.createdAt })))
      .sort((x, y) => y.id - x.id),
  );

  readonly #modelOf = (run: RunDetail | null) => (run && this.models.hasValue() ? (this.models.value().find((m) => m.id === run.modelId) ?? null) : null);
  protected readonly sideA = computed<Side | null>(() => this.#side(this.runA.hasValue() ? this.runA.value() : null));
  protected readonly sideB = computed<Side | null>(() => this.#side(this.runB.hasValue() ? this.runB.value() : null));
  #side(run: RunDetail | null): Side | null {
    return run ? { run, model: this.#modelOf(run) } : null;
  }
  protected readonly both = computed(() => {
    const a = this.sideA();
    const b = this.sideB();
    return a?.run.result && b?.run.result ? { a, b, ra: a.run.result, rb: b.run.result } : null;
  });
  protected readonly problem = computed(() => {
    const e = this.runA.error() ?? this.runB.error() ?? this.models.error();
    if (e) return errorMessage(e);
    for (const [name, s] of [['A', this.sideA()], ['B', this.sideB()]] as const) {
      if (s && s.run.status !== 'succeeded') return `Run ${name} (#${s.run.id}) has not finished successfully (${s.run.status}); choose a finished run.`;
    }
    return null;
  });

  /** Every item of either model, in A's order then B's extra ones. */
  protected readonly unionItems = computed(() => {
    const both = this.both();
    if (!both) return [];
    const codes = [...both.ra.summary.items, ...both.rb.summary.items.filter((i) => !both.ra.summary.items.some((x) => x.name === i.name))];
    return codes.map((i) => ({ code: i.name, role: i.role, inA: both.ra.summary.items.some((x) => x.name === i.name), inB: both.rb.summary.items.some((x) => x.name === i.name) }));
  });

  protected readonly summaryRows = computed(() => {
    const both = this.both();
    if (!both) return [];
    const { a, b, ra, rb } = both;
    const mean = (xs: { mape: number }[]) => {
      const ok = xs.filter((x) => Number.isFinite(x.mape));
      return ok.length ? ok.reduce((s, x) => s + x.mape, 0) / ok.length : NaN;
    };
    const factors = (r: RunDetail) =>
      [r.definition.fixedFactors.includes('land_ha') ? 'land' : null, r.definition.trend ? 'trend' : null].filter(Boolean).join(' + ') || 'none';
    const sample = (r: RunDetail) => `${r.result!.fittedBySeason[0]?.season ?? '—'} – ${r.result!.fittedBySeason.at(-1)?.season ?? '—'}, ${r.observations} farm-seasons`;
    const curvature = (r: RunDetail) => {
      const c = r.result!.fit.curvature;
      return `${c.convexAtMeans && c.violatingObservations === 0 ? 'convex' : `not convex at ${c.violatingObservations} obs.`}${c.imposed ? ' (imposed)' : ''}`;
    };
    return [
      { label: 'Model', a: a.model?.name ?? `model ${a.run.modelId}`, b: b.model?.name ?? `model ${b.run.modelId}` },
      { label: 'Functional form', a: FORM_LABELS[ra.summary.form], b: FORM_LABELS[rb.summary.form] },
      { label: 'Numeraire', a: this.labels().name(ra.summary.numeraire), b: this.labels().name(rb.summary.numeraire) },
      { label: 'Items', a: `${ra.summary.items.length}`, b: `${rb.summary.items.length}` },
      { label: 'Fixed factors', a: factors(a.run), b: factors(b.run) },
      { label: 'Sample', a: sample(a.run), b: sample(b.run) },
      { label: 'Data snapshot', a: shortHash(a.run.dataHash), b: shortHash(b.run.dataHash) },
      { label: 'Software', a: `Netput ${a.run.softwareVersion}`, b: `Netput ${b.run.softwareVersion}` },
      { label: 'Coefficients estimated freely', a: `${ra.fit.parameterCount}`, b: `${rb.fit.parameterCount}` },
      { label: 'Log-likelihood (higher fits closer)', a: formatAmount(ra.fit.logLikelihood), b: formatAmount(rb.fit.logLikelihood) },
      { label: 'Akaike information criterion (lower is better)', a: formatAmount(ra.fit.aic), b: formatAmount(rb.fit.aic) },
      { label: 'Bayesian information criterion (lower is better)', a: formatAmount(ra.fit.bic), b: formatAmount(rb.fit.bic) },
      { label: 'Estimation', a: ra.fit.converged ? `settled after ${ra.fit.iterations} rounds` : 'did not converge', b: rb.fit.converged ? `settled after ${rb.fit.iterations} rounds` : 'did not converge' },
      { label: 'Curvature', a: curvature(a.run), b: curvature(b.run) },
      {
        label: 'Wrong-signed fitted quantities',
        a: formatPercent(100 * ra.fit.monotonicityViolationShare),
        b: formatPercent(100 * rb.fit.monotonicityViolationShare),
      },
      { label: 'Farms forecast', a: SPEC_WORDS[ra.spec ?? 'pooled'].label, b: SPEC_WORDS[rb.spec ?? 'pooled'].label },
      { label: 'Back-test against the plain rules', a: skillLine(ra), b: skillLine(rb) },
      {
        label: 'Back-test: mean absolute error',
        a: `${formatPercent(mean(ra.backtest.items))} over ${ra.backtest.seasons.length} seasons`,
        b: `${formatPercent(mean(rb.backtest.items))} over ${rb.backtest.seasons.length} seasons`,
      },
    ];
  });
  /** Likelihood-based statistics compare models only on the same quantities and the same observations. */
  protected readonly comparableLikelihood = computed(() => {
    const both = this.both();
    if (!both) return false;
    const itemsA = both.ra.summary.items.map((i) => i.name).sort().join();
    const itemsB = both.rb.summary.items.map((i) => i.name).sort().join();
    return itemsA === itemsB && both.a.run.dataHash === both.b.run.dataHash;
  });

  protected readonly itemRows = computed(() => {
    const both = this.both();
    if (!both) return [];
    const { ra, rb } = both;
    const own = (r: typeof ra, code: string) => {
      const i = r.summary.items.findIndex((x) => x.name === code);
      return i < 0 ? null : { e: r.summary.elasticities[i]![i]!, se: r.summary.elasticityStandardErrors[i]![i]! };
    };
    const r2 = (r: typeof ra, code: string) => r.fit.equations.find((e) => e.item === code)?.r2 ?? null;
    const mape = (r: typeof ra, code: string) => r.backtest.items.find((x) => x.item === code)?.mape ?? null;
    return this.unionItems().map((it) => ({
      code: it.code,
      name: this.labels().name(it.code),
      role: it.role,
      ownA: own(ra, it.code),
      ownB: own(rb, it.code),
      r2A: r2(ra, it.code),
      r2B: r2(rb, it.code),
      mapeA: mape(ra, it.code),
      mapeB: mape(rb, it.code),
    }));
  });

  protected readonly matrixA = computed<MatrixItem[]>(() => (this.both()?.ra.summary.items ?? []).map((i) => ({ code: i.name, name: this.labels().name(i.name), role: i.role })));
  protected readonly matrixB = computed<MatrixItem[]>(() => (this.both()?.rb.summary.items ?? []).map((i) => ({ code: i.name, name: this.labels().name(i.name), role: i.role })));
  /** One colour scale for both matrices, so equal colours mean equal numbers. */
  protected readonly sharedLimit = computed(() => {
    const both = this.both();
    return both ? elasticityScaleLimit([...both.ra.summary.elasticities.flat(), ...both.rb.summary.elasticities.flat()]) : 1;
  });

  // --- projections at the same prices ----------------------------------------------------
  /** Price fields as typed (text), by item code; land in ha. */
  protected readonly priceText = signal<Record<string, string>>({});
  protected readonly landText = signal('');
  protected readonly hasLand = computed(() => {
    const both = this.both();
    return !!both && both.ra.summary.fixedFactors.includes('land_ha') && both.rb.summary.fixedFactors.includes('land_ha');
  });
  protected readonly point = signal<Point | null>(null);
  /** Changes only when another pair of runs is shown (not when the model list reloads). */
  readonly #pairKey = computed(() => {
    const both = this.both();
    return both ? `${both.a.run.id}/${both.b.run.id}` : null;
  });
  protected readonly pointProblem = signal<string | null>(null);

  constructor() {
    // Start from A's sample-mean prices (B's for items only B has) and A's mean land, and project at once.
    effect(() => {
      if (this.#pairKey() === null) return;
      const both = untracked(this.both);
      if (!both) return;
      const prices: Record<string, string> = {};
      for (const r of [both.rb, both.ra]) for (const [k, v] of Object.entries(r.summary.evaluatedAt.prices)) prices[k] = this.#round(v);
      this.priceText.set(prices);
      const land = both.ra.summary.evaluatedAt.fixed['land_ha'];
      this.landText.set(land === undefined ? '' : land.toFixed(0));
      this.point.set(untracked(() => this.#parsePoint()));
    });
  }

  #round(v: number): string {
    return Number(v.toPrecision(4)).toString();
  }

  protected setPrice(code: string, text: string): void {
    this.priceText.update((p) => ({ ...p, [code]: text }));
  }

  #parsePoint(): Point | null {
    const prices: Record<string, number> = {};
    for (const [code, text] of Object.entries(this.priceText())) {
      const v = Number(text.replace(',', '.'));
      if (!(Number.isFinite(v) && v > 0)) {
        this.pointProblem.set(`The price of ${this.labels().name(code)} must be a number above zero (it reads "${text}").`);
        return null;
      }
      prices[code] = v;
    }
    let land: number | null = null;
    if (this.hasLand()) {
      const v = Number(this.landText().replace(',', '.'));
      if (!(Number.isFinite(v) && v > 0)) {
        this.pointProblem.set(`Land must be a number of hectares above zero (it reads "${this.landText()}").`);
        return null;
      }
      land = v;
    }
    this.pointProblem.set(null);
    return { prices, land };
  }

  protected project(): void {
    const p = this.#parsePoint();
    if (p) this.point.set(p);
  }

  protected readonly projection = resource({
    params: () => {
      const both = this.both();
      const point = this.point();
      return both && point ? { a: both.a.run, b: both.b.run, point } : undefined;
    },
    loader: async ({ params }): Promise<{ a: Evaluation; b: Evaluation }> => {
      const forRun = (run: RunDetail) => {
        const items = run.result!.summary.items.map((i) => i.name);
        const prices = Object.fromEntries(Object.entries(params.point.prices).filter(([k]) => items.includes(k)));
        const fixed: Record<string, number> = params.point.land !== null ? { land_ha: params.point.land } : {};
        return this.#api.evaluate(run.id, prices, fixed);
      };
      const [a, b] = await Promise.all([forRun(params.a), forRun(params.b)]);
      return { a, b };
    },
  });

  protected readonly projectionRows = computed(() => {
    if (!this.projection.hasValue()) return [];
    const { a, b } = this.projection.value();
    const qty = (ev: Evaluation, code: string) => {
      const i = ev.items.findIndex((x) => x.name === code);
      if (i < 0) return null;
      return ev.items[i]!.role === 'output' ? ev.netputs[i]! : -ev.netputs[i]!;
    };
    return this.unionItems().map((it) => {
      const qa = qty(a, it.code);
      const qb = qty(b, it.code);
      return {
        code: it.code,
        name: this.labels().name(it.code),
        unit: this.labels().unit(it.code),
        role: it.role,
        a: qa,
        b: qb,
        diffText: signedPercent(qa, qb),
      };
    });
  });
  protected readonly returnHeading = RETURN_HEADING;
  protected readonly returnNote = 'revenue less the modelled inputs only; land, machinery and other costs not deducted';
  protected readonly projectionProfit = computed(() => (this.projection.hasValue() ? this.projection.value() : null));
  protected readonly profitDiff = computed(() => {
    const p = this.projectionProfit();
    return p ? signedPercent(p.a.profit, p.b.profit) : '—';
  });

  protected choose(side: 'a' | 'b', id: number): void {
    void this.#router.navigate([], { queryParams: { [side]: id }, queryParamsHandling: 'merge' });
  }

  protected swap(): void {
    void this.#router.navigate([], { queryParams: { a: this.b(), b: this.a() } });
  }

  protected errorText(error: unknown): string {
    return errorMessage(error);
  }
}
