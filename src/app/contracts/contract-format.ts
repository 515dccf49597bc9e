const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** "Aug–Oct 2026", "Dec 2026 – Feb 2027", "Sep 2026" for YYYY-MM months. */
export function deliveryWindow(from: string, to: string): string {
  const [fy, fm] = from.split('-').map(Number);
  const [ty, tm] = to.split('-').map(Number);
  const f = MONTHS[fm - 1];
  const t = MONTHS[tm - 1];
  if (from === to) return `${f} ${fy}`;
  return fy === ty ? `${f}–${t} ${fy}` : `${f} ${fy} – ${t} ${ty}`;
}

const whole = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });
const one = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 });

/** A price or cost per unit, whole currency units: "171". */
export function money(v: number | null | undefined): string {
  return v == null || !Number.isFinite(v) ? '—' : whole.format(v);
}

/** A margin with its sign: "+34", "−15". */
export function signedMoney(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  const r = Math.round(v);
  return r > 0 ? `+${whole.format(r)}` : r < 0 ? `−${whole.format(-r)}` : '0';
}

/** A quantity: whole numbers from 100 up, one decimal below. */
export function tonnes(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  return Math.abs(v) >= 100 ? whole.format(v) : one.format(v);
}

/** "130 to 212": the 90 % band of a figure. */
export function bandText(q: { p5: number; p95: number } | null | undefined, format: (v: number) => string = money): string {
  return q ? `${format(q.p5)} to ${format(q.p95)}` : '—';
}
