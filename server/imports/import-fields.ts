/**
 * The fields each kind of import fills, with the header spellings that map to them automatically.
 * Field names are also the column headers of our exports, so an exported file maps itself.
 */
import type { ImportField, ImportKind, Lookups } from './import-types.js';
import { headerParts } from '../../shared/unit-names.js';
import { PRICE_COLUMNS } from '../../shared/price-columns.js';
import { FACTOR_NAME } from '../../shared/data-schemas.js';

export interface FieldDef extends ImportField {
  /** Header spellings (compared after `normalHeader`) suggested for this field. */
  synonyms: string[];
}

const f = (field: string, label: string, required: boolean, synonyms: string[]): FieldDef => ({ field, label, required, synonyms: [field, ...synonyms].map(normalHeader) });

/** The price table's columns, declared in shared/price-columns.ts. */
export const PRICE_FIELDS: FieldDef[] = PRICE_COLUMNS.map((c) => f(c.field, c.label, c.required, [...c.synonyms]));

export const RECORD_FIELDS: FieldDef[] = [
  f('farm', 'Farm', true, ['farm code', 'farm id']),
  f('season', 'Season', true, ['crop year', 'year']),
  f('item', 'Item', false, ['item code', 'product']),
  f('quantity', 'Quantity', false, ['qty', 'amount']),
  f('unit', 'Unit', false, ['units', 'uom']),
  f('land_ha', 'Land (ha)', false, ['land', 'land ha', 'area', 'hectares']),
];

/** Forward delivery contracts (issue 19): one row per contract, keyed by its number. */
export const CONTRACT_FIELDS: FieldDef[] = [
  f('reference', 'Contract number', true, ['contract', 'contract number', 'contract no', 'number', 'ref']),
  f('farm', 'Farm', true, ['farm code', 'farm id']),
  f('season', 'Season', true, ['crop year', 'year']),
  f('item', 'Item', true, ['crop', 'item code', 'product']),
  f('quantity', 'Quantity', true, ['tonnes', 'qty', 'amount']),
  f('price', 'Contract price', true, ['contract price', 'price per unit']),
  f('currency', 'Currency', false, ['ccy']),
  f('delivery_from', 'First delivery month', true, ['first delivery month', 'first delivery', 'from', 'delivery start', 'deliver from']),
  f('delivery_to', 'Last delivery month', true, ['last delivery month', 'last delivery', 'to', 'delivery end', 'deliver to']),
  f('status', 'Status', false, ['state']),
];

/** Factor names of `fixed:<name>` columns; land is stored as land_ha, in hectares. */
export function fixedFactorName(name: string): string {
  const n = name.trim().toLowerCase();
  return n === 'land' ? 'land_ha' : n;
}

/** A fixed factor's name as stored (shared/data-schemas.ts). */
export { FACTOR_NAME };

/** The wide layout of the fit command: its fields follow the items table and the file's fixed columns. */
export function observationFields(lookups: Lookups, columns: string[]): FieldDef[] {
  const out: FieldDef[] = [f('season', 'Season', true, ['year']), f('farm', 'Farm', false, ['farm code', 'farm id'])];
  for (const it of lookups.items) {
    // By code first (the fit command's form), then by the item's name.
    const spellings = (prefix: string) => [normalHeader(`${prefix}:${it.code}`), normalHeader(`${prefix}:${it.name}`)];
    out.push({ field: `price:${it.code}`, label: `Price of ${it.name}`, required: false, synonyms: spellings('price') });
    out.push({ field: `${it.role}:${it.code}`, label: `${it.role === 'output' ? 'Output' : 'Input'} of ${it.name}`, required: false, synonyms: spellings(it.role) });
  }
  const factors = new Set(['land_ha']);
  for (const c of columns) {
    // normalHeader reads `_`, `-` and spaces alike; a factor name keeps them as `_` (fixed:irrigated_ha → irrigated_ha).
    const m = /^fixed:(.+)$/.exec(normalHeader(c));
    const name = m ? fixedFactorName(m[1].replace(/ /g, '_')) : null;
    if (name && FACTOR_NAME.test(name)) factors.add(name);
  }
  for (const name of factors) {
    const synonyms = [normalHeader(`fixed:${name}`), ...(name === 'land_ha' ? [normalHeader('fixed:land')] : [])];
    out.push({ field: `fixed:${name}`, label: name === 'land_ha' ? 'Land (ha)' : `Fixed factor ${name}`, required: false, synonyms });
  }
  return out;
}

export function fieldsFor(kind: ImportKind, lookups: Lookups, columns: string[]): FieldDef[] {
  if (kind === 'prices') return PRICE_FIELDS;
  if (kind === 'records') return RECORD_FIELDS;
  if (kind === 'contracts') return CONTRACT_FIELDS;
  return observationFields(lookups, columns);
}

/** A header in comparable form: annotation dropped, lower case, `_`/`-`/spaces as one space, none around `:`. */
export function normalHeader(header: string): string {
  return headerParts(header)
    .base.toLowerCase()
    .replace(/[\s_-]+/g, ' ')
    .replace(/\s*:\s*/g, ':')
    .trim();
}

/** Each field gets the first unused column whose header is one of its spellings (exact field names first). */
export function suggestMapping(fields: FieldDef[], columns: string[], usable: (column: string) => boolean): Record<string, string> {
  const used = new Set<string>();
  const out: Record<string, string> = {};
  const normal = columns.map(normalHeader);
  for (const pass of [0, 1]) {
    for (const def of fields) {
      if (out[def.field]) continue;
      const wanted = pass === 0 ? [def.synonyms[0]] : def.synonyms;
      const i = normal.findIndex((h, k) => wanted.includes(h) && !used.has(columns[k]) && usable(columns[k]));
      if (i >= 0) {
        out[def.field] = columns[i];
        used.add(columns[i]);
      }
    }
  }
  return out;
}

/** Spreadsheet column letters: 0 → A, 25 → Z, 26 → AA. */
export function columnLetter(index: number): string {
  let s = '';
  for (let n = index + 1; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}
