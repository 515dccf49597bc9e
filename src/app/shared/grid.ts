import { isDevMode } from '@angular/core';
import {
  CellStyleModule,
  ClientSideRowModelModule,
  ColumnAutoSizeModule,
  CsvExportModule,
  InfiniteRowModelModule,
  LocaleModule,
  ModuleRegistry,
  NumberFilterModule,
  PaginationModule,
  QuickFilterModule,
  TextFilterModule,
  TooltipModule,
  ValidationModule,
  iconOverrides,
  provideGlobalGridOptions,
  themeQuartz,
  type ColDef,
  type SizeColumnsToContentStrategy,
} from 'ag-grid-community';
import { COLOUR, FONT, RADIUS, SPACE, TYPE } from '../../../shared/design-tokens';

export { AgGridAngular } from 'ag-grid-angular';

// The one place Netput's grids are set up: the modules they use, their theme and their words.
// Every grid in the app gets the theme and the words below through the global grid options, so a
// template names a theme only where it differs (the product plan's denseGridTheme). Components take
// AgGridAngular from here (re-exported below; the data desk's editing grids from data-desk/data-grid.ts,
// which adds its modules), so this registration has run wherever a grid is drawn.

// Only the grid features Netput's tables use (sorting is built in); ValidationModule explains
// misconfigured grids in development builds only.
ModuleRegistry.registerModules([
  ClientSideRowModelModule,
  // big tables read block by block from the server, sorted and narrowed there (the prices grid)
  InfiniteRowModelModule,
  // right-aligned numeric columns (`type: 'numericColumn'` sets a cell class)
  CellStyleModule,
  TextFilterModule,
  NumberFilterModule,
  QuickFilterModule,
  PaginationModule,
  CsvExportModule,
  // header and cell tooltips (headerTooltip, tooltipField)
  TooltipModule,
  // the grid's words (GRID_WORDS below)
  LocaleModule,
  // columns as wide as their content (autoSizeStrategy below)
  ColumnAutoSizeModule,
  ...(isDevMode() ? [ValidationModule] : []),
]);

/** A tick drawn as one rounded stroke, white on the field green when a row is picked. */
const TICK = `<svg xmlns="http://www.w3.org/2000/svg" width="16" height="16" viewBox="0 0 16 16"><path d="M3.5 8.5l3 3 6-7" fill="none" stroke="black" stroke-width="2.2" stroke-linecap="round" stroke-linejoin="round"/></svg>`;
const DASH = `<svg xmlns="http://www.w3.org/2000/svg" width="16" height="16" viewBox="0 0 16 16"><path d="M4 8h8" stroke="black" stroke-width="2.2" stroke-linecap="round"/></svg>`;

/**
 * The grid's own icons from the app's icon font (Material Symbols, already bundled): sorting as
 * arrows pointing the way the figures run, narrowing a column as a list being shortened, paging as
 * plain chevrons.
 */
const gridIcons = iconOverrides({
  type: 'font',
  family: 'Material Symbols Outlined',
  icons: {
    asc: 'arrow_upward_alt',
    desc: 'arrow_downward_alt',
    none: 'swap_vert',
    filter: 'filter_list',
    'filter-add': 'filter_list',
    menu: 'more_horiz',
    'menu-alt': 'more_horiz',
    first: 'first_page',
    previous: 'chevron_left',
    next: 'chevron_right',
    last: 'last_page',
    'small-down': 'expand_more',
    'small-up': 'expand_less',
    'small-left': 'chevron_left',
    'small-right': 'chevron_right',
    cancel: 'close',
    cross: 'close',
    search: 'search',
    tick: 'check',
    csv: 'download',
  },
});

/**
 * Netput's grid theme: ledger-like rows on the sheet colour with furrow lines between them, a
 * straw header in the heading face, no vertical rules, tabular figures, and the olive green for
 * what is picked or active. Colours, type and spacing come from shared/design-tokens.ts.
 */
export const gridTheme = themeQuartz.withPart(gridIcons).withParams({
  accentColor: COLOUR.field,
  backgroundColor: COLOUR.card,
  foregroundColor: COLOUR.loam,
  textColor: COLOUR.loam,
  borderColor: COLOUR.furrow,
  chromeBackgroundColor: COLOUR.paperDeep,
  headerBackgroundColor: COLOUR.paperDeep,
  headerTextColor: COLOUR.fieldDeep,
  headerFontFamily: FONT.text,
  headerFontWeight: 650,
  headerFontSize: TYPE.small,
  headerRowBorder: { width: 2, color: COLOUR.field },
  headerColumnBorder: false,
  headerColumnResizeHandleColor: COLOUR.furrow,
  headerCellHoverBackgroundColor: COLOUR.fieldWash,
  columnBorder: false,
  rowBorder: { width: 1, color: COLOUR.furrow, style: 'dotted' },
  wrapperBorder: { width: 1, color: COLOUR.furrow },
  wrapperBorderRadius: RADIUS.sheet,
  borderRadius: RADIUS.control,
  rowHoverColor: COLOUR.fieldWash,
  selectedRowBackgroundColor: COLOUR.grainWash,
  oddRowBackgroundColor: COLOUR.card,
  fontFamily: FONT.text,
  fontSize: TYPE.body,
  spacing: SPACE.xs + 1,
  rowHeight: 38,
  headerHeight: 40,
  cellHorizontalPadding: SPACE.m,
  iconSize: 18,
  iconButtonHoverBackgroundColor: COLOUR.fieldWash,
  iconButtonHoverColor: COLOUR.fieldDeep,
  iconButtonActiveColor: COLOUR.card,
  iconButtonActiveBackgroundColor: COLOUR.field,
  iconButtonActiveIndicatorColor: COLOUR.grain,
  menuBackgroundColor: COLOUR.card,
  menuBorder: { width: 1, color: COLOUR.furrow },
  menuShadow: { radius: 6, offsetY: 2, color: 'rgba(30, 27, 20, 0.18)' },
  inputBorder: { width: 1, color: COLOUR.loamSoft },
  inputFocusBorder: { width: 2, color: COLOUR.field },
  inputFocusShadow: 'none',
  focusShadow: { radius: 0, spread: 2, color: COLOUR.grain },
  paginationPanelHeight: 44,
  footerRowBorder: { width: 2, color: COLOUR.field },
  checkboxBorderRadius: 3,
  checkboxBorderWidth: 2,
  checkboxUncheckedBorderColor: COLOUR.loamSoft,
  checkboxUncheckedBackgroundColor: COLOUR.card,
  checkboxCheckedBackgroundColor: COLOUR.field,
  checkboxCheckedBorderColor: COLOUR.field,
  checkboxCheckedShapeColor: COLOUR.card,
  checkboxCheckedShapeImage: { svg: TICK },
  checkboxIndeterminateBackgroundColor: COLOUR.grain,
  checkboxIndeterminateBorderColor: COLOUR.grain,
  checkboxIndeterminateShapeColor: COLOUR.card,
  checkboxIndeterminateShapeImage: { svg: DASH },
});

/** The same theme with half the cell padding, for tables of many figures that must fit a laptop screen (the budget's product plan). */
export const denseGridTheme = gridTheme.withParams({ cellHorizontalPadding: SPACE.s });


/**
 * The grid's words, Netput's own: the pager reads "Rows 1–20 of 35 · Part 1 of 2 · Rows at a time",
 * a column is narrowed ("Narrow this column…") with plain comparisons, and an empty grid says so.
 */
export const GRID_WORDS: Record<string, string> = {
  // pager
  pageSizeSelectorLabel: 'Rows at a time',
  ariaPageSizeSelectorLabel: 'Rows at a time',
  page: 'Part',
  of: 'of',
  to: '–',
  more: 'more',
  pageLastRowUnknown: '…',
  firstPage: 'First part',
  previousPage: 'Previous part',
  nextPage: 'Next part',
  lastPage: 'Last part',
  // states
  loadingOoo: 'Fetching the rows…',
  loadingError: 'Could not fetch',
  noRowsToShow: 'Nothing recorded here yet',
  noMatchingRows: 'No row matches what you narrowed to',
  exportingOoo: 'Writing the file…',
  // narrowing a column (filters)
  filterOoo: 'Narrow to…',
  applyFilter: 'Narrow',
  clearFilter: 'Show all',
  resetFilter: 'Show all',
  cancelFilter: 'Leave as it was',
  textFilter: 'Narrow by text',
  numberFilter: 'Narrow by number',
  dateFilter: 'Narrow by date',
  empty: 'Pick a comparison',
  equals: 'is',
  notEqual: 'is not',
  lessThan: 'below',
  greaterThan: 'above',
  lessThanOrEqual: 'at most',
  greaterThanOrEqual: 'at least',
  inRange: 'between',
  inRangeStart: 'from',
  inRangeEnd: 'up to',
  contains: 'has',
  notContains: 'has no',
  startsWith: 'starts with',
  endsWith: 'ends with',
  blank: 'is empty',
  notBlank: 'is filled in',
  before: 'before',
  after: 'after',
  andCondition: 'and also',
  orCondition: 'or else',
  invalidNumber: 'Not a number',
  invalidDate: 'Not a date',
  // header menus and screen-reader labels
  ariaLabelColumnMenu: 'Column choices',
  ariaLabelColumnFilter: 'Narrow this column',
  ariaFilterMenuOpen: 'Narrow this column',
  ariaFilterColumn: 'Press Ctrl+Enter to narrow this column',
  ariaMenuColumn: 'Press Alt+Down for the column choices',
  ariaColumnFiltered: 'Narrowed',
  ariaFilterInput: 'Value to narrow to',
  ariaDateFilterInput: 'Date to narrow to',
  ariaFilteringOperator: 'Comparison',
  ariaSortableColumn: 'Press Enter to order by this column',
  ariaRowSelectAll: 'Press Space to pick every row or none',
  ariaLabelInputClear: 'Clear',
  ariaValidationErrorPrefix: 'Not accepted',
  ariaInputEditor: 'Edit the value',
  ariaHeaderSelection: 'Pick rows',
  ariaChecked: 'picked',
  ariaUnchecked: 'not picked',
  ariaIndeterminate: 'some picked',
  ariaRowSelect: 'Press Space to pick this row',
  ariaRowDeselect: 'Press Space to unpick this row',
  ariaRowToggleSelection: 'Press Space to pick or unpick this row',
  ariaSearch: 'Search',
  ariaSearchFilterValues: 'Search the values',
};

/**
 * For a grid with many number columns and headings longer than its figures (a product plan): the
 * columns are sized to their figures and the headings wrap over two lines above them, so the whole
 * table fits the page's width with no figure cut. Pass both to the grid.
 */
export const FIT_FIGURES: SizeColumnsToContentStrategy = { type: 'fitCellContents', skipHeader: true, scaleUpToFitGridWidth: true, continuous: true };
export const WRAPPED_HEADINGS: ColDef = { wrapHeaderText: true, autoHeaderHeight: true };

provideGlobalGridOptions({
  theme: gridTheme,
  localeText: GRID_WORDS,
  // Every column as wide as its widest figure and its heading, so no number or name is cut; then
  // widened to fill the grid. Re-applied when the rows change or the grid is resized; a column the
  // reader has sized by hand keeps its width, and minWidth/maxWidth still bound it. A column given
  // `flex` is left to its flex share when the columns are set again, so content columns have none.
  autoSizeStrategy: { type: 'fitCellContents', scaleUpToFitGridWidth: true, continuous: true },
  // The column that picks rows: narrow, in the sheet's own colours, with its own heading for screen readers.
  selectionColumnDef: { width: 48, maxWidth: 48, resizable: false, headerTooltip: 'Pick rows', cellClass: 'np-pick-cell', headerClass: 'np-pick-cell' },
});
