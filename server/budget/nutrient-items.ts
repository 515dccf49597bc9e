import type { Db } from '../db/client.js';
import { itemLabelsByCodes, itemsByCodes, type ItemRow } from './budget-repository.js';
import type { FitResult } from '../estimation/index.js';
import type { NutrientItem } from './model-demand.js';
import { BudgetInputError, GRADE_FIELD, NUTRIENTS, type Nutrient } from './nutrients.js';

/** kg of nutrient per unit of an item measured in kg or t of nutrient (or of a graded product). */
export function kgPerUnit(item: ItemRow, nutrient: Nutrient): number {
  const unit = item.unit.trim().toLowerCase();
  const mass = /^kg\b/.test(unit) ? 1 : /^(t|tonnes?|metric tons?)\b/.test(unit) ? 1000 : null;
  if (mass === null) throw new BudgetInputError(`The model item "${item.code}" is measured in "${item.unit}"; a budget needs kg or t of ${nutrient}`, `source.items.${nutrient}`);
  const pct = item[GRADE_FIELD[nutrient]];
  return (mass * (pct ?? 100)) / 100;
}

/** The model item of each nutrient: as named, or the fertiliser item carrying only that nutrient at 100 %. */
export async function nutrientItemsOf(db: Db, fit: FitResult, named: Partial<Record<Nutrient, string>> | undefined): Promise<Record<Nutrient, NutrientItem>> {
  const codes = fit.layout.items.filter((i) => i.role === 'input').map((i) => i.name);
  const rows = codes.length ? await itemsByCodes(db, codes) : [];
  const out = {} as Record<Nutrient, NutrientItem>;
  for (const n of NUTRIENTS) {
    let row: (typeof rows)[number] | undefined;
    if (named?.[n]) {
      row = rows.find((r) => r.code === named[n]);
      if (!row) throw new BudgetInputError(`"${named[n]}" is not an input item of the model run (inputs: ${codes.join(', ')})`, `source.items.${n}`);
    } else {
      const pure = rows.filter((r) => r.category === 'fertiliser' && r[GRADE_FIELD[n]] === 100 && NUTRIENTS.every((m) => m === n || !r[GRADE_FIELD[m]]));
      if (pure.length !== 1)
        throw new BudgetInputError(
          pure.length
            ? `The model run has several ${n} items (${pure.map((r) => r.code).join(', ')}); name one in source.items.${n}`
            : `The model run has no ${n} item; use a model with nitrogen, phosphate and potash items, name one in source.items.${n}, or enter the demand by hand (source.kind "manual")`,
          `source.items.${n}`,
        );
      row = pure[0]!;
    }
    out[n] = { code: row.code, kgPerUnit: kgPerUnit(row, n) };
  }
  return out;
}

/**
 * The name and unit of each item a source prices (`wheat` → Wheat, t), so the page can show
 * "Wheat EUR 212.10/t" rather than a bare code and number. An item gone from the list keeps its code.
 */
export async function priceItemsOf(db: Db, codes: readonly string[]): Promise<Record<string, { name: string; unit: string }>> {
  const rows = codes.length ? await itemLabelsByCodes(db, [...codes]) : [];
  return Object.fromEntries(
    codes.map((code) => {
      const row = rows.find((r) => r.code === code);
      return [code, { name: row?.name ?? code, unit: row?.unit ?? '' }];
    }),
  );
}
