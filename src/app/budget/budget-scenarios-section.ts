import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatError, MatFormField, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { ScenarioComparison } from './scenario-comparison';
import { BudgetEditorStore } from './budget-editor-store';
import { FieldError } from '../shared/field-error';

/** The price scenarios, typed and side by side with the base. Reads and acts through the page's BudgetEditorStore. */
@Component({
  selector: 'np-budget-scenarios-section',
  imports: [ReactiveFormsModule, MatButton, MatError, FieldError, MatFormField, MatIcon, MatIconButton, MatInput, MatLabel, MatSuffix, ScenarioComparison],
  templateUrl: './budget-scenarios-section.html',
  styleUrl: './budget-editor.scss',
  // The section's cards sit in the page's column as if written there.
  host: { style: 'display: contents' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BudgetScenariosSection {
  readonly #store = inject(BudgetEditorStore);
  protected addScenario(...args: Parameters<BudgetEditorStore['addScenario']>): ReturnType<BudgetEditorStore['addScenario']> {
    return this.#store.addScenario(...args);
  }
  protected readonly base = this.#store.base;
  protected readonly canEdit = this.#store.canEdit;
  protected readonly form = this.#store.form;
  protected readonly formReady = this.#store.formReady;
  protected removeScenario(...args: Parameters<BudgetEditorStore['removeScenario']>): ReturnType<BudgetEditorStore['removeScenario']> {
    return this.#store.removeScenario(...args);
  }
  protected readonly result = this.#store.result;
  protected get scenarioRows() {
    return this.#store.scenarioRows;
  }
  protected readonly shown = this.#store.shown;
  protected readonly stale = this.#store.stale;
}
