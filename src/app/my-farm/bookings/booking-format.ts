import type { NutrientAmounts } from '../../../../shared/budget-types';

/** Minor units → "EUR 1,234.56" (the server's figures, formatted only). */
export function money(minor: number, currency: string): string {
  const sign = minor < 0 ? '−' : '';
  const abs = Math.abs(minor);
  return `${sign}${currency} ${Math.floor(abs / 100).toLocaleString('en-GB')}.${String(abs % 100).padStart(2, '0')}`;
}

export function kg(v: number): string {
  return Math.round(v).toLocaleString('en-GB');
}

export function tonnes(kgOfProduct: number): string {
  return (kgOfProduct / 1000).toLocaleString('en-GB', { maximumFractionDigits: 3 });
}

export function pct(bp: number): string {
  return `${(bp / 100).toLocaleString('en-GB', { maximumFractionDigits: 2 })} %`;
}

/** "2099-01-31" → "31 Jan 2099". */
export function day(iso: string): string {
  const d = new Date(`${iso}T00:00:00Z`);
  return d.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
}

/** "2027-03" → "March 2027". */
export function month(ym: string): string {
  const d = new Date(`${ym}-01T00:00:00Z`);
  return d.toLocaleDateString('en-GB', { month: 'long', year: 'numeric', timeZone: 'UTC' });
}

/** "N 4,600 · P2O5 0 · K2O 1,500 kg". */
export function nutrientLine(n: NutrientAmounts): string {
  return `N ${kg(n.nitrogen)} · P2O5 ${kg(n.phosphate)} · K2O ${kg(n.potash)} kg`;
}

export function perHa(n: NutrientAmounts, ha: number): string {
  if (!(ha > 0)) return '';
  return `N ${kg(n.nitrogen / ha)} · P2O5 ${kg(n.phosphate / ha)} · K2O ${kg(n.potash / ha)} kg/ha`;
}
