import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed } from '@angular/core';
import { CONTRACT_STATUS_LABELS } from '../../../shared/contract-schemas';
import { contractSentence, nutrientSentence } from '../../../shared/contract-words';
import type { MyContracts } from '../../../shared/contracted-view';
import { errorMessage } from '../core/api-error';
import { CautionNote } from '../shared/caution-note';
import { deliveryWindow } from './contract-format';

/**
 * The member portal's "Your delivery contracts" section (issue 19): each contract of the member's
 * farm with the estimated marginal cost at the contracted tonnage, and the fertiliser the contracted
 * output needs, worded as in the outlook e-mail, with the caution. Shows nothing when the farm has no contract.
 */
@Component({
  selector: 'np-my-contracts',
  imports: [CautionNote],
  template: `
    @if (lines(); as l) {
      <section class="block" aria-labelledby="contracts-heading">
        <h2 id="contracts-heading">Your delivery contracts</h2>
        <ul class="contracts">
          @for (c of l.contracts; track c.id) {
            <li>
              <span class="status">{{ c.status }}</span>
              <span>{{ c.sentence }}</span>
              <span class="np-muted small">Delivery {{ c.window }}.</span>
            </li>
          }
        </ul>
        @for (n of l.nutrients; track $index) {
          <p>{{ n }}</p>
        }
        @if (l.pending) {
          <p class="np-muted small">The co-op has not yet estimated the marginal cost of your signed contracts for this season.</p>
        }
        @for (i of l.issues; track $index) {
          <p class="np-muted small">{{ i }}</p>
        }
        <np-caution-note label="Caution about contract figures">
          <p>{{ l.caution }}</p>
        </np-caution-note>
      </section>
    } @else if (problem(); as p) {
      <p class="np-error-text" role="alert">Your contracts could not be loaded: {{ p }}</p>
    }
  `,
  styles: `
    .block {
      display: flex;
      flex-direction: column;
      gap: 10px;
      min-width: 0;
    }
    h2 {
      margin: 0;
      font: var(--mat-sys-title-large);
    }
    p {
      margin: 0;
    }
    .contracts {
      margin: 0;
      padding: 0;
      list-style: none;
      display: flex;
      flex-direction: column;
      gap: 8px;
    }
    .contracts li {
      display: flex;
      flex-direction: column;
      gap: 2px;
      padding: 10px 12px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: var(--mat-sys-corner-medium);
    }
    .status {
      font: var(--mat-sys-label-medium);
      color: var(--mat-sys-on-surface-variant);
      text-transform: uppercase;
    }
    .small {
      font: var(--mat-sys-body-small);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MyContractsSection {
  readonly #mine = httpResource<MyContracts>(() => '/api/contracts/mine');
  protected readonly problem = computed(() => (this.#mine.error() ? errorMessage(this.#mine.error()) : null));
  protected readonly lines = computed(() => {
    if (!this.#mine.hasValue()) return null;
    const m = this.#mine.value();
    const shown = m.contracts.filter((c) => c.status !== 'cancelled');
    if (!shown.length) return null;
    return {
      contracts: shown.map((c) => ({ id: c.id, status: CONTRACT_STATUS_LABELS[c.status], sentence: contractSentence(c, m.figures[c.id]), window: deliveryWindow(c.deliveryFrom, c.deliveryTo) })),
      nutrients: m.nutrients.map(nutrientSentence).filter((s): s is string => s !== null),
      pending: shown.some((c) => (c.status === 'signed' || c.status === 'delivered') && !m.figures[c.id]),
      issues: m.issues,
      caution: m.caution,
    };
  });
}
