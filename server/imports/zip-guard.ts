/**
 * Checks an XLSX file (a zip archive) before any XML is parsed, so a "zip bomb" (a small file that
 * expands to gigabytes) is refused instead of filling memory. The layout read here is the ZIP
 * format's end-of-central-directory record and central directory (PKWARE APPNOTE.TXT §4.3.12, §4.3.16).
 *
 * Refused, each with a clear 422: ZIP64 or multi-disk archives (an XLSX under 20 MB never needs
 * them), more than `maxZipEntries` entries, a declared total above `maxUncompressedBytes`, a
 * compression ratio above `maxCompressionRatio`, an entry that inflates to more than it declares,
 * bytes outside the directory (where a streaming reader would find entries the directory hides),
 * and zip files that are not workbooks.
 */
import { createInflateRaw } from 'node:zlib';
import { ImportFileError } from './import-file-error.js';
import type { ImportLimits } from './import-limits.js';

const EOCD_SIG = 0x06054b50;
const CEN_SIG = 0x02014b50;
const LOC_SIG = 0x04034b50;

export interface ZipEntryInfo {
  name: string;
  method: number;
  flags: number;
  compressedSize: number;
  uncompressedSize: number;
  localHeaderOffset: number;
}

const refuse = (message: string) => new ImportFileError(422, 'unreadable_workbook', message);
const damaged = () => refuse('The workbook file is damaged: its zip directory cannot be read. Save it again from the spreadsheet program');

/** Reads the central directory; throws a 422 for archives this server does not read. */
export function readZipDirectory(buf: Buffer, maxEntries: number): { entries: ZipEntryInfo[]; directoryOffset: number } {
  const min = Math.max(0, buf.length - 22 - 0xffff);
  let eocd = -1;
  for (let i = buf.length - 22; i >= min; i--) {
    if (buf.readUInt32LE(i) === EOCD_SIG) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) throw damaged();
  const disk = buf.readUInt16LE(eocd + 4);
  const cdDisk = buf.readUInt16LE(eocd + 6);
  const total = buf.readUInt16LE(eocd + 10);
  const cdSize = buf.readUInt32LE(eocd + 12);
  const cdOffset = buf.readUInt32LE(eocd + 16);
  if (total === 0xffff || cdSize === 0xffffffff || cdOffset === 0xffffffff) {
    throw refuse('The workbook uses ZIP64, which only very large files need; it is larger than the server reads');
  }
  if (disk !== 0 || cdDisk !== 0) throw refuse('The workbook is split over several files; save it as one .xlsx file');
  if (total > maxEntries) throw refuse(`The workbook has ${total} parts; the server reads at most ${maxEntries}`);
  if (cdOffset + cdSize > eocd) throw damaged();
  const entries: ZipEntryInfo[] = [];
  let p = cdOffset;
  for (let k = 0; k < total; k++) {
    if (p + 46 > eocd || buf.readUInt32LE(p) !== CEN_SIG) throw damaged();
    const nameLen = buf.readUInt16LE(p + 28);
    const extraLen = buf.readUInt16LE(p + 30);
    const commentLen = buf.readUInt16LE(p + 32);
    const entry: ZipEntryInfo = {
      flags: buf.readUInt16LE(p + 8),
      method: buf.readUInt16LE(p + 10),
      compressedSize: buf.readUInt32LE(p + 20),
      uncompressedSize: buf.readUInt32LE(p + 24),
      localHeaderOffset: buf.readUInt32LE(p + 42),
      name: buf.toString('utf8', p + 46, p + 46 + nameLen),
    };
    if (entry.compressedSize === 0xffffffff || entry.uncompressedSize === 0xffffffff || entry.localHeaderOffset === 0xffffffff) {
      throw refuse('The workbook uses ZIP64, which only very large files need; it is larger than the server reads');
    }
    entries.push(entry);
    p += 46 + nameLen + extraLen + commentLen;
  }
  return { entries, directoryOffset: cdOffset };
}

/** Inflates `data` counting the output; rejects as soon as it exceeds `cap` bytes. */
function inflatedSizeWithin(data: Buffer, cap: number): Promise<number> {
  return new Promise((resolve, reject) => {
    const inflate = createInflateRaw();
    let size = 0;
    let done = false;
    const finish = (err: Error | null, n?: number) => {
      if (done) return;
      done = true;
      if (err) reject(err);
      else resolve(n!);
    };
    inflate.on('data', (chunk: Buffer) => {
      size += chunk.length;
      if (size > cap) {
        inflate.destroy();
        finish(refuse('A part of the workbook expands to more than its directory declares: the file looks crafted to fill memory and is refused'));
      }
    });
    inflate.on('end', () => finish(null, size));
    inflate.on('error', () => finish(damaged()));
    inflate.end(data);
  });
}

/**
 * Refuses a workbook that would expand too far, before it is parsed; see the module comment for
 * every rule. Costs one inflate pass over the file (without keeping the output).
 */
export async function checkWorkbookZip(buf: Buffer, limits: Pick<ImportLimits, 'maxUncompressedBytes' | 'maxCompressionRatio' | 'ratioCheckFromBytes' | 'maxZipEntries'>): Promise<void> {
  const { entries, directoryOffset } = readZipDirectory(buf, limits.maxZipEntries);
  if (!entries.some((e) => e.name === 'xl/workbook.xml')) {
    throw refuse('This zip file is not an Excel workbook (.xlsx): it has no xl/workbook.xml');
  }
  let uncompressed = 0;
  let compressed = 0;
  for (const e of entries) {
    uncompressed += e.uncompressedSize;
    compressed += e.compressedSize;
  }
  const mb = (n: number) => (n >= 1024 * 1024 ? `${Math.round(n / 1024 / 1024)} MB` : `${Math.ceil(n / 1024)} KB`);
  if (uncompressed > limits.maxUncompressedBytes) {
    throw refuse(`The workbook expands to ${mb(uncompressed)}; the server reads workbooks up to ${mb(limits.maxUncompressedBytes)} uncompressed. Split it or save it as CSV`);
  }
  const ratio = uncompressed / Math.max(1, compressed);
  if (uncompressed > limits.ratioCheckFromBytes && ratio > limits.maxCompressionRatio) {
    throw refuse(
      `The workbook expands ${Math.round(ratio)} times (${mb(compressed)} to ${mb(uncompressed)}); more than ${limits.maxCompressionRatio} times is refused as a likely zip bomb`,
    );
  }
  // Every byte before the directory must belong to a listed entry: a streaming reader walks the local
  // headers, so an entry the directory hides would escape the checks above. A little slack covers
  // data descriptors (12–16 bytes each, APPNOTE §4.3.9).
  let covered = 0;
  for (const e of entries) {
    const at = e.localHeaderOffset;
    if (at + 30 > buf.length || buf.readUInt32LE(at) !== LOC_SIG) throw damaged();
    const start = at + 30 + buf.readUInt16LE(at + 26) + buf.readUInt16LE(at + 28);
    const end = start + e.compressedSize;
    if (end > directoryOffset) throw damaged();
    covered += end - at;
    const data = buf.subarray(start, end);
    if (e.method === 0) {
      if (e.compressedSize !== e.uncompressedSize) throw damaged();
    } else if (e.method === 8) {
      await inflatedSizeWithin(data, e.uncompressedSize);
    } else {
      throw refuse(`The workbook part ${e.name} uses a compression method (${e.method}) the server does not read; save the file again as .xlsx`);
    }
  }
  if (directoryOffset - covered > 4096 + 16 * entries.length) {
    throw refuse('The workbook holds data outside its zip directory: the file looks crafted and is refused');
  }
}

export function isZip(bytes: Uint8Array): boolean {
  return bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && (bytes[2] === 3 || bytes[2] === 5) && (bytes[3] === 4 || bytes[3] === 6);
}

/** The OLE2 compound file signature of old binary .xls workbooks. */
export function isOldExcel(bytes: Uint8Array): boolean {
  return bytes.length >= 8 && bytes[0] === 0xd0 && bytes[1] === 0xcf && bytes[2] === 0x11 && bytes[3] === 0xe0;
}
