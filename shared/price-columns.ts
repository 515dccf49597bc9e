/**
 * The columns of a price table as files and pasted blocks carry them: the import reads them, the
 * export writes them in this order (so a downloaded file re-imports unchanged), and a block pasted
 * into the prices grid is read by the same header spellings. Declared once here; the import's fields
 * (server/imports/import-fields.ts), the export's columns (server/exports/data-exports.ts), the
 * paste reader (src/app/data-desk/paste.ts) and the prices grid's headings derive from it.
 */
export interface PriceColumn {
  /** The field name, also the export's header. */
  field: 'item' | 'season' | 'delivery_point' | 'price' | 'unit' | 'currency' | 'source' | 'observed_on';
  label: string;
  /** Required in an import and a pasted block (delivery point may come from a choice for the whole file). */
  required: boolean;
  /** Other header spellings mapped to this field automatically (compared without case, `_`, `-`). */
  synonyms: readonly string[];
  /** How the export writes the cells. */
  type: 'text' | 'number' | 'date';
  /** Export column width in characters (XLSX). */
  width: number;
}

export const PRICE_COLUMNS: readonly PriceColumn[] = [
  { field: 'item', label: 'Item', required: true, synonyms: ['item code', 'product', 'commodity'], type: 'text', width: 12 },
  { field: 'season', label: 'Season', required: true, synonyms: ['crop year', 'marketing year', 'year'], type: 'text', width: 10 },
  { field: 'delivery_point', label: 'Delivery point', required: true, synonyms: ['point', 'location', 'depot', 'site'], type: 'text', width: 20 },
  { field: 'price', label: 'Price', required: true, synonyms: ['unit price'], type: 'number', width: 12 },
  // The grid shows the unit as "EUR/t" in its Per column; a unit cell may carry the currency that way.
  { field: 'unit', label: 'Unit', required: false, synonyms: ['units', 'uom', 'price unit', 'per'], type: 'text', width: 10 },
  { field: 'currency', label: 'Currency', required: false, synonyms: ['ccy'], type: 'text', width: 10 },
  { field: 'source', label: 'Source', required: false, synonyms: ['price source'], type: 'text', width: 40 },
  { field: 'observed_on', label: 'Observed on', required: true, synonyms: ['observed date', 'observed', 'date', 'price date'], type: 'date', width: 12 },
];

export type PriceColumnField = PriceColumn['field'];

/** Each column's label (grid headings, messages). */
export const PRICE_COLUMN_LABEL = Object.fromEntries(PRICE_COLUMNS.map((c) => [c.field, c.label])) as Record<PriceColumnField, string>;

/** The columns a file or a pasted block must have. */
export const REQUIRED_PRICE_FIELDS: readonly PriceColumnField[] = PRICE_COLUMNS.filter((c) => c.required).map((c) => c.field);

/** A header spelling in comparable form: lower case, `_`, `-` and runs of spaces as one space. */
export function normalColumnName(name: string): string {
  return name.toLowerCase().replace(/[\s_-]+/g, ' ').trim();
}

/** Every spelling of every column (its field name first), normalised, to the column's field. */
export const PRICE_HEADER_NAMES: ReadonlyMap<string, PriceColumnField> = new Map(
  PRICE_COLUMNS.flatMap((c) => [c.field, ...c.synonyms].map((s) => [normalColumnName(s), c.field] as const)),
);
