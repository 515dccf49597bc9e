/**
 * The two rules a repository's list filter gives a list of ids (or other values), written once:
 * `onlyIn` keeps the rows named (an empty list matches none, as for a member without a farm or a
 * choice of no rows); `inAny` narrows to the values when any are given (an empty list is a filter
 * left off). Both give `undefined` for "no condition", which drizzle's `and()` leaves out.
 */
import { inArray, type Column, type GetColumnData, type SQL } from 'drizzle-orm';

/** Rows whose `column` is one of `values`; no condition when there is no list, none match when it is empty. */
export function onlyIn<C extends Column>(column: C, values: readonly GetColumnData<C, 'raw'>[] | undefined): SQL | undefined {
  return values === undefined ? undefined : inArray(column, values);
}

/** Rows whose `column` is one of `values` when any are given; no condition for a missing or empty list. */
export function inAny<C extends Column>(column: C, values: readonly GetColumnData<C, 'raw'>[] | undefined): SQL | undefined {
  return values?.length ? inArray(column, values) : undefined;
}
