import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { BudgetEditorStore } from './budget-editor-store';

/** Which scenario the product plan and the cash show. Reads and acts through the page's BudgetEditorStore. */
@Component({
  selector: 'np-scenario-picker',
  imports: [ReactiveFormsModule, MatButtonToggle, MatButtonToggleGroup],
  templateUrl: './scenario-picker.html',
  styleUrl: './budget-editor.scss',
  // The section's cards sit in the page's column as if written there.
  host: { style: 'display: contents' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ScenarioPicker {
  readonly #store = inject(BudgetEditorStore);
  protected readonly result = this.#store.result;
  protected readonly shown = this.#store.shown;
  protected readonly shownName = this.#store.shownName;
}
