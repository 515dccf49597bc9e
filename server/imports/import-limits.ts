/** Limits on what an import reads; each one answers a clear message when exceeded. */
export const IMPORT_LIMITS = {
  /** Upload size (413 above it). */
  maxFileBytes: 20 * 1024 * 1024,
  /** Data rows, header excluded (422 above it). */
  maxRows: 200_000,
  /** XLSX: total uncompressed size of the workbook's zip entries (422 above it). */
  maxUncompressedBytes: 100 * 1024 * 1024,
  /** XLSX: uncompressed ÷ compressed size, checked once the workbook expands past 1 MB. */
  maxCompressionRatio: 100,
  ratioCheckFromBytes: 1024 * 1024,
  maxZipEntries: 10_000,
  /** Errors listed in a response; the rest are counted. */
  maxListedErrors: 1000,
  previewRows: 20,
  /** Longest cell read into a text field or shown in the preview. */
  maxCellChars: 1000,
} as const;

export type ImportLimits = { -readonly [K in keyof typeof IMPORT_LIMITS]: number };
