import { DatePipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, linkedSignal, signal } from '@angular/core';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatOption, MatSelect } from '@angular/material/select';
import { Router } from '@angular/router';
import { MatPaginator, type PageEvent } from '@angular/material/paginator';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { errorMessage } from '../../core/api-error';
import { LoadProblem } from '../../shared/load-problem';

/** One changed field of an audit entry, in words (the server's describer, server/audit/audit-describe.ts). */
export interface AuditChange {
  label: string;
  before: string;
  after: string;
}

/** One row of `GET /api/audit`: the stored entry plus its sentence and changed fields in words. */
export interface AuditEntry {
  id: number;
  at: string;
  actorEmail: string | null;
  actorName: string | null;
  action: string;
  entity: string;
  entityId: string | number | null;
  sentence: string;
  changes: AuditChange[];
}

export interface AuditPage {
  rows: AuditEntry[];
  total: number;
}

/** The kinds of record the audit log names (`entity`), in words, for the filter. */
export const AUDIT_ENTITIES: { entity: string; label: string }[] = [
  { entity: 'price', label: 'Prices' },
  { entity: 'price-index', label: 'Price indexes' },
  { entity: 'farm-record', label: 'Farm records' },
  { entity: 'farm-land', label: 'Farm land per season' },
  { entity: 'farm', label: 'Farms' },
  { entity: 'item', label: 'Items' },
  { entity: 'season', label: 'Seasons' },
  { entity: 'delivery-point', label: 'Delivery points' },
  { entity: 'import', label: 'Imports' },
  { entity: 'user', label: 'Users' },
  { entity: 'budget', label: 'Budgets' },
  { entity: 'fertiliser-product', label: 'Fertiliser products' },
  { entity: 'model', label: 'Models' },
  { entity: 'outlook', label: 'Outlooks' },
  { entity: 'settings', label: 'Settings' },
];

/** `/admin/audit`: who changed what, newest first, a page at a time; `?entity=price` shows one kind of record. */
@Component({
  selector: 'np-audit-log',
  imports: [
    DatePipe,
    MatFormField,
    MatLabel,
    MatSelect,
    MatOption,
    MatPaginator,
    MatProgressBar,
    MatTableModule,
    LoadProblem,
  ],
  templateUrl: './audit-log.html',
  styleUrl: './audit-log.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AuditLog {
  readonly #router = inject(Router);
  /** `?entity=` (bound by the router): only entries about this kind of record. */
  readonly entity = input<string | undefined>(undefined);
  protected readonly shownEntity = linkedSignal(() => this.entity() ?? '');
  protected readonly entities = computed(() => {
    const current = this.shownEntity();
    return current && !AUDIT_ENTITIES.some((e) => e.entity === current) ? [...AUDIT_ENTITIES, { entity: current, label: current }] : AUDIT_ENTITIES;
  });
  protected readonly pageSize = signal(25);
  protected readonly pageIndex = linkedSignal({ source: this.shownEntity, computation: () => 0 });
  protected readonly audit = httpResource<AuditPage>(() => ({
    url: '/api/audit',
    params: {
      limit: this.pageSize(),
      offset: this.pageIndex() * this.pageSize(),
      ...(this.shownEntity() ? { entity: this.shownEntity() } : {}),
    },
  }));
  protected readonly page = computed<AuditPage>(() => (this.audit.hasValue() ? this.audit.value() : { rows: [], total: 0 }));
  protected readonly rows = computed(() => this.page().rows);
  protected readonly problem = computed(() => (this.audit.error() ? errorMessage(this.audit.error()) : null));
  protected readonly columns = ['at', 'what'];

  protected chooseEntity(entity: string): void {
    this.shownEntity.set(entity);
    void this.#router.navigate([], { queryParams: { entity: entity || null }, queryParamsHandling: 'merge', replaceUrl: true });
  }

  protected changePage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }
}
