import {
  DateEditorModule,
  ModuleRegistry,
  NumberEditorModule,
  RowSelectionModule,
  SelectEditorModule,
  TextEditorModule,
  type ColDef,
  type IErrorValidationParams,
  type ProcessCellForExportParams,
  type ValueParserParams,
} from 'ag-grid-community';
import { numberInMark, parseNumber, type DecimalMark } from '../../../shared/cell-parsers';
// The data desk's grids take AgGridAngular from here, so the shared set-up (shared/grid.ts) and the
// editing and selection modules below are registered wherever one of them is drawn.
export { AgGridAngular } from '../shared/grid';

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

/**
 * A numeric column's editing in the co-op's decimal convention: the editor starts from the stored
 * value written that way (204,5 under a comma) and typed text is read by the shared parser; text it
 * cannot read stays text, which the column's validation refuses with the cell and the value, so
 * nothing typed is ever reinterpreted (AG Grid's number editor would drop the letter of "2O4,5").
 * `getValidationErrors` is the column's check of the edited value (a number or refused text).
 */
export function numberEditing<T>(
  mark: DecimalMark,
  getValidationErrors: (p: IErrorValidationParams<T>) => string[] | null,
): Pick<ColDef<T>, 'cellEditor' | 'cellEditorParams' | 'valueParser'> {
  return {
    cellEditor: 'agTextCellEditor',
    cellEditorParams: {
      useFormatter: true,
      formatValue: (v: unknown) => (typeof v === 'number' ? numberInMark(v, mark) : (v ?? '')),
      maxLength: 40,
      getValidationErrors,
    },
    valueParser: (p: ValueParserParams<T>) => {
      const text = String(p.newValue ?? '').trim();
      if (text === '') return null;
      const parsed = parseNumber(text, mark);
      return parsed.ok ? parsed.value : text;
    },
  };
}

/** The problem of an edited numeric cell that is still text (the parser refused it), or null. */
export function numberTextProblem(value: unknown, mark: DecimalMark): string | null {
  if (typeof value !== 'string' || value.trim() === '') return null;
  const parsed = parseNumber(value, mark);
  return parsed.ok ? null : parsed.message;
}
