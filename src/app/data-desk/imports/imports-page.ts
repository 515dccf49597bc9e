import { BreakpointObserver } from '@angular/cdk/layout';
import { DatePipe, DecimalPipe } from '@angular/common';
import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, computed, inject, input, linkedSignal, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatCard, MatCardContent } from '@angular/material/card';
import { MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { JobProgress } from '../../shared/job-progress';
import { MatRadioButton, MatRadioGroup } from '@angular/material/radio';
import { MatOption, MatSelect } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import { map } from 'rxjs';
import { ACCESS, roleAllows } from '../../core/access';
import { errorMessage } from '../../core/api-error';
import { AuthStore } from '../../core/auth-store';
import { CautionNote } from '../../shared/caution-note';
import { ProblemList } from '../problem-list';
import { ReferenceStore } from '../reference-store';
import { DataDeskApi } from '../data-desk-api';
import type { DecimalMark } from '../../../../shared/cell-parsers';
import { MatCheckbox } from '@angular/material/checkbox';
import { IMPORT_FILE_LIMITS, ImportsApi, type ImportKind, type ImportSummary, type ImportView, type OnExisting } from './imports-api';
import { HistoryLink } from '../../shared/history-link';

export const KIND_INFO: Record<ImportKind, { label: string; about: string; columns: string }> = {
  prices: {
    label: 'Prices',
    about: 'One price observation per row.',
    columns: 'item, season, delivery_point, price, unit, currency, source, observed_on (YYYY-MM-DD)',
  },
  records: {
    label: 'Farm records',
    about: 'One farm, season and item per row; land in ha may repeat on each row of a farm and season, or stand alone.',
    columns: 'farm, season, item, quantity, unit, land_ha',
  },
  observations: {
    label: 'Observations (wide)',
    about: 'The fitting layout: one farm and season per row, a column per price, quantity and fixed factor.',
    columns: 'season, farm, price:<item>, output:<item> or input:<item>, fixed:land_ha',
  },
  contracts: {
    label: 'Delivery contracts',
    about: 'One forward delivery contract per row; a contract number already stored updates that contract.',
    columns: 'reference, farm, season, item, quantity, price, currency, delivery_from, delivery_to (YYYY-MM), status (offered, signed, delivered, cancelled)',
  },
};

const POLL_MS = 250;

/** What went wrong with a file before it reached the server, or null when it may be sent. */
export function fileProblem(file: { name: string; size: number }): string | null {
  const mb = (n: number) => `${(n / 1024 / 1024).toLocaleString('en-GB', { maximumFractionDigits: 1 })} MB`;
  if (!/\.(csv|txt|xlsx)$/i.test(file.name)) return `“${file.name}” is not a CSV or XLSX file. Save the sheet as CSV (UTF-8) or XLSX and choose it again.`;
  if (file.size === 0) return `“${file.name}” is empty.`;
  if (file.size > IMPORT_FILE_LIMITS.maxBytes) {
    return `“${file.name}” is ${mb(file.size)}; the limit is ${mb(IMPORT_FILE_LIMITS.maxBytes)} (and ${IMPORT_FILE_LIMITS.maxRows.toLocaleString('en-GB')} rows). Split it into smaller files and import them one after another.`;
  }
  return null;
}

/** `/imports`: upload a CSV or XLSX file, see every bad row, map columns, then commit all rows or none. */
@Component({
  selector: 'np-imports-page',
  imports: [
    DatePipe,
    DecimalPipe,
    RouterLink,
    MatButton,
    MatButtonToggleGroup,
    MatButtonToggle,
    MatCard,
    MatCardContent,
    MatFormField,
    MatLabel,
    MatHint,
    MatIcon,
    MatProgressBar,
    JobProgress,
    MatRadioGroup,
    MatRadioButton,
    MatSelect,
    MatOption,
    CautionNote,
    ProblemList,
    MatCheckbox,
    HistoryLink,
  ],
  templateUrl: './imports-page.html',
  styleUrl: './imports-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ImportsPage {
  readonly #api = inject(ImportsApi);
  readonly #auth = inject(AuthStore);
  readonly #host = inject<ElementRef<HTMLElement>>(ElementRef);
  protected readonly ref = inject(ReferenceStore);
  readonly #dataDesk = inject(DataDeskApi);
  #stopped = false;

  constructor() {
    inject(DestroyRef).onDestroy(() => (this.#stopped = true));
  }

  protected readonly canImport = computed(() => roleAllows(this.#auth.role(), ACCESS.dataEdit));
  protected readonly kinds = Object.entries(KIND_INFO).map(([kind, info]) => ({ kind: kind as ImportKind, ...info }));
  protected readonly kindInfo = KIND_INFO;
  protected readonly limits = IMPORT_FILE_LIMITS;
  /** On a phone the three kinds stack instead of wrapping mid-group. */
  protected readonly narrow = toSignal(
    inject(BreakpointObserver)
      .observe('(max-width: 599.98px)')
      .pipe(map((s) => s.matches)),
    { initialValue: false },
  );

  /** `/imports?kind=contracts` opens the page on that kind (the contracts page links here). */
  readonly kindParam = input<string | undefined>(undefined, { alias: 'kind' });
  protected readonly kind = linkedSignal<ImportKind>(() => {
    const k = this.kindParam();
    return k && k in KIND_INFO ? (k as ImportKind) : 'prices';
  });
  /** The planner has checked the values far from their history and accepts them. */
  protected readonly acceptWarnings = signal(false);
  protected readonly deliveryPoint = signal<string | null>(null);
  protected readonly file = signal<File | null>(null);
  protected readonly dragging = signal(false);
  protected readonly busy = signal<string | null>(null);
  protected readonly failure = signal<string | null>(null);

  protected readonly view = signal<ImportView | null>(null);
  protected readonly mapping = linkedSignal<Record<string, string | null>>(() => ({ ...(this.view()?.mapping ?? {}) }));
  protected readonly mappingChanged = computed(() => {
    const v = this.view();
    if (!v) return false;
    const now = this.mapping();
    return v.fields.some((f) => (now[f.field] ?? null) !== (v.mapping[f.field] ?? null));
  });
  protected readonly onExisting = signal<OnExisting>('update');

  protected readonly history = httpResource<ImportSummary[]>(() => ({ url: '/api/imports', params: { limit: 20 } }));
  protected readonly historyRows = computed(() => (this.history.hasValue() ? this.history.value() : []));

  /** Row → columns with a problem, to mark the preview. */
  protected readonly badCells = computed(() => {
    const out = new Map<number, Set<string | null>>();
    for (const e of this.view()?.errors ?? []) {
      if (e.row === null) continue;
      const set = out.get(e.row) ?? new Set<string | null>();
      set.add(e.column);
      out.set(e.row, set);
    }
    return out;
  });
  protected readonly progressPct = computed(() => {
    const p = this.view()?.progress;
    if (!p || p.total === 0) return 0;
    return Math.round((p.done / p.total) * 100);
  });
  protected readonly rowsToWrite = computed(() => {
    const w = this.view()?.toWrite;
    return w ? w.prices + w.records + w.factors + (w.contracts ?? 0) : 0;
  });
  protected readonly unitsLine = computed(() =>
    this.ref
      .items()
      .map((i) => `${i.code}: ${i.unit}`)
      .join(' · '),
  );

  protected setKind(kind: ImportKind): void {
    this.kind.set(kind);
    const file = this.file();
    // The kind is part of the upload: check the same file again as the new kind.
    if (file && this.view() && this.view()!.status !== 'committed') void this.#upload(file);
  }

  protected fileChosen(event: Event): void {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (file) void this.#take(file);
  }

  protected dropped(event: DragEvent): void {
    event.preventDefault();
    this.dragging.set(false);
    if (!this.canImport()) return;
    const file = event.dataTransfer?.files?.[0];
    if (file) void this.#take(file);
  }

  protected dragOver(event: DragEvent): void {
    event.preventDefault();
    this.dragging.set(true);
  }

  async #take(file: File): Promise<void> {
    const problem = fileProblem(file);
    if (problem) {
      this.failure.set(problem);
      return;
    }
    this.file.set(file);
    await this.#upload(file);
  }

  async #upload(file: File): Promise<void> {
    this.failure.set(null);
    this.busy.set(`Reading and checking ${file.name}…`);
    try {
      this.view.set(await this.#api.upload(file, this.kind(), { deliveryPoint: this.deliveryPoint() }));
      this.onExisting.set('update');
      this.history.reload();
      // The outcome is below the upload card: bring it into view.
      setTimeout(() => this.#host.nativeElement.querySelector('#result-heading')?.scrollIntoView?.({ block: 'start' }));
    } catch (error) {
      this.view.set(null);
      this.failure.set(`${file.name} was not imported: ${errorMessage(error)}`);
    } finally {
      this.busy.set(null);
    }
  }

  protected setMapping(field: string, column: string | null): void {
    this.mapping.update((m) => ({ ...m, [field]: column }));
  }

  protected async checkAgain(): Promise<void> {
    const v = this.view();
    if (!v) return;
    const mapping: Record<string, string | null> = {};
    for (const f of v.fields) mapping[f.field] = this.mapping()[f.field] ?? null;
    this.failure.set(null);
    this.busy.set(`Checking ${v.fileName} again…`);
    try {
      this.view.set(await this.#api.validate(v.id, { mapping, deliveryPoint: this.deliveryPoint(), decimalMark: this.view()?.decimalMark }));
      this.acceptWarnings.set(false);
    } catch (error) {
      this.failure.set(`Not checked again: ${errorMessage(error)}`);
    } finally {
      this.busy.set(null);
    }
  }

  /** Reads the file again with the other decimal mark (1234.5 or 1234,5), for this import only. */
  protected async setDecimalMark(mark: DecimalMark): Promise<void> {
    const v = this.view();
    if (!v || v.status === 'committed' || v.decimalMark === mark) return;
    this.view.set({ ...v, decimalMark: mark });
    await this.checkAgain();
  }

  /** Creates a season the file names but the co-op has not set up, then checks the file again. */
  protected async createSeason(season: { label: string; startYear: number }): Promise<void> {
    // The month the co-op's seasons usually start in (July when none is set up).
    const months = this.ref.seasons().map((s) => s.startMonth);
    const startMonth = months.length ? months.sort((a, b) => months.filter((m) => m === b).length - months.filter((m) => m === a).length)[0] : 7;
    this.failure.set(null);
    try {
      await this.#dataDesk.createSeason({ label: season.label, startYear: season.startYear, startMonth });
      this.ref.reloadAll();
      await this.checkAgain();
    } catch (error) {
      this.failure.set(`Season ${season.label} was not created: ${errorMessage(error)}`);
    }
  }

  protected async setDeliveryPoint(name: string | null): Promise<void> {
    this.deliveryPoint.set(name);
    if (this.view() && this.view()!.status !== 'committed') await this.checkAgain();
  }

  protected async commit(): Promise<void> {
    const v = this.view();
    if (!v || v.errorCount > 0) return;
    this.failure.set(null);
    try {
      const started = await this.#api.commit(v.id, this.onExisting(), this.acceptWarnings());
      this.view.set({ ...v, status: started.status, progress: started.progress, failure: null });
      await this.#follow(v.id);
    } catch (error) {
      this.failure.set(`The commit did not start: ${errorMessage(error)}`);
    }
  }

  /** Polls the import while it commits, so the progress bar moves; ends on committed or failed. */
  async #follow(id: number): Promise<void> {
    while (!this.#stopped) {
      await new Promise((r) => setTimeout(r, POLL_MS));
      try {
        const now = await this.#api.get(id);
        if (this.view()?.id !== id) return;
        this.view.set(now);
        if (now.status !== 'committing') break;
      } catch (error) {
        this.failure.set(`Lost track of the commit: ${errorMessage(error)}. Open it again from the list below.`);
        return;
      }
    }
    this.history.reload();
    if (this.view()?.status === 'committed') this.ref.reloadAll();
  }

  protected async open(id: number): Promise<void> {
    this.failure.set(null);
    this.busy.set('Opening the import…');
    try {
      const v = await this.#api.get(id);
      this.view.set(v);
      this.file.set(null);
      this.kind.set(v.kind);
      this.deliveryPoint.set(v.deliveryPoint);
      if (v.status === 'committing') void this.#follow(id);
    } catch (error) {
      this.failure.set(errorMessage(error));
    } finally {
      this.busy.set(null);
    }
  }

  protected startOver(): void {
    this.view.set(null);
    this.file.set(null);
    this.failure.set(null);
  }

  protected isBad(row: number, column: string): boolean {
    const set = this.badCells().get(row);
    return !!set && (set.has(column) || set.has(null));
  }

  protected statusLabel(status: ImportView['status']): string {
    return { validated: 'Checked', committing: 'Committing', committed: 'Committed', failed: 'Failed' }[status];
  }
}
