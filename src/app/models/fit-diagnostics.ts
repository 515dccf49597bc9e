import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { formatAmount, formatPercent, formatRatio, formatSignificant, ItemLabels } from './model-format';
import type { FitRunResult } from '../../../shared/estimation-types';

/** The curvature and monotonicity report of a fit, and the figures for weighing it against another model. */
@Component({
  selector: 'np-fit-diagnostics',
  templateUrl: './fit-diagnostics.html',
  styleUrl: './fit-diagnostics.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FitDiagnostics {
  // inputs
  readonly result = input.required<FitRunResult>();
  readonly labels = input.required<ItemLabels>();

  protected readonly formatSignificant = formatSignificant;
  protected readonly formatPercent = formatPercent;
  protected readonly formatAmount = formatAmount;
  protected readonly formatRatio = formatRatio;

  protected readonly curvature = computed(() => this.result().fit.curvature);
  protected readonly observations = computed(() => this.result().fit.observations);

  /** The curvature finding in words. */
  protected readonly curvatureWords = computed(() => {
    const c = this.curvature();
    const n = this.observations();
    const lines: string[] = [];
    if (c.convexAtMeans && c.violatingObservations === 0) {
      lines.push(
        c.global
          ? 'Profit is convex in prices at the sample means, and for this form that means everywhere: every price response points the way theory requires of a profit function.'
          : `Profit is convex in prices at the sample means and at each of the ${n} observations: every price response points the way theory requires.`,
      );
    } else {
      lines.push(
        `Profit is not convex in prices ${c.convexAtMeans ? '' : 'at the sample means and '}at ${c.violatingObservations} of ${n} observations (${formatPercent(100 * c.violationShare)}): ` +
          'some price responses point the wrong way there, so read those elasticities with extra caution.',
      );
    }
    if (c.imposed) {
      const top = Math.max(0, ...c.eigenvalues);
      const flat = c.eigenvalues.filter((v) => v <= 1e-6 * top).length;
      const flatWords = flat === 1 ? 'one flat curvature direction' : `${flat} flat curvature directions`;
      lines.push(
        `The unrestricted estimate was not convex, so convexity was imposed (B = LL′)${c.binding ? `; the restriction binds, leaving ${flatWords}` : ''}. Imposing it changes the estimates.`,
      );
      if (c.optimality?.satisfied === false || c.converged === false)
        lines.push(
          'The convexity-constrained fit did not converge: its optimality conditions do not hold, so these are not the best convex estimates. Read them with caution and try another numeraire or trend setting.',
        );
      else if (c.optimality?.satisfied) lines.push('The constrained fit passed its optimality check (the Karush–Kuhn–Tucker conditions): no nearby convex estimate fits the data better.');
    } else if (!c.unrestrictedConvex) {
      lines.push('The estimate breaks convexity and it was not imposed (the definition asks only to check).');
    }
    return lines;
  });

  protected readonly monotonicity = computed(() =>
    this.result().fit.monotonicity.map((m) => ({
      ...m,
      name: this.labels().name(m.item),
      expected: m.role === 'output' ? 'positive supply' : 'positive use',
    })),
  );
  protected readonly monotonicityWords = computed(() => {
    const share = this.result().fit.monotonicityViolationShare;
    const bad = this.monotonicity().filter((m) => m.violations > 0);
    if (bad.length === 0) return `Every fitted quantity has the right sign in all ${this.observations()} farm-seasons.`;
    return (
      `${formatPercent(100 * share)} of farm-seasons have at least one fitted quantity of the wrong sign: ` +
      bad.map((m) => `${m.name} in ${m.violations}`).join(', ') +
      '.'
    );
  });
}
