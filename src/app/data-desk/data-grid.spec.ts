import type { ProcessCellForExportParams } from 'ag-grid-community';
import { safeCsvCell, spreadsheetSafe } from './data-grid';

// The cells a spreadsheet would run as formulas, per the OWASP "CSV Injection" page: text starting
// with =, +, -, @, tab or carriage return.
describe('spreadsheetSafe', () => {
  it('should put an apostrophe before text a spreadsheet would run as a formula', () => {
    expect(['=HYPERLINK("http://example.org")', '+1+1', '-2+3', '@SUM(A1)', '\t=1', '\r=1'].map(spreadsheetSafe)).toEqual([
      `'=HYPERLINK("http://example.org")`,
      "'+1+1",
      "'-2+3",
      "'@SUM(A1)",
      "'\t=1",
      "'\r=1",
    ]);
  });

  it('should leave plain text and numbers alone, negative numbers included', () => {
    expect(spreadsheetSafe('Grain desk bid')).toBe('Grain desk bid');
    expect(spreadsheetSafe('a=b')).toBe('a=b');
    expect(spreadsheetSafe(-0.5)).toBe(-0.5);
  });

  it('should export numbers raw, empty cells empty and formatted text made safe', () => {
    const cell = (value: unknown, formatted = String(value)) =>
      safeCsvCell({ value, formatValue: () => formatted } as unknown as ProcessCellForExportParams);
    expect(cell(1234.5, '1,234.50')).toBe('1234.5');
    expect(cell(null, '—')).toBe('');
    expect(cell('=cmd', '=cmd')).toBe("'=cmd");
  });
});
