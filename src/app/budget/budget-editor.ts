import { DatePipe } from '@angular/common';
import { ContractBasisSection } from '../contracts/contract-basis-section';
import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { CautionNote } from '../shared/caution-note';
import { BudgetBookingSection } from './budget-booking-section';
import { BudgetEditorStore } from './budget-editor-store';
import { BudgetPlanSection } from './budget-plan-section';
import { BudgetScenariosSection } from './budget-scenarios-section';
import { BudgetSourceSection } from './budget-source-section';
import { UnitSwitch } from './unit-switch';
import { LoadProblem } from '../shared/load-problem';

/**
 * `/budget/new` and `/budget/:id`: a fertiliser purchase budget. The treasurer picks where the
 * nutrient demand comes from, the products, the booking plan and price scenarios; every change is
 * computed on the server as a preview (the same engine that saves), shown beside the saved figures
 * until saved. Planners and admins read the saved budget and export it.
 *
 * The page lays out its sections (source, product plan, booking and cash, scenarios) and the
 * toolbar; the state, the reads, the preview and the actions live in BudgetEditorStore, one per page.
 */
@Component({
  selector: 'np-budget-editor',
  imports: [
    ContractBasisSection,
    DatePipe,
    ReactiveFormsModule,
    RouterLink,
    MatAnchor,
    MatButton,
    MatIcon,
    MatProgressBar,
    CautionNote,
    UnitSwitch,
    BudgetSourceSection,
    BudgetPlanSection,
    BudgetBookingSection,
    BudgetScenariosSection,
    LoadProblem,
  ],
  providers: [BudgetEditorStore],
  templateUrl: './budget-editor.html',
  styleUrl: './budget-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BudgetEditor {
  readonly #store = inject(BudgetEditorStore);
  protected readonly base = this.#store.base;
  protected readonly budgetId = this.#store.budgetId;
  protected readonly canEdit = this.#store.canEdit;
  protected readonly cautions = this.#store.cautions;
  protected deleteBudget(...args: Parameters<BudgetEditorStore['deleteBudget']>): ReturnType<BudgetEditorStore['deleteBudget']> {
    return this.#store.deleteBudget(...args);
  }
  protected readonly dirty = this.#store.dirty;
  protected discard(...args: Parameters<BudgetEditorStore['discard']>): ReturnType<BudgetEditorStore['discard']> {
    return this.#store.discard(...args);
  }
  protected readonly exportUrl = this.#store.exportUrl;
  protected readonly form = this.#store.form;
  protected readonly formReady = this.#store.formReady;
  protected readonly invalid = this.#store.invalid;
  protected readonly isNew = this.#store.isNew;
  protected readonly loadProblem = this.#store.loadProblem;
  protected readonly previewing = this.#store.previewing;
  protected readonly problems = this.#store.problems;
  protected readonly productList = this.#store.productList;
  protected readonly result = this.#store.result;
  protected save(...args: Parameters<BudgetEditorStore['save']>): ReturnType<BudgetEditorStore['save']> {
    return this.#store.save(...args);
  }
  protected readonly saved = this.#store.saved;
  protected readonly savedView = this.#store.savedView;
  protected readonly saving = this.#store.saving;
  protected readonly system = this.#store.system;
  protected readonly units = this.#store.units;
  protected readonly title = this.#store.title;

  /** Asked by the route before leaving: unsaved edits are lost unless the treasurer stays. */
  confirmLeave(): Promise<boolean> {
    return this.#store.confirmLeave();
  }
}
