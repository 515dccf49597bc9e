import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Router, RouterLink } from '@angular/router';
import type { ColDef } from 'ag-grid-community';
import { errorMessage, errorStatus } from '../core/api-error';
import { AgGridAngular } from '../shared/grid';
import { OutlookApi } from './outlook-api';
import { formatDateTime } from './outlook-format';
import type { DeliveryLog, DeliveryRow, DeliveryStatus, VersionSummary } from './outlook-api-types';
import { LoadProblem } from '../shared/load-problem';

/** How often the log is read again while messages wait or are being sent. */
export const DELIVERY_POLL_MS = 2000;

export const DELIVERY_WORDS: Record<DeliveryStatus, string> = {
  queued: 'Waiting',
  sending: 'Sending',
  sent: 'Sent',
  failed: 'Failed',
  skipped: 'Not sent',
};

/** `/outlook/:id/deliveries`: the personal e-mails of a published version, one row per member, with retry. */
@Component({
  selector: 'np-delivery-log',
  imports: [RouterLink, AgGridAngular, MatButton, MatIcon, MatProgressBar, MatFormField, MatLabel, MatSelect, MatOption, LoadProblem],
  templateUrl: './delivery-log.html',
  styleUrl: './delivery-log.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeliveryLogPage {
  // services
  readonly #api = inject(OutlookApi);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);

  // inputs
  /** Route parameter. */
  readonly id = input.required<string>();
  /** Query parameter: the version number; the latest when absent. */
  readonly version = input<string | undefined>(undefined);

  protected readonly log = httpResource<DeliveryLog>(() => {
    const v = this.version();
    return `/api/outlooks/${encodeURIComponent(this.id())}/deliveries${v ? `?version=${encodeURIComponent(v)}` : ''}`;
  });
  protected readonly versions = httpResource<VersionSummary[]>(() => `/api/outlooks/${encodeURIComponent(this.id())}/versions`);
  protected readonly l = computed(() => (this.log.hasValue() ? this.log.value() : null));
  protected readonly rows = computed(() => this.l()?.rows ?? []);
  protected readonly failed = computed(() => this.rows().filter((r) => r.status === 'failed'));
  protected readonly pending = computed(() => (this.l()?.counts.queued ?? 0) + (this.l()?.counts.sending ?? 0));
  protected readonly notFound = computed(() => errorStatus(this.log.error()) === 404);
  protected readonly problem = computed(() => (this.log.error() && !this.notFound() ? errorMessage(this.log.error()) : null));
  protected readonly retrying = signal<number | null>(null);
  protected readonly words = DELIVERY_WORDS;
  protected readonly statuses: DeliveryStatus[] = ['sent', 'queued', 'sending', 'failed', 'skipped'];
  protected readonly formatDateTime = formatDateTime;

  protected readonly columns: ColDef<DeliveryRow>[] = [
    { field: 'name', headerName: 'Member', minWidth: 160, flex: 1, filter: 'agTextColumnFilter', valueFormatter: (p) => (p.value as string | null) ?? '—' },
    { field: 'to', headerName: 'E-mail', minWidth: 250, flex: 1, filter: 'agTextColumnFilter' },
    {
      field: 'status',
      headerName: 'Status',
      width: 120,
      filter: 'agTextColumnFilter',
      valueFormatter: (p) => DELIVERY_WORDS[p.value as DeliveryStatus] ?? String(p.value),
      cellClass: (p) => `status-${p.value as string}`,
    },
    { field: 'attempts', headerName: 'Attempts', type: 'numericColumn', width: 110 },
    { field: 'lastError', headerName: 'Last error or reason', minWidth: 220, flex: 2, valueFormatter: (p) => (p.value as string | null) ?? '' },
    { field: 'sentAt', headerName: 'Sent', width: 170, valueFormatter: (p) => (p.value ? formatDateTime(p.value as string) : '') },
    { field: 'nextAttemptAt', headerName: 'Next attempt', width: 170, valueFormatter: (p) => (p.data?.status === 'queued' || p.data?.status === 'failed' ? formatDateTime(p.value as string | null) : '') },
  ];

  constructor() {
    const timer = setInterval(() => {
      if (this.pending() > 0 && !this.log.isLoading()) this.log.reload();
    }, DELIVERY_POLL_MS);
    inject(DestroyRef).onDestroy(() => clearInterval(timer));
  }

  protected chooseVersion(version: number): void {
    void this.#router.navigate(['/outlook', this.id(), 'deliveries'], { queryParams: { version } });
  }

  protected async retry(row: DeliveryRow): Promise<void> {
    this.retrying.set(row.id);
    try {
      await this.#api.retryDelivery(Number(this.id()), row.id);
      this.#snackBar.open(`The message to ${row.to} is queued again.`, 'OK');
      this.log.reload();
    } catch (error) {
      this.#snackBar.open(errorMessage(error), 'Dismiss');
    } finally {
      this.retrying.set(null);
    }
  }
}
