import {
  DateEditorModule,
  ModuleRegistry,
  NumberEditorModule,
  RowSelectionModule,
  SelectEditorModule,
  TextEditorModule,
  type ProcessCellForExportParams,
} from 'ag-grid-community';
// The shared registration (row model, filters, pagination, CSV export) and the theme.
export { gridTheme } from '../shared/grid';

// The data desk's grids also edit in place (text, number, date and list editors, whose validation
// messages show as tooltips) and select rows to delete. Registering modules is additive.
ModuleRegistry.registerModules([TextEditorModule, NumberEditorModule, DateEditorModule, SelectEditorModule, RowSelectionModule]);

/**
 * A text cell a spreadsheet would run as a formula (it starts with =, +, -, @, a tab or a carriage
 * return) gets a leading apostrophe, as the OWASP "CSV Injection" guidance recommends. Numbers are
 * left alone, so a negative number stays a number.
 */
export function spreadsheetSafe(value: unknown): unknown {
  if (typeof value !== 'string') return value;
  return /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
}

/** For `exportDataAsCsv({ processCellCallback })`: the formatted text of the cell, made spreadsheet-safe. */
export function safeCsvCell(params: ProcessCellForExportParams): string {
  if (params.value === null || params.value === undefined) return '';
  if (typeof params.value === 'number') return String(params.value);
  return String(spreadsheetSafe(params.formatValue ? params.formatValue(params.value) : params.value));
}
