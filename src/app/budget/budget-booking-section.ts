import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { CashSection } from './cash-section';
import { ScenarioPicker } from './scenario-picker';
import { BudgetEditorStore } from './budget-editor-store';
import { FieldError } from '../shared/field-error';

/** The booking plan (months, shares, prepayment, delivery, terms) and the cash it gives. Reads and acts through the page's BudgetEditorStore. */
@Component({
  selector: 'np-budget-booking-section',
  imports: [ReactiveFormsModule, CashSection, MatButton, MatCheckbox, MatError, FieldError, MatFormField, MatHint, MatIcon, MatIconButton, MatInput, MatLabel, MatSuffix, ScenarioPicker],
  templateUrl: './budget-booking-section.html',
  styleUrl: './budget-editor.scss',
  // The section's cards sit in the page's column as if written there.
  host: { style: 'display: contents' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BudgetBookingSection {
  readonly #store = inject(BudgetEditorStore);
  protected addMonth(...args: Parameters<BudgetEditorStore['addMonth']>): ReturnType<BudgetEditorStore['addMonth']> {
    return this.#store.addMonth(...args);
  }
  protected readonly base = this.#store.base;
  protected bookingProblems(...args: Parameters<BudgetEditorStore['bookingProblems']>): ReturnType<BudgetEditorStore['bookingProblems']> {
    return this.#store.bookingProblems(...args);
  }
  protected readonly canEdit = this.#store.canEdit;
  protected readonly currency = this.#store.currency;
  protected readonly form = this.#store.form;
  protected readonly formReady = this.#store.formReady;
  protected readonly formatMonth = this.#store.formatMonth;
  protected readonly formatPct = this.#store.formatPct;
  protected get monthRows() {
    return this.#store.monthRows;
  }
  protected removeMonth(...args: Parameters<BudgetEditorStore['removeMonth']>): ReturnType<BudgetEditorStore['removeMonth']> {
    return this.#store.removeMonth(...args);
  }
  protected readonly result = this.#store.result;
  protected readonly savedView = this.#store.savedView;
  protected shareSum(...args: Parameters<BudgetEditorStore['shareSum']>): ReturnType<BudgetEditorStore['shareSum']> {
    return this.#store.shareSum(...args);
  }
  protected sharesOff(...args: Parameters<BudgetEditorStore['sharesOff']>): ReturnType<BudgetEditorStore['sharesOff']> {
    return this.#store.sharesOff(...args);
  }
  protected readonly shown = this.#store.shown;
  protected readonly stale = this.#store.stale;
  protected readonly system = this.#store.system;
}
