import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import type { UnitSystem } from '../../../shared/units';
import { BudgetUnitsStore } from './budget-units';

/** Metric (kg, t) or US customary (lb, short ton) for every figure of the budget pages and exports. */
@Component({
  selector: 'np-unit-switch',
  imports: [MatButtonToggleGroup, MatButtonToggle],
  template: `
    <mat-button-toggle-group
      [value]="units.system()"
      (change)="choose($event.value)"
      hideSingleSelectionIndicator
      aria-label="Units"
    >
      <mat-button-toggle value="metric">Metric (kg, t)</mat-button-toggle>
      <mat-button-toggle value="us">US (lb, short ton)</mat-button-toggle>
    </mat-button-toggle-group>
  `,
  styles: `
    :host {
      display: inline-block;
    }
    mat-button-toggle-group {
      --mat-button-toggle-height: 36px;
      font: var(--mat-sys-label-large);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitSwitch {
  protected readonly units = inject(BudgetUnitsStore);

  protected choose(system: UnitSystem): void {
    this.units.choose(system);
  }
}
