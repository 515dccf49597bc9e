import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatAnchor } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { ACCESS, roleAllows } from '../core/access';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { CautionNote } from '../shared/caution-note';
import { formatMass, formatMoney } from './budget-format';
import { NUTRIENTS, type BudgetListRow, type SourceKind } from './budget-api-types';
import { BudgetUnitsStore, massToShown, unitLabels } from './budget-units';
import { UnitSwitch } from './unit-switch';

const SOURCE_LABEL: Record<SourceKind, string> = { outlook: 'Published outlook', 'model-run': 'Model run', manual: 'Entered by hand', contracted: 'Contracted output' };

/** `/budget`: the co-op's fertiliser purchase budgets; treasurers start new ones. */
@Component({
  selector: 'np-budget-list',
  imports: [
    DatePipe,
    RouterLink,
    MatAnchor,
    MatIcon,
    MatProgressBar,
    MatTableModule,
    CautionNote,
    UnitSwitch,
  ],
  templateUrl: './budget-list.html',
  styleUrl: './budget-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BudgetList {
  // services
  readonly #auth = inject(AuthStore);
  readonly #units = inject(BudgetUnitsStore);

  protected readonly budgets = httpResource<BudgetListRow[]>(() => '/api/budgets');
  protected readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.budgetEdit));
  protected readonly problem = computed(() => (this.budgets.error() ? errorMessage(this.budgets.error()) : null));
  protected readonly mass = computed(() => unitLabels(this.#units.system(), '').mass);
  protected readonly rows = computed(() => {
    const system = this.#units.system();
    const list = this.budgets.hasValue() ? this.budgets.value() : [];
    return list.map((b) => ({
      ...b,
      sourceLabel: SOURCE_LABEL[b.sourceKind],
      demand: NUTRIENTS.map((n) => formatMass(massToShown(b.baseDemand[n], system))).join(' · '),
      cash: formatMoney(b.baseCash, b.currency),
      // One entry per scenario (shown as chips): a name may itself hold a comma ("N +10 %, K2O −5 %").
      scenarios: b.scenarioNames.slice(1),
    }));
  });
  protected readonly columns = ['name', 'source', 'demand', 'cash', 'scenarios', 'updated'];
}
