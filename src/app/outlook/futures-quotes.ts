import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { firstValueFrom } from 'rxjs';
import type { Item, Season } from '../../../shared/api-types';
import { futuresQuoteSchema } from '../../../shared/outlook-schemas';
import { ApiRequestError, errorMessage } from '../core/api-error';
import { ConfirmDialog, type ConfirmDialogData } from '../shared/confirm-dialog';
import { applyServerDetails, zodValidator } from '../shared/zod-validator';
import { OutlookApi } from './outlook-api';
import { formatPrice } from './outlook-format';
import type { FuturesQuote } from './outlook-api-types';
import { FieldError } from '../shared/field-error';
import { LoadProblem } from '../shared/load-problem';
import { runBusy } from '../shared/run-busy';

/**
 * The futures history behind the "futures quote plus local basis" method: one row per quote (item,
 * season, contract, day). The basis is local cash minus the season's latest quote; the quote the
 * outlook starts from is the latest recorded for the outlook's season.
 */
@Component({
  selector: 'np-futures-quotes',
  imports: [ReactiveFormsModule, MatButton, MatIconButton, MatIcon, MatFormField, MatLabel, MatHint, MatError, FieldError, MatInput, MatSelect, MatOption, LoadProblem],
  templateUrl: './futures-quotes.html',
  styleUrl: './futures-quotes.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FuturesQuotes {
  // services
  readonly #api = inject(OutlookApi);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);

  // inputs
  readonly items = input.required<readonly Item[]>();
  readonly seasons = input.required<readonly Season[]>();
  readonly currency = input('EUR');
  readonly canEdit = input(false);
  /** The outlook's season, offered first for a new quote. */
  readonly season = input<string | null>(null);

  protected readonly quotes = httpResource<FuturesQuote[]>(() => '/api/futures-quotes');
  protected readonly rows = computed(() => {
    const codes = new Set(this.items().map((i) => i.code));
    return (this.quotes.hasValue() ? this.quotes.value() : []).filter((q) => codes.has(q.itemCode));
  });
  protected readonly problem = computed(() => (this.quotes.error() ? errorMessage(this.quotes.error()) : null));
  protected readonly editing = signal<FuturesQuote | null>(null);
  protected readonly saving = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly formatPrice = formatPrice;

  protected readonly form = inject(NonNullableFormBuilder).group({
    itemId: [null as number | null, [Validators.required]],
    seasonId: [null as number | null, [Validators.required]],
    contract: ['', [zodValidator(futuresQuoteSchema.shape.contract)]],
    quote: [null as number | null, [zodValidator(futuresQuoteSchema.shape.quote)]],
    currency: ['EUR', [zodValidator(futuresQuoteSchema.shape.currency)]],
    quotedOn: [new Date().toISOString().slice(0, 10), [zodValidator(futuresQuoteSchema.shape.quotedOn)]],
    source: ['', [zodValidator(futuresQuoteSchema.shape.source)]],
  });

  constructor() {
    effect(() => {
      const currency = this.currency();
      const label = this.season();
      const season = this.seasons().find((s) => s.label === label);
      untracked(() => {
        if (!this.editing() && this.form.pristine) {
          this.form.patchValue({ currency, seasonId: season?.id ?? this.form.controls.seasonId.value });
        }
      });
    });
  }

  protected unitOf(itemId: number): string {
    return this.items().find((i) => i.id === itemId)?.unit ?? '';
  }

  protected nameOf(itemCode: string): string {
    return this.items().find((i) => i.code === itemCode)?.name ?? itemCode;
  }

  protected edit(q: FuturesQuote): void {
    this.editing.set(q);
    this.failure.set(null);
    this.form.reset({ itemId: q.itemId, seasonId: q.seasonId, contract: q.contract, quote: q.quote, currency: q.currency, quotedOn: q.quotedOn, source: q.source });
  }

  protected cancelEdit(): void {
    this.editing.set(null);
    this.failure.set(null);
    this.form.reset({ itemId: null, seasonId: this.seasons().find((s) => s.label === this.season())?.id ?? null, contract: '', quote: null, currency: this.currency(), quotedOn: new Date().toISOString().slice(0, 10), source: '' });
  }

  protected async save(): Promise<void> {
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    const v = this.form.getRawValue();
    const body = { itemId: v.itemId!, seasonId: v.seasonId!, contract: v.contract.trim(), quote: v.quote!, currency: v.currency.trim(), quotedOn: v.quotedOn, source: v.source.trim() };
    this.failure.set(null);
    await runBusy(
      this.saving,
      async () => {
        const editing = this.editing();
        const saved = editing ? await this.#api.updateQuote(editing.id, body) : await this.#api.addQuote(body);
        this.#snackBar.open(`Quote ${saved.contract}, ${saved.season}: ${formatPrice(saved.quote)} ${saved.currency} saved. Save the item's expected price again to use it.`, 'OK');
        this.quotes.reload();
        this.cancelEdit();
      },
      (error) => {
        const matched = error instanceof ApiRequestError && applyServerDetails(this.form.controls, error.error.details);
        if (!matched) this.failure.set(errorMessage(error));
      },
    );
  }

  protected async remove(q: FuturesQuote): Promise<void> {
    const data: ConfirmDialogData = {
      title: `Delete the quote of ${q.quotedOn}?`,
      message: `${q.contract}, ${q.season}: ${formatPrice(q.quote)} ${q.currency}. Outlooks already published keep the figures they were made with.`,
      confirmLabel: 'Delete',
      destructive: true,
    };
    if (!(await firstValueFrom(this.#dialog.open(ConfirmDialog, { data }).afterClosed()))) return;
    try {
      await this.#api.deleteQuote(q.id);
      this.quotes.reload();
      if (this.editing()?.id === q.id) this.cancelEdit();
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    }
  }
}
