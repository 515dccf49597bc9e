import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { DatePipe } from '@angular/common';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatRadioButton, MatRadioGroup } from '@angular/material/radio';
import { MatOption, MatSelect } from '@angular/material/select';
import { DemandSummary } from './demand-summary';
import { BudgetEditorStore } from './budget-editor-store';
import { NUTRIENT_LABEL } from './budget-api-types';
import { FieldError } from '../shared/field-error';

/** Where the nutrient demand comes from: an outlook scenario, contracted output, a model run or typed amounts, with the outlook's pricing options. Reads and acts through the page's BudgetEditorStore. */
@Component({
  selector: 'np-budget-source-section',
  imports: [ReactiveFormsModule, DatePipe, DemandSummary, MatCheckbox, MatError, FieldError, MatFormField, MatHint, MatInput, MatLabel, MatOption, MatRadioButton, MatRadioGroup, MatSelect, MatSuffix],
  templateUrl: './budget-source-section.html',
  styleUrl: './budget-editor.scss',
  // The section's cards sit in the page's column as if written there.
  host: { style: 'display: contents' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BudgetSourceSection {
  readonly #store = inject(BudgetEditorStore);
  protected readonly canEdit = this.#store.canEdit;
  protected readonly form = this.#store.form;
  protected readonly formReady = this.#store.formReady;
  protected readonly labels = this.#store.labels;
  protected readonly outlookScenarios = this.#store.outlookScenarios;
  protected readonly result = this.#store.result;
  protected readonly runOptions = this.#store.runOptions;
  protected readonly scenarioLabel = this.#store.scenarioLabel;
  protected setOutlookPricing(...args: Parameters<BudgetEditorStore['setOutlookPricing']>): ReturnType<BudgetEditorStore['setOutlookPricing']> {
    return this.#store.setOutlookPricing(...args);
  }
  protected readonly sourceKind = this.#store.sourceKind;
  protected readonly stale = this.#store.stale;
  protected readonly versionOptions = this.#store.versionOptions;
  protected readonly contractOutlookOptions = this.#store.contractOutlookOptions;
  protected readonly nutrientLabel = NUTRIENT_LABEL;
  /** A price per kg (or lb) of nutrient, to the cent. */
  protected formatPerMass(v: number): string {
    return v.toFixed(2);
  }
}
