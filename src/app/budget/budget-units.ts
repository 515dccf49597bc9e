import { Injectable, computed, inject, signal } from '@angular/core';
import {
  inUnitSystem,
  KG_PER_LB,
  KG_PER_SHORT_TON,
  KG_PER_TONNE,
  lbToKg,
  shortTonsToTonnes,
  type UnitSystem,
} from '../../../shared/units';
import { SettingsStore } from '../core/settings-store';
import { NUTRIENT_LABEL, type Nutrient } from './budget-api-types';

const STORAGE_KEY = 'netput.budget.units';

function stored(): UnitSystem | null {
  try {
    const v = globalThis.localStorage?.getItem(STORAGE_KEY);
    return v === 'metric' || v === 'us' ? v : null;
  } catch {
    return null;
  }
}

/**
 * The unit system the budget pages show: the person's own choice (kept in this browser), else the
 * co-op's setting, else metric. The server converts results; this store only says which to ask for.
 */
@Injectable({ providedIn: 'root' })
export class BudgetUnitsStore {
  readonly #settings = inject(SettingsStore);
  readonly #chosen = signal<UnitSystem | null>(stored());

  readonly system = computed<UnitSystem>(() => this.#chosen() ?? this.#settings.settings()?.unitSystem ?? 'metric');

  choose(system: UnitSystem): void {
    this.#chosen.set(system);
    try {
      globalThis.localStorage?.setItem(STORAGE_KEY, system);
    } catch {
      // private mode: the choice lasts for this page only
    }
  }
}

/** The words a budget screen puts beside its numbers in one unit system. */
export interface UnitLabels {
  system: UnitSystem;
  /** Mass of nutrient: kg or lb. */
  mass: 'kg' | 'lb';
  /** Mass of product: t or short ton. */
  product: 't' | 'short ton';
  /** Plural for running text: "t" or "short tons". */
  productPlural: 't' | 'short tons';
  /** Per mass of product, e.g. "EUR/t" or "EUR/short ton". */
  pricePerProduct: string;
  /** Per mass of nutrient, e.g. "EUR/kg". */
  pricePerMass: string;
  /** "kg N", "lb P2O5"... */
  nutrient: (n: Nutrient) => string;
}

export function unitLabels(system: UnitSystem, currency: string): UnitLabels {
  const us = system === 'us';
  const mass = us ? 'lb' : 'kg';
  return {
    system,
    mass,
    product: us ? 'short ton' : 't',
    productPlural: us ? 'short tons' : 't',
    pricePerProduct: `${currency}/${us ? 'short ton' : 't'}`,
    pricePerMass: `${currency}/${mass}`,
    nutrient: (n) => `${mass} ${NUTRIENT_LABEL[n]}`,
  };
}

/*
 * Inputs the treasurer types in the unit system shown, converted to the metric the API takes with
 * the exact factors of shared/units.ts (1 lb = 0.45359237 kg, 1 short ton = 2000 lb).
 */

/** kg of nutrient → shown mass (kg or lb). */
export const massToShown = (kg: number, system: UnitSystem) => inUnitSystem(kg, 'kg', system).value;
/** Shown mass → kg. */
export const massFromShown = (v: number, system: UnitSystem) => (system === 'us' ? lbToKg(v) : v);
/** t of product → shown (t or short tons). */
export const productToShown = (t: number, system: UnitSystem) => inUnitSystem(t, 't', system).value;
/** Shown product mass → t. */
export const productFromShown = (v: number, system: UnitSystem) => (system === 'us' ? shortTonsToTonnes(v) : v);
/** Money per t → shown (per t or per short ton). */
export const pricePerTToShown = (perT: number, system: UnitSystem) => inUnitSystem(perT, 'per t', system).value;
/** Shown money per product mass → per t. */
export const pricePerTFromShown = (v: number, system: UnitSystem) => (system === 'us' ? (v * KG_PER_TONNE) / KG_PER_SHORT_TON : v);

/** Converts a figure shown in one system to the other (e.g. a price typed before the switch). */
export function convertShown(kind: 'mass' | 'product' | 'price', value: number, from: UnitSystem, to: UnitSystem): number {
  if (from === to) return value;
  const metric = kind === 'mass' ? massFromShown(value, from) : kind === 'product' ? productFromShown(value, from) : pricePerTFromShown(value, from);
  return kind === 'mass' ? massToShown(metric, to) : kind === 'product' ? productToShown(metric, to) : pricePerTToShown(metric, to);
}

/** The exact factors, for the page's note on units. */
export const UNIT_FACTORS = { kgPerLb: KG_PER_LB, kgPerShortTon: KG_PER_SHORT_TON } as const;
