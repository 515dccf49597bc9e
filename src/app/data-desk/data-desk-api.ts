import { HttpClient, type HttpResponse } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { DeliveryPoint, FarmRecordRow, Item, PriceIndex, PriceRow, Season } from '../../../shared/api-types';
import type { PriceInput } from '../../../shared/data-schemas';

export type ItemBody = Omit<Item, 'id'>;
export type SeasonBody = Pick<Season, 'label' | 'startYear' | 'startMonth'>;
export type DeliveryPointBody = Omit<DeliveryPoint, 'id'>;
export interface FarmBody {
  code: string;
  name: string;
  region: string;
  landHa: number;
}
/** A farm as the farm routes answer it (the list with members is GET /api/farms). */
export interface FarmRow extends FarmBody {
  id: number;
}
export interface PriceIndexBody {
  name: string;
  base: string;
  source: string;
  values: { seasonId: number; value: number }[];
}
export interface RecordKey {
  farmId: number;
  seasonId: number;
  itemId: number;
}
export interface RecordBody extends RecordKey {
  quantity: number;
  /** The version the edit started from (null: no record yet); left out, the row is written whatever is stored. */
  version?: number | null;
}
/** One farm's level of one fixed factor in one season (GET /api/records/factors). */
export interface FactorRow {
  farmId: number;
  farmCode: string;
  seasonId: number;
  season: string;
  factor: string;
  value: number;
}

export interface LandRow {
  farmId: number;
  farmCode: string;
  seasonId: number;
  season: string;
  landHa: number;
}

/**
 * The data desk's writes: reference data, farms, prices, price indexes, farm records and land. Every
 * write is audited by the server in the same transaction. Reads go through `httpResource` in the pages.
 */
@Injectable({ providedIn: 'root' })
export class DataDeskApi {
  readonly #http = inject(HttpClient);

  // --- reference data ---
  createItem(body: ItemBody): Promise<Item> {
    return firstValueFrom(this.#http.post<Item>('/api/items', body));
  }
  updateItem(id: number, body: ItemBody): Promise<Item> {
    return firstValueFrom(this.#http.put<Item>(`/api/items/${id}`, body));
  }
  deleteItem(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/items/${id}`, { responseType: 'text' }));
  }
  createSeason(body: SeasonBody): Promise<Season> {
    return firstValueFrom(this.#http.post<Season>('/api/seasons', body));
  }
  updateSeason(id: number, body: SeasonBody): Promise<Season> {
    return firstValueFrom(this.#http.put<Season>(`/api/seasons/${id}`, body));
  }
  deleteSeason(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/seasons/${id}`, { responseType: 'text' }));
  }
  createDeliveryPoint(body: DeliveryPointBody): Promise<DeliveryPoint> {
    return firstValueFrom(this.#http.post<DeliveryPoint>('/api/delivery-points', body));
  }
  updateDeliveryPoint(id: number, body: DeliveryPointBody): Promise<DeliveryPoint> {
    return firstValueFrom(this.#http.put<DeliveryPoint>(`/api/delivery-points/${id}`, body));
  }
  deleteDeliveryPoint(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/delivery-points/${id}`, { responseType: 'text' }));
  }

  // --- farms ---
  createFarm(body: FarmBody): Promise<FarmRow> {
    return firstValueFrom(this.#http.post<FarmRow>('/api/farms', body));
  }
  updateFarm(id: number, body: FarmBody): Promise<FarmRow> {
    return firstValueFrom(this.#http.put<FarmRow>(`/api/farms/${id}`, body));
  }
  deleteFarm(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/farms/${id}`, { responseType: 'text' }));
  }

  // --- prices ---
  /** One window of the price table (GET /api/prices, shared/price-query.ts) and how many rows match in all. */
  async pricePage(params: Record<string, string | number>): Promise<{ rows: PriceRow[]; total: number }> {
    const res = await firstValueFrom(this.#http.get<PriceRow[]>('/api/prices', { params, observe: 'response' }));
    const rows = res.body ?? [];
    const total = Number(res.headers.get('X-Total-Count'));
    return { rows, total: Number.isFinite(total) ? total : Number(params['offset'] ?? 0) + rows.length };
  }
  /** One row or a pasted block; the server writes all rows or none. */
  createPrices(rows: PriceInput[], confirmImplausible = false): Promise<PriceRow[]> {
    return firstValueFrom(this.#http.post<PriceRow[]>('/api/prices', { rows, ...(confirmImplausible ? { confirmImplausible } : {}) }));
  }
  /** `version`: the version the edit started from; a stale one answers 409 `stale` with the stored row. */
  updatePrice(id: number, body: PriceInput, version: number, confirmImplausible = false): Promise<PriceRow> {
    return firstValueFrom(this.#http.put<PriceRow>(`/api/prices/${id}`, { ...body, version, ...(confirmImplausible ? { confirmImplausible } : {}) }));
  }
  /** Deletes the chosen prices in one transaction: all of them or, if any is gone, none. */
  deletePrices(ids: number[]): Promise<{ deleted: number }> {
    return firstValueFrom(this.#http.post<{ deleted: number }>('/api/prices/deletions', { ids }));
  }
  createPriceIndex(body: PriceIndexBody): Promise<PriceIndex> {
    return firstValueFrom(this.#http.post<PriceIndex>('/api/price-indexes', body));
  }
  updatePriceIndex(id: number, body: PriceIndexBody): Promise<PriceIndex> {
    return firstValueFrom(this.#http.put<PriceIndex>(`/api/price-indexes/${id}`, body));
  }
  deletePriceIndex(id: number): Promise<unknown> {
    return firstValueFrom(this.#http.delete(`/api/price-indexes/${id}`, { responseType: 'text' }));
  }

  // --- farm records ---
  /** Inserts or replaces quantities, all or nothing; answers the farms' records of those seasons. */
  putRecords(rows: RecordBody[]): Promise<FarmRecordRow[]> {
    return firstValueFrom(this.#http.put<FarmRecordRow[]>('/api/records', { rows }));
  }
  deleteRecord(key: RecordKey): Promise<unknown> {
    return firstValueFrom(this.#http.delete('/api/records', { body: key, responseType: 'text' }));
  }
  putFactor(body: { farmId: number; seasonId: number; factor: string; value: number }): Promise<FactorRow[]> {
    return firstValueFrom(this.#http.put<FactorRow[]>('/api/records/factors', body));
  }
  deleteFactor(key: { farmId: number; seasonId: number; factor: string }): Promise<unknown> {
    return firstValueFrom(this.#http.delete('/api/records/factors', { body: key, responseType: 'text' }));
  }
  putLand(body: { farmId: number; seasonId: number; landHa: number }): Promise<LandRow[]> {
    return firstValueFrom(this.#http.put<LandRow[]>('/api/records/land', body));
  }

  /**
   * Downloads a server export (CSV or XLSX) and hands it to the browser as a file. Going through
   * HttpClient rather than a plain link means a failure shows the server's message, not a blank tab.
   */
  async download(url: string, fallbackName: string): Promise<string> {
    const response: HttpResponse<Blob> = await firstValueFrom(this.#http.get(url, { observe: 'response', responseType: 'blob' }));
    const disposition = response.headers.get('Content-Disposition') ?? '';
    const name = /filename="?([^";]+)"?/.exec(disposition)?.[1] ?? fallbackName;
    const href = URL.createObjectURL(response.body ?? new Blob());
    const a = document.createElement('a');
    a.href = href;
    a.download = name;
    document.body.appendChild(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(href), 10_000);
    return name;
  }
}
