/**
 * Quantities in tonnes for the capacity comparison: items counted in t stay as they are; items in
 * kilograms of a nutrient or product become tonnes of it (1 t = 1000 kg, SI). Litres and hours have
 * no mass here (diesel density varies by grade; common practice, no source), so they get none.
 * The exact mass and area factors live in shared/units.ts; this only maps an item's unit name to tonnes.
 */
import { normalUnit } from '../../shared/unit-names.js';

export interface TonnesConversion {
  unit: string;
  factor: number;
}

export function tonnesOf(unit: string): TonnesConversion | null {
  const u = normalUnit(unit);
  if (u === 't') return { unit: 't', factor: 1 };
  const kg = /^kg\s*(.*)$/i.exec(unit.trim());
  if (kg) return { unit: `t${kg[1] ? ` ${kg[1].trim()}` : ''}`, factor: 1 / 1000 };
  return null;
}

/** Outputs delivered to the co-op's stores: those counted in tonnes. */
export function isDeliveredInTonnes(unit: string): boolean {
  return normalUnit(unit) === 't';
}
