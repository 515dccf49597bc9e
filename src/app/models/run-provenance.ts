import { DatePipe, LowerCasePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { RouterLink } from '@angular/router';
import { CURVATURE_LABELS, FORM_LABELS, ItemLabels, sampleSeasons, shortHash } from './model-format';
import { type RunDetail } from './models-api-types';

/** How many excluded observations show before "Show all". */
const EXCLUDED_SHOWN = 8;

/** Where a run's numbers come from: the data snapshot, the options, the software, the sample, who and when. */
@Component({
  selector: 'np-run-provenance',
  imports: [DatePipe, LowerCasePipe, RouterLink, MatButton],
  templateUrl: './run-provenance.html',
  styleUrl: './run-provenance.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RunProvenance {
  // inputs
  readonly run = input.required<RunDetail>();
  readonly labels = input.required<ItemLabels>();
  /** The run this one repeats, once loaded. */
  readonly original = input<RunDetail | null>(null);

  protected readonly shortHash = shortHash;
  protected readonly formLabels = FORM_LABELS;
  protected readonly curvatureLabels = CURVATURE_LABELS;
  protected readonly sampleSeasons = sampleSeasons;
  protected readonly showAllExcluded = signal(false);

  protected readonly items = computed(() =>
    this.run()
      .definition.items.map((c) => this.labels().name(c))
      .join(', '),
  );
  protected readonly sample = computed(() => {
    const r = this.run().result;
    if (!r) return null;
    const seasons = r.fittedBySeason.map((s) => s.season);
    const farms = new Set(r.residuals.map((x) => x.farm).filter((f): f is string => f !== null));
    return { seasons: seasons.length, first: seasons[0] ?? '—', last: seasons.at(-1) ?? '—', farms: farms.size };
  });
  protected readonly excluded = computed(() => {
    const all = this.run().excluded ?? [];
    return this.showAllExcluded() ? all : all.slice(0, EXCLUDED_SHOWN);
  });
  protected readonly excludedReasons = computed(() => {
    const counts = new Map<string, number>();
    for (const e of this.run().excluded ?? []) counts.set(e.reason, (counts.get(e.reason) ?? 0) + 1);
    return [...counts].map(([reason, count]) => ({ reason, count })).sort((a, b) => b.count - a.count);
  });
  protected readonly by = computed(() => {
    const r = this.run();
    return r.createdByName ?? (r.createdBy === null ? 'an account that no longer exists' : `user #${r.createdBy}`);
  });
  /** For a repeated run: are the coefficients exactly those of the run it repeats? */
  protected readonly sameAsOriginal = computed(() => {
    const a = this.run().result?.fit.theta;
    const o = this.original();
    const b = o?.result?.fit.theta;
    if (!a || !b || !o) return null;
    const equal = a.length === b.length ? a.filter((v, i) => v === b[i]).length : 0;
    return { equal, total: a.length, identical: equal === a.length && a.length === b.length, sameData: o.dataHash === this.run().dataHash };
  });
}
