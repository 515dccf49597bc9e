import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { errorMessage } from '../../core/api-error';
import { money } from '../../my-farm/bookings/booking-format';
import { DevPaymentsApi } from './dev-payments-api';
import { runBusy } from '../../shared/run-busy';

interface FakeSession {
  id: string;
  status: 'open' | 'complete' | 'expired';
  payment_status: 'paid' | 'unpaid';
  amount_total: number;
  currency: string;
  description: string;
  customer_email: string | null;
  created: number;
}

interface FakeDelivery {
  eventId: string;
  type: string;
  status: number | string;
  at: string;
}

/**
 * `/admin/payments` (development mode only): the local fake payment service's checkout sessions;
 * an admin completes or fails a member's payment here, and the fake sends its signed webhook.
 */
@Component({
  selector: 'np-dev-payments',
  imports: [DatePipe, MatButton, MatIcon, MatProgressBar],
  template: `
    <div class="np-page">
      <div class="np-page-header">
        <h1>Test payments</h1>
        <button matButton="outlined" type="button" (click)="data.reload()"><mat-icon>refresh</mat-icon> Refresh</button>
      </div>
      <p>The local fake payment service stands in for the payment service in development: no card is asked for and no money moves. Completing a payment here sends the same signed webhook the member's “Pay” button does.</p>
      @if (data.isLoading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading test payments" />
      }
      @if (problem(); as p) {
        <p class="problem" role="alert">{{ p }}</p>
      }
      @if (sessions().length === 0 && data.hasValue()) {
        <p>No payment has been started yet.</p>
      }
      <ul class="sessions">
        @for (s of sessions(); track s.id) {
          <li>
            <div class="what">
              <strong>{{ fmt(s.amount_total, s.currency.toUpperCase()) }}</strong>
              <span>{{ s.description }}</span>
              <span class="small">{{ s.customer_email }} · started {{ s.created * 1000 | date: 'd MMM, HH:mm' }} · {{ s.status }}{{ s.payment_status === 'paid' ? ', paid' : '' }}</span>
            </div>
            @if (s.status === 'open') {
              <div class="actions">
                <button matButton="filled" type="button" (click)="act(s.id, 'complete')" [disabled]="busy()">Complete</button>
                <button matButton="outlined" type="button" (click)="act(s.id, 'fail')" [disabled]="busy()">Fail</button>
              </div>
            }
          </li>
        }
      </ul>
      @if (deliveries().length) {
        <h2>Webhooks sent</h2>
        <ul class="small">
          @for (d of deliveries(); track d.eventId) {
            <li>{{ d.at | date: 'HH:mm:ss' }} · {{ d.type }} · {{ d.eventId }} · answer {{ d.status }}</li>
          }
        </ul>
      }
    </div>
  `,
  styles: `
    .sessions {
      list-style: none;
      margin: 0;
      padding: 0;
      display: flex;
      flex-direction: column;
      gap: 10px;
    }
    .sessions > li {
      display: flex;
      flex-wrap: wrap;
      justify-content: space-between;
      gap: 8px 16px;
      padding: 12px 16px;
      border-radius: var(--mat-sys-corner-medium);
      background: var(--mat-sys-surface-container-low);
    }
    .what {
      display: flex;
      flex-direction: column;
      gap: 2px;
    }
    .actions {
      display: flex;
      gap: 8px;
    }
    .small {
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .problem {
      color: var(--mat-sys-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DevPayments {
  readonly #api = inject(DevPaymentsApi);
  protected readonly data = httpResource<{ sessions: FakeSession[]; deliveries: FakeDelivery[] }>(() => '/api/dev/payments');
  protected readonly sessions = computed(() => (this.data.hasValue() ? this.data.value().sessions : []));
  protected readonly deliveries = computed(() => (this.data.hasValue() ? this.data.value().deliveries : []));
  protected readonly busy = signal(false);
  readonly #actionProblem = signal<string | null>(null);
  protected readonly problem = computed(() => this.#actionProblem() ?? (this.data.error() ? errorMessage(this.data.error()) : null));
  protected readonly fmt = money;

  protected async act(id: string, what: 'complete' | 'fail') {
    await runBusy(this.busy, () => this.#api.settle(id, what), this.#actionProblem);
    this.data.reload();
  }
}
