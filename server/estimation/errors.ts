/**
 * Errors raised by the estimation engine.
 *
 * `EstimationInputError` means the caller's data or options are unusable (the API maps it to 422,
 * the command line prints its one-line message and exits 2). Anything else thrown from this module
 * is a programming error.
 */
export interface EstimationInputErrorDetails {
  /** Spreadsheet row number (the header is row 1), when the problem is in one row. */
  row?: number;
  /** Column header, when the problem is in one column. */
  column?: string;
}

export class EstimationInputError extends Error {
  readonly row?: number;
  readonly column?: string;
  /** Always 'estimation-input', so a serialised copy can still be recognised. */
  readonly code = 'estimation-input';

  constructor(message: string, details: EstimationInputErrorDetails = {}) {
    super(message);
    this.name = 'EstimationInputError';
    if (details.row !== undefined) this.row = details.row;
    if (details.column !== undefined) this.column = details.column;
  }

  /** Plain, serialisable form (for worker threads and API responses). */
  toJSON(): { message: string; row?: number; column?: string } {
    return {
      message: this.message,
      ...(this.row !== undefined ? { row: this.row } : {}),
      ...(this.column !== undefined ? { column: this.column } : {}),
    };
  }
}

/** True for an EstimationInputError, also one rebuilt from a worker thread's structured clone. */
export function isEstimationInputError(e: unknown): e is EstimationInputError {
  return e instanceof EstimationInputError || (typeof e === 'object' && e !== null && (e as { code?: unknown }).code === 'estimation-input');
}
