import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom, type Observable } from 'rxjs';
import type { UnitSystem } from '../../../shared/units';
import type { BudgetInput, BudgetPreview, BudgetView, FertiliserProduct, FertiliserProductInput } from './budget-api-types';

/** The treasurer's writes to budgets and fertiliser products (page reads go through `httpResource`). */
@Injectable({ providedIn: 'root' })
export class BudgetApi {
  readonly #http = inject(HttpClient);

  /** Computes without saving; an Observable so a newer edit can cancel an older preview. */
  preview(input: BudgetInput, units: UnitSystem): Observable<BudgetPreview> {
    return this.#http.post<BudgetPreview>('/api/budgets/preview', input, { params: { units } });
  }

  create(input: BudgetInput, units: UnitSystem): Promise<BudgetView> {
    return firstValueFrom(this.#http.post<BudgetView>('/api/budgets', input, { params: { units } }));
  }

  update(id: number, input: BudgetInput, units: UnitSystem): Promise<BudgetView> {
    return firstValueFrom(this.#http.put<BudgetView>(`/api/budgets/${id}`, input, { params: { units } }));
  }

  remove(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/budgets/${id}`, { responseType: 'text' }));
  }

  createProduct(product: FertiliserProductInput): Promise<FertiliserProduct> {
    return firstValueFrom(this.#http.post<FertiliserProduct>('/api/fertiliser-products', product));
  }

  updateProduct(id: number, product: FertiliserProductInput): Promise<FertiliserProduct> {
    return firstValueFrom(this.#http.put<FertiliserProduct>(`/api/fertiliser-products/${id}`, product));
  }

  removeProduct(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/fertiliser-products/${id}`, { responseType: 'text' }));
  }
}

/** Where the export of a saved budget downloads from (a plain link: the session cookie authorises it). */
export function exportUrl(id: number, format: 'csv' | 'xlsx', units: UnitSystem): string {
  return `/api/budgets/${id}/export?format=${format}&units=${units}`;
}
