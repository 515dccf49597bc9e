import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal, viewChild } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogClose, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatProgressBar } from '@angular/material/progress-bar';
import { ApiRequestError, errorMessage } from '../core/api-error';
import { ExpectationForm } from './expectation-form';
import { OutlookApi } from './outlook-api';
import { formatPercent, formatPrice, formatSignedPercent } from './outlook-format';
import type { ExpectationMethod, ExpectationSetting, MethodComparison, OutlookDraft } from './outlook-api-types';
import { runBusy } from '../shared/run-busy';

export interface ExpectationDialogData {
  outlookId: number;
  season: string;
  item: { code: string; name: string; priceUnit: string };
  /** The draft's whole list of settings; the dialog replaces (or adds) this item's. */
  settings: ExpectationSetting[];
  canEdit: boolean;
}

/** Splits the server's details for the list into this item's method and band messages. */
export function detailsForItem(error: unknown, index: number): { method?: string; band?: string; other?: string } {
  if (!(error instanceof ApiRequestError)) return { other: errorMessage(error) };
  const out: { method?: string; band?: string; other?: string } = {};
  const prefix = `body.items.${index}.`;
  for (const d of error.error.details ?? []) {
    if (!d.path.startsWith(prefix)) continue;
    const rest = d.path.slice(prefix.length);
    if (rest.startsWith('band')) out.band ??= d.message;
    else out.method ??= d.message;
  }
  if (!out.method && !out.band) out.other = error.message;
  return out;
}

/**
 * One item's expected price: every method's value and past errors side by side (so the planner can
 * explain the choice), and the form that sets the method, the band and a note.
 */
@Component({
  selector: 'np-expectation-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogClose, MatButton, MatProgressBar, ExpectationForm],
  templateUrl: './expectation-dialog.html',
  styleUrl: './expectation-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ExpectationDialog {
  // services
  readonly #api = inject(OutlookApi);
  readonly #ref = inject<MatDialogRef<ExpectationDialog, OutlookDraft>>(MatDialogRef);
  protected readonly data = inject<ExpectationDialogData>(MAT_DIALOG_DATA);

  protected readonly comparison = httpResource<MethodComparison>(
    () => `/api/outlooks/${this.data.outlookId}/expectation-methods?item=${encodeURIComponent(this.data.item.code)}`,
  );
  protected readonly methods = computed(() => (this.comparison.hasValue() ? this.comparison.value().methods : []));
  protected readonly recent = computed(() => (this.comparison.hasValue() ? this.comparison.value().history.slice(-6) : []));
  protected readonly problem = computed(() => (this.comparison.error() ? errorMessage(this.comparison.error()) : null));

  readonly #index = this.data.settings.findIndex((s) => s.item === this.data.item.code);
  protected readonly initial = this.#index >= 0 ? this.data.settings[this.#index]! : null;
  protected readonly busy = signal(false);
  protected readonly serverErrors = signal<{ method?: string; band?: string } | null>(null);
  protected readonly failure = signal<string | null>(null);

  protected readonly formatPrice = formatPrice;
  protected readonly formatPercent = formatPercent;
  protected readonly formatSignedPercent = formatSignedPercent;

  private readonly form = viewChild(ExpectationForm);

  protected use(method: ExpectationMethod): void {
    this.form()?.apply(method);
  }

  protected isCurrent(method: ExpectationMethod): boolean {
    return !!this.initial && JSON.stringify(normalise(this.initial.method)) === JSON.stringify(normalise(method));
  }

  protected async save(setting: ExpectationSetting): Promise<void> {
    const list = [...this.data.settings];
    const index = this.#index >= 0 ? this.#index : list.length;
    list[index] = setting;
    this.serverErrors.set(null);
    this.failure.set(null);
    await runBusy(
      this.busy,
      async () => this.#ref.close(await this.#api.setExpectations(this.data.outlookId, list)),
      (error) => {
        const d = detailsForItem(error, index);
        this.serverErrors.set(d.method || d.band ? { method: d.method, band: d.band } : null);
        this.failure.set(d.other ?? null);
      },
    );
  }

  protected cancel(): void {
    this.#ref.close();
  }
}

/** Methods compared by what they compute (the server fills in defaults such as olympic: false). */
function normalise(m: ExpectationMethod): ExpectationMethod {
  if (m.kind === 'moving-average') return { kind: m.kind, k: m.k, olympic: m.olympic ?? false };
  if (m.kind === 'futures-basis') return { kind: m.kind, contract: m.contract ?? null, basisSeasons: m.basisSeasons };
  return m;
}
