import { isDevMode } from '@angular/core';
import {
  CellStyleModule,
  ClientSideRowModelModule,
  CsvExportModule,
  ModuleRegistry,
  NumberFilterModule,
  PaginationModule,
  QuickFilterModule,
  TextFilterModule,
  TooltipModule,
  ValidationModule,
  themeQuartz,
} from 'ag-grid-community';

// Only the grid features Netput's tables use (sorting is built in); ValidationModule explains
// misconfigured grids in development builds only.
ModuleRegistry.registerModules([
  ClientSideRowModelModule,
  // right-aligned numeric columns (`type: 'numericColumn'` sets a cell class)
  CellStyleModule,
  TextFilterModule,
  NumberFilterModule,
  QuickFilterModule,
  PaginationModule,
  CsvExportModule,
  // header and cell tooltips (headerTooltip, tooltipField)
  TooltipModule,
  ...(isDevMode() ? [ValidationModule] : []),
]);

/** AG Grid drawn with the app's Material 3 colour tokens, so grids and Material components match. */
export const gridTheme = themeQuartz.withParams({
  accentColor: 'var(--mat-sys-primary)',
  backgroundColor: 'var(--mat-sys-surface-container-lowest)',
  foregroundColor: 'var(--mat-sys-on-surface)',
  headerBackgroundColor: 'var(--mat-sys-surface-container)',
  headerTextColor: 'var(--mat-sys-on-surface)',
  borderColor: 'var(--mat-sys-outline-variant)',
  rowHoverColor: 'color-mix(in srgb, var(--mat-sys-primary) 8%, transparent)',
  selectedRowBackgroundColor: 'var(--mat-sys-secondary-container)',
  fontFamily: 'inherit',
  fontSize: 14,
  wrapperBorderRadius: 12,
});
