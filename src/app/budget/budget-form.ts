import { type AbstractControl, type FormArray, type FormGroup, type NonNullableFormBuilder, type ValidationErrors, Validators } from '@angular/forms';
import type { UnitSystem } from '../../../shared/units';
import { MONTH_PATTERN as MONTH, SEASON_YEARS } from '../../../shared/field-limits';
import { bookedShareSchema, bookingPlanSchema, budgetInputSchema, pctChangeSchema, scenarioSchema } from '../../../shared/budget-schemas';
import { zodValidator } from '../shared/zod-validator';
import { DEFAULT_SEASON_CALENDAR, defaultBookingMonths, type SeasonCalendar } from '../../../shared/season-calendar';
import { massFromShown, massToShown, pricePerTFromShown, pricePerTToShown, productFromShown, productToShown } from './budget-units';
import type {
  BookingPlanInput,
  BudgetInput,
  BudgetSource,
  ElasticityMatrix,
  FertiliserProduct,
  LotRule,
  Nutrient,
  ProductCopy,
  ScenarioInput,
  SourceKind,
  StoredInputs,
} from './budget-api-types';
import { NUTRIENTS } from './budget-api-types';

/*
 * The budget editor's form: what the treasurer types, in the unit system shown, and the pure
 * functions between it and the API's metric BudgetInput.
 */


export interface SourceValue {
  kind: SourceKind;
  outlookVersionId: number | null;
  outlookScenario: string;
  /** Products cost the outlook scenario's nutrient prices ('outlook') or the list's ('list'). */
  outlookPricing: 'outlook' | 'list';
  /** The outlook's other scenarios computed beside the chosen one. */
  sideBySide: boolean;
  runId: number | null;
  /** The outlook whose contracted evaluation a contracted-output source reads. */
  contractOutlookId: number | null;
  /** First calendar year of the season a model run projects; empty: the run's last season + 1. */
  season: number | null;
  /** Hand-entered demand, in the mass unit shown (kg or lb). */
  nitrogen: number | null;
  phosphate: number | null;
  potash: number | null;
}

export interface BookingMonthValue {
  month: string;
  /** Share booked this month, in %. */
  sharePct: number | null;
  prepay: boolean;
}

export interface BookingValue {
  months: BookingMonthValue[];
  prepayDiscountPct: number | null;
  paymentTermsDays: number | null;
  deliveryMonth: string;
  financingRatePct: number | null;
}

export interface ScenarioValue {
  name: string;
  nitrogen: number | null;
  phosphate: number | null;
  potash: number | null;
}

export interface ProductValue {
  productId: number;
  name: string;
  grade: string;
  include: boolean;
  /** Price per product mass shown (per t or per short ton). */
  price: number | null;
  /** Lot in the product mass shown. */
  lot: number | null;
  /** The product list's own price and lot (metric), to tell a budget quote from the list. */
  listPricePerT: number | null;
  listLotT: number | null;
  /** The product is no longer in the co-op's list, so it cannot be chosen again. */
  gone: boolean;
}

export interface BudgetFormValue {
  name: string;
  source: SourceValue;
  booking: BookingValue;
  scenarios: ScenarioValue[];
  products: ProductValue[];
  lotRule: LotRule;
}

/** What the form does not edit but a save must keep (expected prices, item mapping, given elasticities...). */
export interface Preserved {
  sourceExtras: { prices?: Record<string, number>; items?: Partial<Record<Nutrient, string>>; elasticities?: ElasticityMatrix; evaluationId?: number };
  referencePrices?: Partial<Record<Nutrient, number>>;
  /** Product price overrides of each scenario, by scenario name. */
  productPriceChanges: Record<string, Record<string, number>>;
}

export const emptyPreserved = (): Preserved => ({ sourceExtras: {}, productPriceChanges: {} });

// --- defaults -----------------------------------------------------------------------------------

/**
 * A starting booking pattern inside the season's input window of the co-op's season calendar
 * (shared/season-calendar.ts): 40 % in the window's first month and 40 % two months later, both
 * prepaid; 20 % on terms near its end. The treasurer replaces it with the co-op's own programme.
 */
export function defaultBooking(startYear: number, calendar: SeasonCalendar = DEFAULT_SEASON_CALENDAR): BookingValue {
  const plan = defaultBookingMonths(calendar, startYear);
  return { months: plan.months, prepayDiscountPct: 0, paymentTermsDays: 30, deliveryMonth: plan.deliveryMonth, financingRatePct: null };
}

/** "2026/27" → 2026; null when the label has no leading year. */
export function seasonStartYear(label: string | null | undefined): number | null {
  const m = /^(\d{4})/.exec(label ?? '');
  return m ? Number(m[1]) : null;
}

/** A name for a scenario from its price changes: "N +20 %", "N +10 %, K2O −5 %", "All nutrients +10 %". */
export function scenarioName(s: Pick<ScenarioValue, Nutrient>): string {
  const label: Record<Nutrient, string> = { nitrogen: 'N', phosphate: 'P2O5', potash: 'K2O' };
  const all = s.nitrogen;
  if (all !== null && all !== 0 && NUTRIENTS.every((n) => s[n] === all)) return `All nutrients ${all > 0 ? '+' : '−'}${Math.abs(all)} %`;
  const parts = NUTRIENTS.filter((n) => s[n] !== null && s[n] !== 0).map((n) => `${label[n]} ${s[n]! > 0 ? '+' : '−'}${Math.abs(s[n]!)} %`);
  return parts.length ? parts.join(', ') : 'No price change';
}

/** The product list as budget lines, every active product chosen at its list price. */
export function productValuesFromList(list: FertiliserProduct[], system: UnitSystem): ProductValue[] {
  return list
    .filter((p) => p.active)
    .map((p) => ({
      productId: p.id,
      name: p.name,
      grade: gradeOf(p),
      include: true,
      price: pricePerTToShown(p.pricePerT, system),
      lot: productToShown(p.lotT, system),
      listPricePerT: p.pricePerT,
      listLotT: p.lotT,
      gone: false,
    }));
}

export function gradeOf(p: { nPct: number; p2o5Pct: number; k2oPct: number }): string {
  const f = (x: number) => (Number.isInteger(x) ? String(x) : String(Math.round(x * 10) / 10));
  return `${f(p.nPct)}-${f(p.p2o5Pct)}-${f(p.k2oPct)}`;
}

/** A saved budget's products (its copies first, as chosen), then the list's other active products, not chosen. */
export function productValuesFromStored(copies: ProductCopy[], list: FertiliserProduct[], system: UnitSystem): ProductValue[] {
  const byId = new Map(list.map((p) => [p.id, p]));
  const chosen = copies.map((c) => {
    const now = byId.get(c.productId);
    return {
      productId: c.productId,
      name: c.name,
      grade: gradeOf(c),
      include: now !== undefined,
      price: pricePerTToShown(c.pricePerT, system),
      lot: productToShown(c.lotT, system),
      listPricePerT: now?.pricePerT ?? null,
      listLotT: now?.lotT ?? null,
      gone: now === undefined,
    };
  });
  const others = productValuesFromList(
    list.filter((p) => !copies.some((c) => c.productId === p.id)),
    system,
  ).map((p) => ({ ...p, include: false }));
  return [...chosen, ...others];
}

/** The form's value for a saved budget's stored inputs. */
export function formValueFromStored(name: string, stored: StoredInputs, list: FertiliserProduct[], system: UnitSystem): { value: BudgetFormValue; preserved: Preserved } {
  const s = stored.source;
  const source: SourceValue = {
    kind: s.kind,
    outlookVersionId: s.kind === 'outlook' ? s.outlookVersionId : null,
    outlookScenario: s.kind === 'outlook' ? (s.scenario ?? 'base') : 'base',
    // A budget stored before these options bought at list prices, one scenario.
    outlookPricing: s.kind === 'outlook' ? (s.pricing ?? 'list') : 'outlook',
    sideBySide: s.kind === 'outlook' ? (s.sideBySide ?? false) : true,
    runId: s.kind === 'model-run' ? s.runId : null,
    contractOutlookId: s.kind === 'contracted' ? s.outlookId : null,
    season: s.kind === 'model-run' ? (s.season ?? null) : null,
    nitrogen: s.kind === 'manual' ? massToShown(s.nKg, system) : null,
    phosphate: s.kind === 'manual' ? massToShown(s.p2o5Kg, system) : null,
    potash: s.kind === 'manual' ? massToShown(s.k2oKg, system) : null,
  };
  const sourceExtras: Preserved['sourceExtras'] = {};
  if (s.kind === 'model-run') {
    if (s.prices && Object.keys(s.prices).length) sourceExtras.prices = s.prices;
    if (s.items) sourceExtras.items = s.items;
  }
  if ((s.kind === 'outlook' || s.kind === 'contracted') && s.items) sourceExtras.items = s.items;
  if (s.kind === 'contracted' && s.evaluationId !== undefined) sourceExtras.evaluationId = s.evaluationId;
  if (s.kind === 'manual' && s.elasticities) sourceExtras.elasticities = s.elasticities;
  const b = stored.bookingPlan;
  return {
    value: {
      name,
      source,
      booking: {
        months: b.months.map((m) => ({ month: m.month, sharePct: roundPct(m.share * 100), prepay: m.prepay })),
        prepayDiscountPct: b.prepayDiscountPct,
        paymentTermsDays: b.paymentTermsDays,
        deliveryMonth: b.deliveryMonth,
        financingRatePct: b.financingRatePct,
      },
      scenarios: stored.scenarios.map((sc) => ({
        name: sc.name,
        nitrogen: sc.priceChanges.nitrogen ?? null,
        phosphate: sc.priceChanges.phosphate ?? null,
        potash: sc.priceChanges.potash ?? null,
      })),
      products: productValuesFromStored(stored.products, list, system),
      lotRule: stored.options.lotRule,
    },
    preserved: {
      sourceExtras,
      referencePrices: stored.options.referencePrices,
      productPriceChanges: Object.fromEntries(stored.scenarios.filter((sc) => Object.keys(sc.productPriceChanges ?? {}).length).map((sc) => [sc.name, sc.productPriceChanges])),
    },
  };
}

/** Shares are shown in %: float noise goes (0.4 × 100 = 40.00000000000001), a third stays a third to 1e-9 %. */
function roundPct(v: number): number {
  return Math.round(v * 1e9) / 1e9;
}

/** Equal within a part in a billion: a price shown in another unit and converted back is still the list price. */
const same = (a: number, b: number | null) => b !== null && Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(b));

// --- to the API -----------------------------------------------------------------------------------

export function sourceInput(v: SourceValue, system: UnitSystem, extras: Preserved['sourceExtras']): BudgetSource | null {
  if (v.kind === 'outlook') {
    if (v.outlookVersionId === null) return null;
    return {
      kind: 'outlook',
      outlookVersionId: v.outlookVersionId,
      scenario: v.outlookScenario || 'base',
      pricing: v.outlookPricing,
      sideBySide: v.sideBySide,
      ...(extras.items ? { items: extras.items } : {}),
    };
  }
  if (v.kind === 'contracted') {
    if (v.contractOutlookId === null) return null;
    return {
      kind: 'contracted',
      outlookId: v.contractOutlookId,
      ...(extras.evaluationId !== undefined ? { evaluationId: extras.evaluationId } : {}),
      ...(extras.items ? { items: extras.items } : {}),
    };
  }
  if (v.kind === 'model-run') {
    if (v.runId === null) return null;
    return {
      kind: 'model-run',
      runId: v.runId,
      ...(extras.prices ? { prices: extras.prices } : {}),
      ...(v.season !== null ? { season: v.season } : {}),
      ...(extras.items ? { items: extras.items } : {}),
    };
  }
  if (v.nitrogen === null || v.phosphate === null || v.potash === null) return null;
  return {
    kind: 'manual',
    nKg: massFromShown(v.nitrogen, system),
    p2o5Kg: massFromShown(v.phosphate, system),
    k2oKg: massFromShown(v.potash, system),
    ...(extras.elasticities ? { elasticities: extras.elasticities } : {}),
  };
}

export function bookingInput(v: BookingValue): BookingPlanInput {
  return {
    months: v.months.map((m) => ({ month: m.month, share: (m.sharePct ?? 0) / 100, prepay: m.prepay })),
    prepayDiscountPct: v.prepayDiscountPct ?? 0,
    paymentTermsDays: v.paymentTermsDays ?? 0,
    deliveryMonth: v.deliveryMonth,
    financingRatePct: v.financingRatePct,
  };
}

export function scenarioInputs(v: ScenarioValue[], preserved: Preserved): ScenarioInput[] {
  return v.map((s) => {
    const priceChanges: ScenarioInput['priceChanges'] = {};
    for (const n of NUTRIENTS) if (s[n] !== null && s[n] !== 0) priceChanges[n] = s[n]!;
    return { name: s.name.trim(), priceChanges, productPriceChanges: preserved.productPriceChanges[s.name.trim()] ?? {} };
  });
}

/**
 * The chosen products; a price or lot is sent only where it differs from the product list's
 * (a budget quote), so the copy keeps the list's price note otherwise.
 */
export function productChoices(v: ProductValue[], system: UnitSystem): BudgetInput['products'] {
  return v
    .filter((p) => p.include && !p.gone)
    .map((p) => {
      const pricePerT = p.price === null ? null : pricePerTFromShown(p.price, system);
      const lotT = p.lot === null ? null : productFromShown(p.lot, system);
      return {
        productId: p.productId,
        ...(pricePerT !== null && !same(pricePerT, p.listPricePerT) ? { pricePerT } : {}),
        ...(lotT !== null && !same(lotT, p.listLotT) ? { lotT } : {}),
      };
    });
}

/** The API's BudgetInput for the form's value, or null while the source is not chosen. */
export function toBudgetInput(v: BudgetFormValue, system: UnitSystem, preserved: Preserved): BudgetInput | null {
  const source = sourceInput(v.source, system, preserved.sourceExtras);
  if (!source) return null;
  return {
    name: v.name.trim() || 'Untitled budget',
    source,
    products: productChoices(v.products, system),
    bookingPlan: bookingInput(v.booking),
    scenarios: scenarioInputs(v.scenarios, preserved),
    options: { lotRule: v.lotRule, ...(preserved.referencePrices ? { referencePrices: preserved.referencePrices } : {}) },
  };
}

/** Re-expresses the typed unit-bearing fields after a unit switch, so the same tonnes and prices stay. */
export function convertFormUnits(v: BudgetFormValue, from: UnitSystem, to: UnitSystem): Pick<BudgetFormValue, 'source' | 'products'> {
  const mass = (x: number | null) => (x === null ? null : massToShown(massFromShown(x, from), to));
  return {
    source: { ...v.source, nitrogen: mass(v.source.nitrogen), phosphate: mass(v.source.phosphate), potash: mass(v.source.potash) },
    products: v.products.map((p) => ({
      ...p,
      price: p.price === null ? null : pricePerTToShown(pricePerTFromShown(p.price, from), to),
      lot: p.lot === null ? null : productToShown(productFromShown(p.lot, from), to),
    })),
  };
}

// --- the reactive form ---------------------------------------------------------------------------

/** Booking months in order, shares adding up to 100 %, delivery not before the last booking. */
export function bookingProblems(v: BookingValue): string[] {
  const problems: string[] = [];
  if (!v.months.length) problems.push('Book at least one month.');
  const sum = v.months.reduce((a, m) => a + (m.sharePct ?? 0), 0);
  if (v.months.length && Math.abs(sum - 100) > 1e-4) problems.push(`The booked shares add up to ${+sum.toFixed(4)} %; they must add up to 100 %.`);
  for (let i = 1; i < v.months.length; i++)
    if (MONTH.test(v.months[i]!.month) && MONTH.test(v.months[i - 1]!.month) && v.months[i]!.month <= v.months[i - 1]!.month) {
      problems.push(`Booking month ${i + 1} (${v.months[i]!.month}) must come after month ${i} (${v.months[i - 1]!.month}).`);
      break;
    }
  const last = v.months.at(-1)?.month;
  if (last && MONTH.test(last) && MONTH.test(v.deliveryMonth) && v.deliveryMonth < last) problems.push(`Delivery (${v.deliveryMonth}) cannot come before the last booking month (${last}).`);
  return problems;
}

function bookingValidator(control: AbstractControl): ValidationErrors | null {
  const problems = bookingProblems(control.value as BookingValue);
  return problems.length ? { booking: problems } : null;
}

function scenariosValidator(control: AbstractControl): ValidationErrors | null {
  const names = (control.value as ScenarioValue[]).map((s) => s.name.trim().toLowerCase());
  if (names.includes('base')) return { scenarios: '"Base" is the name of the unchanged scenario; name yours otherwise.' };
  const dup = names.find((n, i) => n && names.indexOf(n) !== i);
  return dup ? { scenarios: `Two scenarios are named "${dup}".` } : null;
}

function productsValidator(control: AbstractControl): ValidationErrors | null {
  return (control.value as ProductValue[]).some((p) => p.include && !p.gone) ? null : { products: 'Choose at least one product.' };
}

/** A % change field: empty (no change) or what the server accepts (shared/budget-schemas.ts). */
const pctChange = [zodValidator(pctChangeSchema.nullable())];

/** A share typed in % checked as the server's fraction, so the limits and words are the server's. */
function sharePctValidator(control: AbstractControl): ValidationErrors | null {
  const v = control.value as number | null;
  if (v === null) return null;
  const r = bookedShareSchema.safeParse(v / 100);
  return r.success ? null : { schema: r.error.issues[0]?.message ?? 'Not valid' };
}

export function monthGroup(fb: NonNullableFormBuilder, v: BookingMonthValue) {
  return fb.group({
    month: [v.month, [Validators.required, Validators.pattern(MONTH)]],
    sharePct: fb.control<number | null>(v.sharePct, [Validators.required, sharePctValidator]),
    prepay: [v.prepay],
  });
}

export function scenarioGroup(fb: NonNullableFormBuilder, v: ScenarioValue) {
  return fb.group({
    name: [v.name, [Validators.required, zodValidator(scenarioSchema.shape.name)]],
    nitrogen: fb.control<number | null>(v.nitrogen, pctChange),
    phosphate: fb.control<number | null>(v.phosphate, pctChange),
    potash: fb.control<number | null>(v.potash, pctChange),
  });
}

export function productGroup(fb: NonNullableFormBuilder, v: ProductValue) {
  return fb.group({
    productId: [v.productId],
    name: [v.name],
    grade: [v.grade],
    // A product gone from the list cannot be chosen again (disabled, but still in getRawValue()).
    include: fb.control({ value: v.include, disabled: v.gone }),
    price: fb.control<number | null>(v.price, [Validators.required, Validators.min(0.000001)]),
    lot: fb.control<number | null>(v.lot, [Validators.required, Validators.min(0.000001)]),
    listPricePerT: fb.control<number | null>(v.listPricePerT),
    listLotT: fb.control<number | null>(v.listLotT),
    gone: [v.gone],
  });
}

export function buildBudgetForm(fb: NonNullableFormBuilder, v: BudgetFormValue) {
  const nonNegative = [Validators.required, Validators.min(0)];
  return fb.group({
    name: [v.name, [Validators.required, zodValidator(budgetInputSchema.shape.name)]],
    source: fb.group({
      kind: fb.control<SourceKind>(v.source.kind),
      outlookVersionId: fb.control<number | null>(v.source.outlookVersionId),
      outlookScenario: [v.source.outlookScenario],
      outlookPricing: fb.control<'outlook' | 'list'>(v.source.outlookPricing),
      sideBySide: [v.source.sideBySide],
      runId: fb.control<number | null>(v.source.runId),
      contractOutlookId: fb.control<number | null>(v.source.contractOutlookId),
      season: fb.control<number | null>(v.source.season, [Validators.min(SEASON_YEARS.min), Validators.max(SEASON_YEARS.max)]),
      nitrogen: fb.control<number | null>(v.source.nitrogen, nonNegative),
      phosphate: fb.control<number | null>(v.source.phosphate, nonNegative),
      potash: fb.control<number | null>(v.source.potash, nonNegative),
    }),
    booking: fb.group(
      {
        months: fb.array(v.booking.months.map((m) => monthGroup(fb, m))),
        prepayDiscountPct: fb.control<number | null>(v.booking.prepayDiscountPct, [Validators.required, zodValidator(bookingPlanSchema.shape.prepayDiscountPct)]),
        paymentTermsDays: fb.control<number | null>(v.booking.paymentTermsDays, [Validators.required, zodValidator(bookingPlanSchema.shape.paymentTermsDays)]),
        deliveryMonth: [v.booking.deliveryMonth, [Validators.required, Validators.pattern(MONTH)]],
        financingRatePct: fb.control<number | null>(v.booking.financingRatePct, [zodValidator(bookingPlanSchema.shape.financingRatePct)]),
      },
      { validators: bookingValidator },
    ),
    scenarios: fb.array(
      v.scenarios.map((s) => scenarioGroup(fb, s)),
      { validators: scenariosValidator },
    ),
    products: fb.array(
      v.products.map((p) => productGroup(fb, p)),
      { validators: productsValidator },
    ),
    lotRule: fb.control<LotRule>(v.lotRule),
  });
}

export type BudgetForm = ReturnType<typeof buildBudgetForm>;
export type MonthGroup = ReturnType<typeof monthGroup>;
export type ScenarioGroup = ReturnType<typeof scenarioGroup>;
export type ProductGroup = ReturnType<typeof productGroup>;

/** Replaces the rows of a form array with groups made from `values`. */
export function resetArray<T, G extends FormGroup>(array: FormArray<G>, values: T[], make: (v: T) => G): void {
  array.clear({ emitEvent: false });
  for (const v of values) array.push(make(v), { emitEvent: false });
}

/**
 * Only the fields of the current source kind count: the hand-entered amounts are required for a
 * manual source and ignored otherwise.
 */
export function syncSourceValidators(form: BudgetForm): void {
  const s = form.controls.source.controls;
  const manual = s.kind.value === 'manual';
  for (const c of [s.nitrogen, s.phosphate, s.potash]) {
    if (manual) c.enable({ emitEvent: false });
    else c.disable({ emitEvent: false });
  }
  if (s.kind.value === 'model-run') s.season.enable({ emitEvent: false });
  else s.season.disable({ emitEvent: false });
}

// --- problems in words ---------------------------------------------------------------------------

/**
 * Where a server problem lies, in the page's words, from its `details[].path`
 * (`body.bookingPlan.months.0.month`, `products.2.productId`, `source.prices.urea`...).
 */
export function whereOf(path: string, productNames: string[], scenarioNames: string[]): string {
  const parts = path.replace(/^(body|query|params)\./, '').split('.');
  const index = (k: number) => (parts[k] !== undefined && /^\d+$/.test(parts[k]!) ? Number(parts[k]) : null);
  switch (parts[0]) {
    case 'name':
      return 'Name';
    case 'source':
      return parts[1] === 'prices' && parts[2] ? `Demand source, expected price of ${parts[2]}` : 'Demand source';
    case 'bookingPlan': {
      if (parts[1] === 'months') {
        const i = index(2);
        return i === null ? 'Booking plan' : `Booking plan, month ${i + 1}`;
      }
      const field: Record<string, string> = {
        deliveryMonth: 'delivery month',
        prepayDiscountPct: 'prepayment discount',
        paymentTermsDays: 'payment terms',
        financingRatePct: 'financing rate',
      };
      return parts[1] && field[parts[1]] ? `Booking plan, ${field[parts[1]]}` : 'Booking plan';
    }
    case 'scenarios': {
      const i = index(1);
      if (i === null) return 'Scenarios';
      return `Scenario “${scenarioNames[i] ?? i + 1}”`;
    }
    case 'products': {
      const i = index(1);
      return i === null ? 'Products' : `Products, ${productNames[i] ?? `product ${i + 1}`}`;
    }
    case 'options':
      return parts[1] === 'referencePrices' ? 'Reference nutrient prices' : 'Options';
    case 'demand':
      return 'Nutrient demand';
    default:
      return 'Budget';
  }
}
