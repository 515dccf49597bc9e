/**
 * Checked rows in columns (typed arrays; repeated text as a dictionary) for the trip from the worker
 * thread: 100,000 price rows take about 4 MB this way and move without copying, where as objects
 * they take about 50 MB on each side of the thread boundary.
 */
import type { ContractWrite, FactorWrite, ImportWrites, PriceWrite, RecordWrite, TableName } from './import-types.js';

/** What the commit needs of a table's rows: how many, and a few at a time. Arrays qualify. */
export interface RowSource<T> {
  readonly length: number;
  slice(start: number, end: number): T[];
}

export interface WriteSet {
  prices: RowSource<PriceWrite>;
  records: RowSource<RecordWrite>;
  factors: RowSource<FactorWrite>;
  contracts: RowSource<ContractWrite>;
}

interface Spec {
  ints: string[];
  floats: string[];
  texts: string[];
}

const SPECS: Record<TableName, Spec> = {
  prices: { ints: ['row', 'itemId', 'seasonId', 'deliveryPointId'], floats: ['price'], texts: ['currency', 'source', 'observedOn'] },
  records: { ints: ['row', 'farmId', 'seasonId', 'itemId'], floats: ['quantity'], texts: [] },
  factors: { ints: ['row', 'farmId', 'seasonId'], floats: ['value'], texts: ['factor'] },
  contracts: { ints: ['row', 'farmId', 'seasonId', 'itemId', 'priceCents'], floats: ['quantity'], texts: ['reference', 'currency', 'deliveryFrom', 'deliveryTo', 'status'] },
};

/** Appends rows straight into growing typed arrays, so no per-row object outlives its check. */
export class PackedBuilder<T extends object> implements RowSource<T> {
  private n = 0;
  private cap = 1024;
  private ints: Record<string, Int32Array> = {};
  private floats: Record<string, Float64Array> = {};
  private texts: Record<string, { dictionary: string[]; index: Int32Array; seen: Map<string, number> }> = {};

  constructor(private readonly table: TableName) {
    const spec = SPECS[table];
    for (const k of spec.ints) this.ints[k] = new Int32Array(this.cap);
    for (const k of spec.floats) this.floats[k] = new Float64Array(this.cap);
    for (const k of spec.texts) this.texts[k] = { dictionary: [], index: new Int32Array(this.cap), seen: new Map() };
  }

  get length() {
    return this.n;
  }

  private grow() {
    this.cap *= 2;
    const grown = <A extends Int32Array | Float64Array>(a: A): A => {
      const b = new (a.constructor as new (n: number) => A)(this.cap);
      b.set(a);
      return b;
    };
    for (const k in this.ints) this.ints[k] = grown(this.ints[k]);
    for (const k in this.floats) this.floats[k] = grown(this.floats[k]);
    for (const k in this.texts) this.texts[k].index = grown(this.texts[k].index);
  }

  push(row: T) {
    if (this.n === this.cap) this.grow();
    const r = row as Record<string, unknown>;
    const i = this.n++;
    for (const k in this.ints) this.ints[k][i] = r[k] as number;
    for (const k in this.floats) this.floats[k][i] = r[k] as number;
    for (const k in this.texts) {
      const t = this.texts[k];
      const v = r[k] as string;
      let j = t.seen.get(v);
      if (j === undefined) {
        j = t.dictionary.length;
        t.dictionary.push(v);
        t.seen.set(v, j);
      }
      t.index[i] = j;
    }
  }

  /** The rows so far as plain data (the arrays cut to length). */
  pack(): PackedTable {
    const cut = <A extends Int32Array | Float64Array>(a: A) => a.slice(0, this.n) as A;
    const out: PackedTable = { length: this.n, ints: {}, floats: {}, texts: {} };
    for (const k in this.ints) out.ints[k] = cut(this.ints[k]);
    for (const k in this.floats) out.floats[k] = cut(this.floats[k]);
    for (const k in this.texts) out.texts[k] = { dictionary: this.texts[k].dictionary, index: cut(this.texts[k].index) };
    return out;
  }

  slice(start: number, end: number): T[] {
    return new PackedRows<T>(this.pack(), ROW_AT[this.table]).slice(start, end);
  }
}

/** Plain data: survives structured cloning. */
export interface PackedTable {
  length: number;
  ints: Record<string, Int32Array>;
  floats: Record<string, Float64Array>;
  texts: Record<string, { dictionary: string[]; index: Int32Array }>;
}

export type PackedWrites = Record<TableName, PackedTable>;

function packTable(rows: readonly object[], spec: Spec): PackedTable {
  const n = rows.length;
  const out: PackedTable = { length: n, ints: {}, floats: {}, texts: {} };
  for (const k of spec.ints) out.ints[k] = new Int32Array(n);
  for (const k of spec.floats) out.floats[k] = new Float64Array(n);
  const seen: Record<string, Map<string, number>> = {};
  for (const k of spec.texts) {
    out.texts[k] = { dictionary: [], index: new Int32Array(n) };
    seen[k] = new Map();
  }
  for (let i = 0; i < n; i++) {
    const r = rows[i] as Record<string, unknown>;
    for (const k of spec.ints) out.ints[k][i] = r[k] as number;
    for (const k of spec.floats) out.floats[k][i] = r[k] as number;
    for (const k of spec.texts) {
      const v = r[k] as string;
      let j = seen[k].get(v);
      if (j === undefined) {
        j = out.texts[k].dictionary.length;
        out.texts[k].dictionary.push(v);
        seen[k].set(v, j);
      }
      out.texts[k].index[i] = j;
    }
  }
  return out;
}

export function packWrites(writes: ImportWrites | BuiltWrites): PackedWrites {
  const one = (rows: readonly object[] | PackedBuilder<object>, table: TableName) => (rows instanceof PackedBuilder ? rows.pack() : packTable(rows, SPECS[table]));
  return { prices: one(writes.prices, 'prices'), records: one(writes.records, 'records'), factors: one(writes.factors, 'factors'), contracts: one(writes.contracts, 'contracts') };
}

/** What the validator fills. */
export interface BuiltWrites {
  prices: PackedBuilder<PriceWrite>;
  records: PackedBuilder<RecordWrite>;
  factors: PackedBuilder<FactorWrite>;
  contracts: PackedBuilder<ContractWrite>;
}

export function newBuiltWrites(): BuiltWrites {
  return { prices: new PackedBuilder('prices'), records: new PackedBuilder('records'), factors: new PackedBuilder('factors'), contracts: new PackedBuilder('contracts') };
}

/** The buffers to transfer (not copy) with a postMessage. */
export function transferList(p: PackedWrites): ArrayBuffer[] {
  const out: ArrayBuffer[] = [];
  for (const t of Object.values(p)) {
    for (const a of [...Object.values(t.ints), ...Object.values(t.floats)]) out.push(a.buffer as ArrayBuffer);
    for (const x of Object.values(t.texts)) out.push(x.index.buffer as ArrayBuffer);
  }
  return out;
}

/** Rebuilds row i of a packed table (one function per table: generic loops over keys are slow). */
const ROW_AT: Record<TableName, (t: PackedTable, i: number) => object> = {
  prices: (t, i) => ({
    row: t.ints.row[i],
    itemId: t.ints.itemId[i],
    seasonId: t.ints.seasonId[i],
    deliveryPointId: t.ints.deliveryPointId[i],
    price: t.floats.price[i],
    currency: t.texts.currency.dictionary[t.texts.currency.index[i]],
    source: t.texts.source.dictionary[t.texts.source.index[i]],
    observedOn: t.texts.observedOn.dictionary[t.texts.observedOn.index[i]],
  }),
  records: (t, i) => ({ row: t.ints.row[i], farmId: t.ints.farmId[i], seasonId: t.ints.seasonId[i], itemId: t.ints.itemId[i], quantity: t.floats.quantity[i] }),
  factors: (t, i) => ({ row: t.ints.row[i], farmId: t.ints.farmId[i], seasonId: t.ints.seasonId[i], factor: t.texts.factor.dictionary[t.texts.factor.index[i]], value: t.floats.value[i] }),
  contracts: (t, i) => {
    const text = (k: string) => t.texts[k].dictionary[t.texts[k].index[i]];
    return {
      row: t.ints.row[i],
      reference: text('reference'),
      farmId: t.ints.farmId[i],
      seasonId: t.ints.seasonId[i],
      itemId: t.ints.itemId[i],
      quantity: t.floats.quantity[i],
      priceCents: t.ints.priceCents[i],
      currency: text('currency'),
      deliveryFrom: text('deliveryFrom'),
      deliveryTo: text('deliveryTo'),
      status: text('status'),
    };
  },
};

export class PackedRows<T> implements RowSource<T> {
  constructor(
    private readonly table: PackedTable,
    private readonly rowAt: (t: PackedTable, i: number) => object,
  ) {}

  get length() {
    return this.table.length;
  }

  slice(start: number, end: number): T[] {
    const from = Math.max(0, start);
    const to = Math.min(this.table.length, end);
    const out = new Array<T>(Math.max(0, to - from));
    for (let i = from; i < to; i++) out[i - from] = this.rowAt(this.table, i) as T;
    return out;
  }
}

export function unpackedView(p: PackedWrites): WriteSet {
  return {
    prices: new PackedRows<PriceWrite>(p.prices, ROW_AT.prices),
    records: new PackedRows<RecordWrite>(p.records, ROW_AT.records),
    factors: new PackedRows<FactorWrite>(p.factors, ROW_AT.factors),
    contracts: new PackedRows<ContractWrite>(p.contracts, ROW_AT.contracts),
  };
}

/** Visits the rows a block at a time (each block's objects are garbage soon after). */
export function forEachRow<T>(rows: RowSource<T>, visit: (row: T) => void, block = 10_000) {
  for (let i = 0; i < rows.length; i += block) for (const r of rows.slice(i, i + block)) visit(r);
}
