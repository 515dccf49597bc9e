import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import type { ColDef, GridApi, GridReadyEvent, ICellRendererParams } from 'ag-grid-community';
import { inUnitSystem } from '../../../shared/units';
import { ACCESS, roleAllows } from '../core/access';
import { errorMessage } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { SettingsStore } from '../core/settings-store';
import { CautionNote } from '../shared/caution-note';
import { AgGridAngular } from '../shared/grid';
import { gradeOf } from './budget-form';
import { formatPrice, formatTonnes } from './budget-format';
import { GRADE_FIELD, NUTRIENT_LABEL, NUTRIENTS, type FertiliserProduct, type Nutrient } from './budget-api-types';
import { BudgetUnitsStore, pricePerTToShown, productToShown, unitLabels } from './budget-units';
import { ProductDialog, type ProductDialogData } from './product-dialog';
import { UnitSwitch } from './unit-switch';
import { LoadProblem } from '../shared/load-problem';
import { GridSearch } from '../shared/grid-search';

const FORM_LABEL = { solid: 'Solid', liquid: 'Liquid', gas: 'Gas (pressurised)' } as const;

/** Price per kg (or lb) of a nutrient for a product carrying only that nutrient; null for blends (MAP, DAP). */
export function pricePerNutrient(p: FertiliserProduct, n: Nutrient): number | null {
  const carries = NUTRIENTS.filter((m) => p[GRADE_FIELD[m]] > 0);
  if (carries.length !== 1 || carries[0] !== n) return null;
  return p.pricePerT / (p[GRADE_FIELD[n]] * 10);
}

/** A product carrying `n` and another nutrient too (DAP, MAP): one price, no single nutrient to put it on. */
export function isBlendCarrying(p: FertiliserProduct, n: Nutrient): boolean {
  return p[GRADE_FIELD[n]] > 0 && NUTRIENTS.some((m) => m !== n && p[GRADE_FIELD[m]] > 0);
}

/** Why a blend has no price per kg of one nutrient, in the page's words ("N and P2O5"). */
export function blendReason(p: FertiliserProduct): string {
  const carried = NUTRIENTS.filter((m) => p[GRADE_FIELD[m]] > 0).map((m) => NUTRIENT_LABEL[m]);
  const list = carried.length > 1 ? `${carried.slice(0, -1).join(', ')} and ${carried.at(-1)}` : carried.join('');
  return `${p.name} carries ${list} together, so its price is not split per nutrient; budgets cost it on the mix, crediting every nutrient it carries.`;
}

/** `/budget/products`: the fertiliser products budgets plan with. Treasurers keep the list; others read it. */
@Component({
  selector: 'np-fertiliser-products',
  imports: [RouterLink, AgGridAngular, MatAnchor, MatButton, GridSearch, MatIcon, MatProgressBar, CautionNote, UnitSwitch, LoadProblem],
  templateUrl: './fertiliser-products.html',
  styleUrl: './fertiliser-products.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FertiliserProducts {
  // services
  readonly #auth = inject(AuthStore);
  readonly #dialog = inject(MatDialog);
  readonly #snackBar = inject(MatSnackBar);
  readonly #settings = inject(SettingsStore);
  readonly #units = inject(BudgetUnitsStore);

  protected readonly products = httpResource<FertiliserProduct[]>(() => '/api/fertiliser-products');
  protected readonly rows = computed(() => (this.products.hasValue() ? this.products.value() : []));
  protected readonly canEdit = computed(() => roleAllows(this.#auth.role(), ACCESS.budgetEdit));
  protected readonly problem = computed(() => (this.products.error() ? errorMessage(this.products.error()) : null));
  protected readonly currency = computed(() => this.#settings.settings()?.currency ?? this.rows()[0]?.currency ?? '');
  protected readonly quickFilter = signal('');
  readonly #grid = signal<GridApi<FertiliserProduct> | null>(null);
  /** The listed blends (DAP, MAP), for the note on their blank per-nutrient prices. */
  protected readonly blends = computed(() => this.rows().filter((p) => NUTRIENTS.filter((n) => p[GRADE_FIELD[n]] > 0).length > 1));
  protected readonly mass = computed(() => unitLabels(this.#units.system(), '').mass);
  protected readonly blendNames = computed(() => {
    const names = this.blends().map((p) => p.name);
    return names.length > 1 ? `${names.slice(0, -1).join(', ')} and ${names.at(-1)}` : (names[0] ?? '');
  });

  protected readonly columns = computed<ColDef<FertiliserProduct>[]>(() => {
    const system = this.#units.system();
    const u = unitLabels(system, this.currency());
    const cols: ColDef<FertiliserProduct>[] = [
      { field: 'name', headerName: 'Product', pinned: 'left', minWidth: 160, flex: 1, filter: 'agTextColumnFilter', sort: 'asc' },
      { colId: 'grade', headerName: 'N-P2O5-K2O', width: 130, valueGetter: (p) => (p.data ? gradeOf(p.data) : '') },
      { field: 'form', headerName: 'Form', width: 160, valueFormatter: (p) => FORM_LABEL[p.value as keyof typeof FORM_LABEL] ?? String(p.value) },
      {
        colId: 'price',
        headerName: `Price, ${u.pricePerProduct}`,
        type: 'numericColumn',
        width: 170,
        filter: 'agNumberColumnFilter',
        valueGetter: (p) => (p.data ? pricePerTToShown(p.data.pricePerT, system) : null),
        valueFormatter: (p) => (p.value == null ? '' : formatPrice(p.value as number, p.data?.currency ?? '')),
      },
      {
        colId: 'lot',
        headerName: `Lot, ${u.productPlural}`,
        type: 'numericColumn',
        width: 130,
        valueGetter: (p) => (p.data ? productToShown(p.data.lotT, system) : null),
        valueFormatter: (p) => (p.value == null ? '' : formatTonnes(p.value as number)),
      },
      ...NUTRIENTS.map<ColDef<FertiliserProduct>>((n) => ({
        colId: `per-${n}`,
        headerName: `Per ${u.mass} ${NUTRIENT_LABEL[n]}`,
        type: 'numericColumn',
        width: 140,
        valueGetter: (p) => {
          const perKg = p.data ? pricePerNutrient(p.data, n) : null;
          return perKg === null ? null : inUnitSystem(perKg, 'per kg', system).value;
        },
        valueFormatter: (p) => (p.value == null ? '' : formatPrice(p.value as number, p.data?.currency ?? '')),
        // A blend shows "—" with its reason (also in the note under the grid) instead of a blank.
        cellRenderer: (p: ICellRendererParams<FertiliserProduct>) => {
          if (!p.data || !isBlendCarrying(p.data, n)) return p.valueFormatted ?? '';
          const mark = document.createElement('span');
          mark.className = 'blend';
          mark.textContent = '—*';
          mark.title = blendReason(p.data);
          mark.setAttribute('aria-label', `Not split per nutrient: ${blendReason(p.data)}`);
          return mark;
        },
      })),
      { field: 'supplier', headerName: 'Supplier', minWidth: 180, flex: 1, filter: 'agTextColumnFilter' },
      { field: 'active', headerName: 'In budgets', width: 120, valueFormatter: (p) => (p.value ? 'Yes' : 'No (kept aside)') },
      { field: 'gradeSource', headerName: 'Grade from', minWidth: 240, flex: 1 },
      { field: 'priceNote', headerName: 'Price from', minWidth: 200, flex: 1 },
    ];
    if (this.canEdit())
      cols.unshift({
        headerName: '',
        colId: 'edit',
        pinned: 'left',
        width: 84,
        sortable: false,
        resizable: false,
        cellRenderer: (p: ICellRendererParams<FertiliserProduct>) => {
          const button = document.createElement('button');
          button.type = 'button';
          button.className = 'np-grid-action';
          button.textContent = 'Edit';
          button.setAttribute('aria-label', `Edit ${p.data?.name ?? 'product'}`);
          button.addEventListener('click', () => p.data && this.editProduct(p.data));
          return button;
        },
      });
    return cols;
  });

  protected gridReady(event: GridReadyEvent<FertiliserProduct>): void {
    this.#grid.set(event.api);
  }

  protected exportCsv(): void {
    this.#grid()?.exportDataAsCsv({ fileName: 'netput-fertiliser-products.csv', columnKeys: this.columns().filter((c) => c.colId !== 'edit').map((c) => c.colId ?? String(c.field)) });
  }

  protected addProduct(): void {
    this.#open({ currency: this.currency(), system: this.#units.system() }, (p) => `${p?.name ?? "The product"} is added.`);
  }

  protected editProduct(product: FertiliserProduct): void {
    this.#open({ product, currency: this.currency(), system: this.#units.system() }, (p) => (p ? `${p.name} is saved.` : `${product.name} is deleted.`));
  }

  #open(data: ProductDialogData, done: (saved: FertiliserProduct | null) => string): void {
    this.#dialog
      .open<ProductDialog, ProductDialogData, FertiliserProduct | 'deleted'>(ProductDialog, { data, autoFocus: 'first-tabbable', maxWidth: '96vw' })
      .afterClosed()
      .subscribe((result) => {
        if (!result) return;
        this.#snackBar.open(done(result === 'deleted' ? null : result), 'OK');
        this.products.reload();
      });
  }
}
