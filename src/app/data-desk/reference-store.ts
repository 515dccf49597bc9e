import { httpResource } from '@angular/common/http';
import { Injectable, computed, inject } from '@angular/core';
import type { DeliveryPoint, Item, PriceIndex, Season } from '../../../shared/api-types';
import { AuthStore } from '../core/auth-store';

/**
 * The reference data every data-desk page looks things up in: items, seasons, delivery points and
 * price indexes. Read once per signed-in person and reloaded after a change.
 */
@Injectable({ providedIn: 'root' })
export class ReferenceStore {
  readonly #auth = inject(AuthStore);
  /** Changes with the person signed in, so one person's answers are never shown to the next. */
  readonly #who = computed(() => this.#auth.user()?.id ?? null);

  readonly itemsResource = httpResource<Item[]>(() => (this.#who() !== null ? '/api/items' : undefined));
  readonly seasonsResource = httpResource<Season[]>(() => (this.#who() !== null ? '/api/seasons' : undefined));
  readonly deliveryPointsResource = httpResource<DeliveryPoint[]>(() => (this.#who() !== null ? '/api/delivery-points' : undefined));
  readonly priceIndexesResource = httpResource<PriceIndex[]>(() => (this.#who() !== null ? '/api/price-indexes' : undefined));

  readonly items = computed(() => (this.itemsResource.hasValue() ? this.itemsResource.value() : []));
  /** Oldest first (the server orders by start year). */
  readonly seasons = computed(() => (this.seasonsResource.hasValue() ? this.seasonsResource.value() : []));
  readonly deliveryPoints = computed(() => (this.deliveryPointsResource.hasValue() ? this.deliveryPointsResource.value() : []));
  readonly priceIndexes = computed(() => (this.priceIndexesResource.hasValue() ? this.priceIndexesResource.value() : []));

  readonly loaded = computed(() => this.itemsResource.hasValue() && this.seasonsResource.hasValue() && this.deliveryPointsResource.hasValue());
  readonly error = computed(() => this.itemsResource.error() ?? this.seasonsResource.error() ?? this.deliveryPointsResource.error() ?? null);

  readonly lookups = computed<Lookups>(() => makeLookups(this.items(), this.seasons(), this.deliveryPoints()));

  reloadAll(): void {
    this.itemsResource.reload();
    this.seasonsResource.reload();
    this.deliveryPointsResource.reload();
    this.priceIndexesResource.reload();
  }
}

/** Items, seasons and delivery points by the spellings a person types or pastes. */
export interface Lookups {
  items: readonly Item[];
  seasons: readonly Season[];
  deliveryPoints: readonly DeliveryPoint[];
  itemById: ReadonlyMap<number, Item>;
  seasonById: ReadonlyMap<number, Season>;
  deliveryPointById: ReadonlyMap<number, DeliveryPoint>;
  /** By code or name, lower case. */
  item(text: string): Item | undefined;
  /** By label (2024/25) or start year (2024). */
  season(text: string): Season | undefined;
  /** By name, lower case, spaces collapsed. */
  deliveryPoint(text: string): DeliveryPoint | undefined;
}

const norm = (s: string) => s.trim().toLowerCase().replace(/\s+/g, ' ');

export function makeLookups(items: readonly Item[], seasons: readonly Season[], deliveryPoints: readonly DeliveryPoint[]): Lookups {
  const itemByKey = new Map<string, Item>();
  for (const it of items) itemByKey.set(norm(it.code), it);
  for (const it of items) if (!itemByKey.has(norm(it.name))) itemByKey.set(norm(it.name), it);
  const seasonByKey = new Map<string, Season>();
  for (const s of seasons) {
    seasonByKey.set(norm(s.label), s);
    seasonByKey.set(String(s.startYear), s);
  }
  const dpByKey = new Map(deliveryPoints.map((d) => [norm(d.name), d]));
  return {
    items,
    seasons,
    deliveryPoints,
    itemById: new Map(items.map((i) => [i.id, i])),
    seasonById: new Map(seasons.map((s) => [s.id, s])),
    deliveryPointById: new Map(deliveryPoints.map((d) => [d.id, d])),
    item: (text) => itemByKey.get(norm(text)),
    season: (text) => seasonByKey.get(norm(text)),
    deliveryPoint: (text) => dpByKey.get(norm(text)),
  };
}
