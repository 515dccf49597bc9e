/**
 * A member's contract figures in plain sentences, for the portal and the outlook e-mail (one wording
 * for both): "Your contract LG-2026-001: 600 t of wheat at 205 EUR/t; estimated marginal cost at that
 * tonnage 171 EUR/t (likely range 120 to 230 EUR/t)." and "For this contracted output your farm needs
 * about 38 t N, 12 t P2O5 and 9 t K2O."
 */
import type { ContractRow } from './contract-schemas.js';
import type { DemandBand, MyContracts } from './contracted-view.js';

const whole = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });
const one = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 });
const amount = (v: number) => (Math.abs(v) >= 100 ? whole.format(v) : one.format(v));
const cents = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 2 });

/** A nutrient amount in tonnes of nutrient when it is a tonne or more: 38,200 kg N → "38 t N". */
export function nutrientAmount(kg: number, unit: string): string {
  const m = /^kg\s+(.+)$/.exec(unit);
  if (m && Math.abs(kg) >= 1000) return `${amount(kg / 1000)} t ${m[1]}`;
  return `${amount(kg)} ${unit}`;
}

export function contractSentence(c: ContractRow, fig: { marginalCost: DemandBand | null } | undefined): string {
  const head = `Your contract ${c.reference}: ${amount(c.quantity)} ${c.unit} of ${c.itemName.toLowerCase()} at ${cents.format(c.price)} ${c.currency}/${c.unit}`;
  const mc = fig?.marginalCost;
  if (!mc) return `${head}.`;
  return `${head}; estimated marginal cost at that tonnage ${whole.format(mc.point)} ${c.currency}/${c.unit} (likely range ${whole.format(mc.p5)} to ${whole.format(mc.p95)} ${c.currency}/${c.unit}).`;
}

export function nutrientSentence(n: MyContracts['nutrients'][number]): string | null {
  if (!n.items.length) return null;
  const parts = n.items.map((i) => nutrientAmount(i.band.point, i.unit));
  const list = parts.length > 1 ? `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]}` : parts[0];
  return `For this contracted output in ${n.season} your farm needs about ${list} (estimates).`;
}

/** Every sentence for a member: one per contract, then the fertiliser need per season. */
export function myContractLines(m: MyContracts): string[] {
  return [...m.contracts.filter((c) => c.status !== 'cancelled').map((c) => contractSentence(c, m.figures[c.id])), ...m.nutrients.map(nutrientSentence).filter((s): s is string => s !== null)];
}
