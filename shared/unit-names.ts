/**
 * Units named in import headers ("price (EUR/t)", "quantity [kg N]") or unit columns, compared with
 * the item's unit in the items table. Spelling variants are common practice, no source; anything
 * else must match the item's unit exactly (ignoring case and spaces), so "kg" never passes for
 * "kg N": product kilograms and nutrient kilograms differ (see docs/fertiliser.md §1).
 */

const ALIASES: Record<string, string> = {
  tonne: 't',
  tonnes: 't',
  'metric ton': 't',
  'metric tons': 't',
  l: 'l',
  litre: 'l',
  litres: 'l',
  liter: 'l',
  liters: 'l',
  hour: 'h',
  hours: 'h',
  hr: 'h',
  hrs: 'h',
  hectare: 'ha',
  hectares: 'ha',
};

/** A unit in a comparable spelling: lower case, no spaces, a few spelled-out names shortened. */
export function normalUnit(unit: string): string {
  const s = unit.trim().toLowerCase().replace(/\s+/g, ' ').replace(/^per /, '');
  return (ALIASES[s] ?? s).replace(/\s+/g, '');
}

export function sameUnit(a: string, b: string): boolean {
  return normalUnit(a) === normalUnit(b);
}

export interface HeaderParts {
  /** The header without its bracketed annotation, trimmed. */
  base: string;
  unit: string | null;
  currency: string | null;
}

/**
 * Splits "price (EUR/t)" into base "price", currency EUR, unit t; "quantity [kg N]" into unit "kg N";
 * "price (per t)" into unit t. Headers without brackets have neither.
 */
export function headerParts(header: string): HeaderParts {
  const m = /^(.*?)\s*[([]\s*([^)\]]*?)\s*[)\]]\s*$/.exec(header);
  if (!m || m[1].trim() === '') return { base: header.trim(), unit: null, currency: null };
  const inner = m[2];
  const slash = /^([A-Za-z]{3})\s*\/\s*(.+)$/.exec(inner);
  if (slash) return { base: m[1].trim(), currency: slash[1].toUpperCase(), unit: slash[2].trim() };
  const symbol = /^[^\w\s]\s*\/\s*(.+)$/.exec(inner);
  if (symbol) return { base: m[1].trim(), currency: null, unit: symbol[1].trim() };
  return { base: m[1].trim(), currency: null, unit: inner.trim().replace(/^per\s+/i, '') || null };
}

/**
 * A unit cell of a price table: "t", "per t", or with the currency as the prices grid shows it,
 * "EUR/t" or "€/t". The currency is null where the cell names none (or only a symbol).
 */
export function priceUnitParts(cell: string): { unit: string; currency: string | null } {
  const s = cell.trim();
  const coded = /^([A-Za-z]{3})\s*\/\s*(.+)$/.exec(s);
  if (coded) return { currency: coded[1].toUpperCase(), unit: coded[2].trim() };
  const symbol = /^[^\w\s]\s*\/\s*(.+)$/.exec(s);
  if (symbol) return { currency: null, unit: symbol[1].trim() };
  return { currency: null, unit: s };
}
