import ExcelJS from 'exceljs';
import { describe, expect, it } from 'vitest';
import { buildZip, inflatingSheet, replaceParts } from '../../tests/fixtures/imports/zip-tools.js';
import { IMPORT_LIMITS } from './import-limits.js';
import { ImportFileError } from './import-file-error.js';
import { checkWorkbookZip } from './zip-guard.js';

async function smallWorkbook(): Promise<Buffer> {
  const wb = new ExcelJS.Workbook();
  wb.addWorksheet('Prices').addRows([
    ['item', 'price'],
    ['wheat', 231.5],
  ]);
  return Buffer.from(await wb.xlsx.writeBuffer());
}

async function refusal(buf: Buffer): Promise<string> {
  try {
    await checkWorkbookZip(buf, IMPORT_LIMITS);
  } catch (err) {
    expect(err).toBeInstanceOf(ImportFileError);
    expect((err as ImportFileError).status).toBe(422);
    return (err as Error).message;
  }
  throw new Error('the workbook was accepted');
}

const workbookXml = Buffer.from('<workbook/>');

describe('checkWorkbookZip', () => {
  it('accepts a workbook written by exceljs', async () => {
    await expect(checkWorkbookZip(await smallWorkbook(), IMPORT_LIMITS)).resolves.toBeUndefined();
  });

  it('refuses a workbook that expands more than 100 times (a zip bomb)', async () => {
    const bomb = replaceParts(await smallWorkbook(), { 'xl/worksheets/sheet1.xml': inflatingSheet(20 * 1024 * 1024) });
    expect(bomb.length).toBeLessThan(200 * 1024);
    expect(await refusal(bomb)).toMatch(/^The workbook expands \d+ times \(\d+ KB to 20 MB\); more than 100 times is refused as a likely zip bomb$/);
  });

  it('refuses a workbook that declares more than 100 MB uncompressed', async () => {
    const zip = buildZip([
      { name: 'xl/workbook.xml', data: workbookXml },
      { name: 'xl/worksheets/sheet1.xml', data: Buffer.from('<worksheet/>'), declaredSize: 150 * 1024 * 1024 },
    ]);
    expect(await refusal(zip)).toBe('The workbook expands to 150 MB; the server reads workbooks up to 100 MB uncompressed. Split it or save it as CSV');
  });

  it('refuses a part that inflates to more than its directory declares', async () => {
    const zip = buildZip([
      { name: 'xl/workbook.xml', data: workbookXml },
      { name: 'xl/worksheets/sheet1.xml', data: inflatingSheet(64 * 1024), declaredSize: 1000 },
    ]);
    expect(await refusal(zip)).toBe('A part of the workbook expands to more than its directory declares: the file looks crafted to fill memory and is refused');
  });

  it('refuses bytes hidden between the entries and the directory', async () => {
    const zip = buildZip([{ name: 'xl/workbook.xml', data: workbookXml }], { hidden: Buffer.alloc(10_000, 7) });
    expect(await refusal(zip)).toBe('The workbook holds data outside its zip directory: the file looks crafted and is refused');
  });

  it('refuses a zip that is not a workbook, and a damaged one', async () => {
    expect(await refusal(buildZip([{ name: 'notes.txt', data: Buffer.from('hello') }]))).toBe('This zip file is not an Excel workbook (.xlsx): it has no xl/workbook.xml');
    const wb = await smallWorkbook();
    expect(await refusal(wb.subarray(0, wb.length - 30))).toBe('The workbook file is damaged: its zip directory cannot be read. Save it again from the spreadsheet program');
  });

  it('refuses ZIP64 archives', async () => {
    const zip = buildZip([{ name: 'xl/workbook.xml', data: workbookXml }]);
    zip.writeUInt32LE(0xffffffff, zip.length - 22 + 16);
    expect(await refusal(zip)).toBe('The workbook uses ZIP64, which only very large files need; it is larger than the server reads');
  });
});
