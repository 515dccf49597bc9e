/**
 * Types of the import reader, validator, worker and service. What the API answers with (and the
 * client reads) is declared in shared/import-types.ts.
 */
import type { ImportFormat, ImportKind, ImportReport, TableName } from '../../shared/import-types.js';
import type { BuiltWrites } from './packed-rows.js';
import type { DecimalMark } from '../../shared/cell-parsers.js';
import type { QuantityHistory, SeasonPrices } from '../../shared/plausibility.js';

export { IMPORT_KINDS, IMPORT_STATUSES } from '../../shared/import-types.js';
export type {
  CommitCounts,
  ImportError,
  ImportField,
  ImportFormat,
  ImportKind,
  ImportReport,
  ImportResult,
  ImportStatus,
  ImportSummary,
  ImportView,
  OnExisting,
  PreviewRow,
  TableCounts,
  TableName,
} from '../../shared/import-types.js';

/** The reference data a file is checked against (read from the database before each validation). */
export interface Lookups {
  items: { id: number; code: string; name: string; unit: string; role: 'output' | 'input' }[];
  seasons: { id: number; label: string; startYear: number; startsOn: string }[];
  farms: { id: number; code: string }[];
  deliveryPoints: { id: number; name: string }[];
  /** The co-op's currency (settings): the default for prices that name none. */
  currency: string;
  /** How the co-op writes decimals (settings); an import may choose otherwise. */
  decimalMark: DecimalMark;
  /** Each item's median price season by season, by item id, for the plausibility warnings. */
  priceHistory?: Record<number, SeasonPrices>;
  /** Each farm's quantity per hectare of each item over its own seasons, keyed `farmId|itemId`, for the records' plausibility warnings. */
  recordHistory?: Record<string, QuantityHistory>;
  /** Each farm's stored land (ha) by `farmId|seasonId`, for records whose row gives none. */
  land?: Record<string, number>;
}

export interface ValidationOptions {
  kind: ImportKind;
  fileName: string;
  /** `{ targetField: sourceColumn }`; a field mapped to null or '' is left unmapped. Overrides the suggestion. */
  mapping?: Record<string, string | null>;
  /** Delivery point for prices that name none (observation files; price files without the column). */
  deliveryPoint?: string;
  /** How the file writes decimals, when the planner chose for this import; else the co-op's setting. */
  decimalMark?: DecimalMark;
}

export interface PriceWrite {
  row: number;
  itemId: number;
  seasonId: number;
  deliveryPointId: number;
  price: number;
  currency: string;
  source: string;
  observedOn: string;
}

export interface RecordWrite {
  row: number;
  farmId: number;
  seasonId: number;
  itemId: number;
  quantity: number;
}

export interface FactorWrite {
  row: number;
  farmId: number;
  seasonId: number;
  factor: string;
  value: number;
}

/** A forward delivery contract (issue 19); its contract number is the natural key. */
export interface ContractWrite {
  row: number;
  reference: string;
  farmId: number;
  seasonId: number;
  itemId: number;
  quantity: number;
  /** Minor units (cents) per item unit. */
  priceCents: number;
  currency: string;
  deliveryFrom: string;
  deliveryTo: string;
  status: string;
}

export interface ImportWrites {
  prices: PriceWrite[];
  records: RecordWrite[];
  factors: FactorWrite[];
  contracts: ContractWrite[];
}

/** What reading and checking a file found, with the rows ready for the database (packed in columns). */
export interface ValidationOutcome extends ImportReport {
  writes: BuiltWrites;
}

// Every table an import writes has a name in the shared TableName.
const _tableNames: Record<keyof ImportWrites, TableName> = { prices: 'prices', records: 'records', factors: 'factors', contracts: 'contracts' };
void _tableNames;
