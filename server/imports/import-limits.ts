/** Limits on what an import reads: declared in shared/import-types.ts, which the client reads too. */
export { IMPORT_LIMITS, type ImportLimits } from '../../shared/import-types.js';
