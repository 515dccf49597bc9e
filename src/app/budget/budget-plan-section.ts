import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatExpansionPanel, MatExpansionPanelHeader, MatExpansionPanelTitle } from '@angular/material/expansion';
import { MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatRadioButton, MatRadioGroup } from '@angular/material/radio';
import { RouterLink } from '@angular/router';
import { ProductPlan } from './product-plan';
import { ScenarioPicker } from './scenario-picker';
import { BudgetEditorStore } from './budget-editor-store';

/** The product plan of the scenario shown, and the products and prices the budget plans with. Reads and acts through the page's BudgetEditorStore. */
@Component({
  selector: 'np-budget-plan-section',
  imports: [ReactiveFormsModule, MatCheckbox, MatExpansionPanel, MatExpansionPanelHeader, MatExpansionPanelTitle, MatFormField, MatHint, MatInput, MatLabel, MatRadioButton, MatRadioGroup, MatSuffix, ProductPlan, RouterLink, ScenarioPicker],
  templateUrl: './budget-plan-section.html',
  styleUrl: './budget-editor.scss',
  // The section's cards sit in the page's column as if written there.
  host: { style: 'display: contents' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BudgetPlanSection {
  readonly #store = inject(BudgetEditorStore);
  protected readonly canEdit = this.#store.canEdit;
  protected readonly currency = this.#store.currency;
  protected readonly form = this.#store.form;
  protected readonly formReady = this.#store.formReady;
  protected includedCount(...args: Parameters<BudgetEditorStore['includedCount']>): ReturnType<BudgetEditorStore['includedCount']> {
    return this.#store.includedCount(...args);
  }
  protected readonly labels = this.#store.labels;
  protected listPriceNote(...args: Parameters<BudgetEditorStore['listPriceNote']>): ReturnType<BudgetEditorStore['listPriceNote']> {
    return this.#store.listPriceNote(...args);
  }
  protected get productRows() {
    return this.#store.productRows;
  }
  protected readonly result = this.#store.result;
  protected readonly shown = this.#store.shown;
  protected readonly stale = this.#store.stale;
  protected readonly system = this.#store.system;
}
