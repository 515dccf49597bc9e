import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { ACCESS, roleAllows } from '../core/access';
import { AuthStore } from '../core/auth-store';
import { CoopOverview } from './coop-overview';
import { MyFarmOverview } from './my-farm-overview';

/** `/`: what the signed-in person needs first; the co-op's state for staff, their own farm for a member. */
@Component({
  selector: 'np-home',
  imports: [CoopOverview, MyFarmOverview],
  template: `
    @if (showsCoop()) {
      <np-coop-overview />
    } @else if (showsMyFarm()) {
      <np-my-farm-overview />
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Home {
  readonly #auth = inject(AuthStore);
  protected readonly showsCoop = computed(() => roleAllows(this.#auth.role(), ACCESS.coopSummary));
  protected readonly showsMyFarm = computed(() => roleAllows(this.#auth.role(), ACCESS.myFarm));
}
