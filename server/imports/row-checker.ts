/**
 * What the validator's core (import-validator.ts) offers the row checkers, and what a checker
 * offers the core. The core reads the file, finds and maps the header, collects errors and warnings
 * and runs the row loop; a checker knows one kind of file (price-rows.ts, record-rows.ts,
 * contract-rows.ts, observation-rows.ts): it checks the mapped header once, then each data row, and
 * adds the rows that pass to the writes.
 */
import type { Lookups, ValidationOptions } from './import-types.js';
import type { BuiltWrites } from './packed-rows.js';
import type { Parsed, SeasonRef } from '../../shared/cell-parsers.js';
import { numberInMessage, TEXT_MAX } from '../../shared/field-limits.js';

export type Item = Lookups['items'][number];
export type FarmRef = Lookups['farms'][number];
export type DeliveryPointRef = Lookups['deliveryPoints'][number];

/** Longest price source kept (characters). */
export const MAX_SOURCE_CHARS = TEXT_MAX.source;

/** A number as messages show it. */
export const fmt = numberInMessage;

/** The bounds a number cell is checked against: each is a field's limit in shared/field-limits.ts. */
export type NumberRule = 'price' | 'quantity' | 'land' | 'factor' | 'contractPrice' | 'contractQuantity';

/** One kind's checks. The core calls `header` once the columns are mapped, `row` for each data row (not when the header lets no row through), `finish` after the last row. */
export interface RowChecker {
  header(headerRow: number): void;
  row(n: number, raw: string[]): void;
  finish?(): void;
}

/** The core as a checker sees it: the file's header and mapping, the lookups, the cell parsers and where problems and rows go. */
export interface CheckContext {
  readonly options: ValidationOptions;
  readonly lookups: Lookups;
  /** The columns as headed. */
  readonly columns: readonly string[];
  /** `{ field: column }` after suggestions and the planner's choices. */
  readonly mapping: Readonly<Record<string, string>>;
  /** Column index of each mapped field. */
  readonly col: ReadonlyMap<string, number>;
  /** The delivery point chosen for the whole file (options.deliveryPoint), if any. */
  readonly chosenDeliveryPoint: DeliveryPointRef | null;
  /** Whether the current data row has an error so far. */
  readonly rowHasError: boolean;
  readonly writes: BuiltWrites;

  error(row: number | null, column: string | null, message: string): void;
  /** A value that may be right but is asked about: the commit needs the planner to accept the warnings. */
  warning(row: number, column: string | null, message: string): void;
  /** A note for the whole file (said once). */
  note(text: string): void;
  /** The header lacks what every row needs: no row is checked or counted as valid. */
  blockRows(): void;

  /** A mapped field's cell, trimmed, formula escape removed; undefined when the field is not mapped. */
  text(raw: string[], field: string): string | undefined;
  /** The column a field is mapped to, as headed (the field name when unmapped). */
  columnOf(field: string): string;
  /** The unit and currency written in the header of a field's column ("price (EUR/t)"). */
  unitFromHeader(field: string): { unit: string | null; currency: string | null };
  /** Parses repeated cells (the same item, season or date on many rows) once. */
  cached<T>(kind: string, s: string, parse: () => Parsed<T>): Parsed<T>;
  /** A required cell parsed: an empty cell or a parse failure is an error (null); an unmapped field is null without one. */
  required<T>(n: number, field: string, s: string | undefined, parse: (s: string) => Parsed<T>): T | null;
  readonly item: (s: string) => Parsed<Item>;
  readonly farm: (s: string) => Parsed<FarmRef>;
  readonly deliveryPoint: (s: string) => Parsed<DeliveryPointRef>;
  /** The season of a row; a well-formed season that is not set up yet is remembered, to be offered for creation. */
  seasonOf(n: number, s: string | undefined): SeasonRef | null;
  /** A number in the co-op's (or the file's) decimal convention, within the range its rule keeps. */
  numberIn(n: number, column: string, s: string, rule: NumberRule): number | null;
  /** The item's unit against the one in the value column's header and the one in the row's unit cell. */
  checkUnit(n: number, item: Item, headerUnit: string | null, cellUnit: string | undefined, valueField: 'price' | 'quantity'): void;
  /** False, with an error, when an earlier row had the same natural key. */
  firstTime(key: string, n: number, what: string): boolean;
  /** A delivery point by name (case and spacing ignored). */
  deliveryPointNamed(name: string): DeliveryPointRef | undefined;
}
