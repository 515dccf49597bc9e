import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import {
  MAT_DIALOG_DATA,
  MatDialogActions,
  MatDialogClose,
  MatDialogContent,
  MatDialogRef,
  MatDialogTitle,
} from '@angular/material/dialog';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import type { PriceRow } from '../../../../shared/api-types';
import { TEXT_MAX } from '../../../../shared/field-limits';
import { ApiRequestError, errorMessage } from '../../core/api-error';
import { DataDeskApi } from '../data-desk-api';
import { PASTE_COLUMN_LABEL, PRICE_PASTE_COLUMNS, parseTable, problemsFromServer, readPastedPrices, type PasteProblem } from '../paste';
import { ProblemList } from '../problem-list';
import type { DecimalMark } from '../../../../shared/cell-parsers';
import type { Lookups } from '../reference-store';
import { runBusy } from '../../shared/run-busy';

export interface PasteDialogData {
  text: string;
  lookups: Lookups;
  currency: string;
  /** How the co-op writes decimals (settings). */
  decimalMark: DecimalMark;
  /** Prices already stored, so a line that would clash with one is named before sending. */
  existing: readonly PriceRow[];
}

const PREVIEW_LINES = 50;

/** Adds a block of prices copied from a spreadsheet: preview, every bad cell listed, then all rows or none. Closes with the rows added. */
@Component({
  selector: 'np-paste-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogTitle,
    MatDialogContent,
    MatDialogActions,
    MatDialogClose,
    MatButton,
    MatFormField,
    MatLabel,
    MatHint,
    MatInput,
    MatProgressBar,
    ProblemList,
  ],
  templateUrl: './paste-dialog.html',
  styleUrl: './paste-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PasteDialog {
  readonly #api = inject(DataDeskApi);
  readonly #dialogRef = inject<MatDialogRef<PasteDialog, PriceRow[]>>(MatDialogRef);
  protected readonly data = inject<PasteDialogData>(MAT_DIALOG_DATA);

  protected readonly text = new FormControl(this.data.text, { nonNullable: true });
  protected readonly source = new FormControl('', { nonNullable: true });
  readonly #text = toSignal(this.text.valueChanges, { initialValue: this.text.value });
  readonly #source = toSignal(this.source.valueChanges, { initialValue: this.source.value });

  protected readonly order = PRICE_PASTE_COLUMNS.map((c) => PASTE_COLUMN_LABEL[c].toLowerCase()).join(', ');
  protected readonly shownColumns = [...PRICE_PASTE_COLUMNS];
  protected readonly labels = PASTE_COLUMN_LABEL;
  protected readonly textMax = TEXT_MAX;

  protected readonly parsed = computed(() => {
    const result = readPastedPrices(parseTable(this.#text()), this.data.lookups, { currency: this.data.currency, source: this.#source(), decimalMark: this.data.decimalMark });
    // A line that matches a stored price would be refused by the database as a whole block: say which.
    const clashes: PasteProblem[] = [];
    for (const row of result.rows) {
      const v = row.value;
      if (!v) continue;
      const twin = this.data.existing.find(
        (e) => e.itemId === v.itemId && e.seasonId === v.seasonId && e.deliveryPointId === v.deliveryPointId && e.observedOn === v.observedOn,
      );
      if (twin) {
        clashes.push({
          row: row.row,
          column: null,
          message: `${twin.itemName} at ${twin.deliveryPoint} on ${twin.observedOn} is already stored (${twin.price} ${twin.currency}); change it in the grid instead`,
        });
      }
    }
    const problems = [...result.problems, ...clashes].sort((a, b) => a.row - b.row);
    return { ...result, problems };
  });
  protected readonly preview = computed(() => this.parsed().rows.slice(0, PREVIEW_LINES));
  protected readonly moreLines = computed(() => Math.max(0, this.parsed().rows.length - PREVIEW_LINES));
  protected readonly problemLines = computed(() => new Set(this.parsed().problems.map((p) => p.row)));
  protected readonly canSend = computed(() => this.parsed().rows.length > 0 && this.parsed().problems.length === 0);

  protected readonly sending = signal(false);
  protected readonly serverProblems = signal<PasteProblem[]>([]);
  protected readonly failure = signal<string | null>(null);
  /** The lines the server asked about (prices far from their history), for the block as it was sent. */
  protected readonly doubts = signal<{ text: string; problems: PasteProblem[] } | null>(null);
  protected readonly askingToConfirm = computed(() => this.doubts()?.text === this.#text());

  protected async send(): Promise<void> {
    const parsed = this.parsed();
    if (!this.canSend()) return;
    const confirmed = this.askingToConfirm();
    this.failure.set(null);
    this.serverProblems.set([]);
    await runBusy(
      this.sending,
      async () => this.#dialogRef.close(await this.#api.createPrices(parsed.validRows, confirmed)),
      (error) => {
        const mapped = error instanceof ApiRequestError ? problemsFromServer(error.error.details, parsed.rows) : [];
        if (error instanceof ApiRequestError && error.error.code === 'needs_confirmation') {
          // Far from the item's history: shown line by line; sending the same block again stores it.
          this.doubts.set({ text: this.#text(), problems: mapped });
          this.failure.set('Nothing was added yet: check the lines below; if they are right, add them anyway.');
          return;
        }
        if (mapped.length) this.serverProblems.set(mapped);
        this.failure.set(`Nothing was added: ${errorMessage(error)}`);
      },
    );
  }
}
