/**
 * A file the import cannot read at all (too large, too many rows, not CSV or XLSX, a zip bomb, a bad
 * mapping): nothing is staged and the client gets `status` with this message. Row-level problems are
 * not thrown; they are listed in the preview.
 */
export class ImportFileError extends Error {
  constructor(
    readonly status: 400 | 413 | 422,
    readonly code: string,
    message: string,
    readonly details?: { path: string; message: string }[],
  ) {
    super(message);
    this.name = 'ImportFileError';
  }
}
