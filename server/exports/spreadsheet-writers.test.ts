import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { escapeFormula, toCsv, toXlsx, type SheetColumn } from './spreadsheet-writers.js';

// The characters that start a formula, from the OWASP page on CSV Injection
// (owasp.org/www-community/attacks/CSV_Injection): =, +, -, @, tab (0x09) and carriage return (0x0D).
const DANGEROUS = ['=1+1', '+1+1', '-1+1', '@SUM(A1)', '\t=1', '\r=1', '=HYPERLINK("http://example.org","x")', '=1\n+2'];

const columns: SheetColumn[] = [
  { key: 'name', header: 'name' },
  { key: 'qty', header: 'quantity', type: 'number' },
  { key: 'on', header: 'observed_on', type: 'date' },
];

describe('escapeFormula', () => {
  it('puts an apostrophe before every formula start, and leaves other text alone', () => {
    for (const s of DANGEROUS) expect(escapeFormula(s)).toBe(`'${s}`);
    for (const s of ['wheat', ' =1', 'a=b', '1-2', "'quoted", '']) expect(escapeFormula(s)).toBe(s);
  });
});

describe('toCsv', () => {
  it('escapes dangerous text cells, keeps numbers (negative ones too) as numbers, and quotes as RFC 4180 asks', () => {
    const rows = [
      ...DANGEROUS.map((name) => ({ name, qty: -5, on: '2024-08-20' })),
      { name: 'Grain desk, "late" bid', qty: 1234.5, on: null },
    ];
    const csv = toCsv(rows, columns);
    expect(csv.startsWith('\uFEFFname,quantity,observed_on\r\n')).toBe(true);
    expect(csv).toContain(`"'=1+1",-5,2024-08-20\r\n`);
    expect(csv).toContain(`"'=HYPERLINK(""http://example.org"",""x"")",-5,`);
    expect(csv).toContain('"Grain desk, ""late"" bid",1234.5,\r\n');
    const parsed = Papa.parse<string[]>(csv.slice(1), { skipEmptyLines: true }).data;
    expect(parsed.slice(1).map((r) => r[0])).toEqual([...DANGEROUS.map((s) => `'${s}`), 'Grain desk, "late" bid']);
    expect(parsed[1][1]).toBe('-5');
  });
});

describe('toXlsx', () => {
  it('writes one bold, frozen header row, escaped text, numbers and real date cells', async () => {
    const buf = await toXlsx(
      [
        { name: '=cmd|" /C calc"!A0', qty: 12.5, on: '2024-08-20' },
        { name: 'wheat', qty: -3, on: null },
      ],
      columns,
      'Prices: 2024/25',
    );
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(buf as unknown as ArrayBuffer);
    const ws = wb.worksheets[0];
    // Excel forbids : and / in sheet names.
    expect(ws.name).toBe('Prices  2024 25');
    expect(ws.getRow(1).values).toEqual([undefined, 'name', 'quantity', 'observed_on']);
    expect(ws.getRow(1).font?.bold).toBe(true);
    expect(ws.views[0]).toMatchObject({ state: 'frozen', ySplit: 1 });
    expect(ws.getCell('A2').value).toBe('\'=cmd|" /C calc"!A0');
    expect(ws.getCell('B2').value).toBe(12.5);
    expect(ws.getCell('B3').value).toBe(-3);
    expect(ws.getCell('C2').value).toEqual(new Date(Date.UTC(2024, 7, 20)));
    expect(ws.getCell('C2').numFmt).toBe('yyyy-mm-dd');
    expect(ws.getCell('C3').value).toBeNull();
  });
});
