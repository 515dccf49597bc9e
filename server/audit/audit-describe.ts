/**
 * The audit log in words (issue 16): for each entry a sentence saying who did what to which record,
 * and the changed fields with their names in words and values as people read them (ids as names,
 * roles as labels, a long list summarised as "3 products changed: Urea 46 % N price per t 520 → 560;
 * 1 added"), never raw JSON over several screens.
 */
import { ROLE_LABELS, type Role } from '../../shared/roles.js';

export interface AuditChange {
  label: string;
  before: string;
  after: string;
}

export interface DescribedAudit {
  sentence: string;
  changes: AuditChange[];
}

/** Names of the records an entry may point at, by id. */
export interface AuditNames {
  users: Map<number, string>;
  farms: Map<number, string>;
  items: Map<number, string>;
  seasons: Map<number, string>;
  deliveryPoints: Map<number, string>;
  products: Map<number, string>;
  budgets: Map<number, string>;
  models: Map<number, string>;
  outlooks: Map<number, string>;
}

export interface AuditRowInput {
  actorName: string | null;
  action: string;
  entity: string;
  entityId: string | null;
  before: unknown;
  after: unknown;
}

const MAX_TEXT = 80;
const MAX_CHANGES = 8;

/** The kinds of record in words: singular and plural. */
const ENTITY_WORDS: Record<string, [string, string]> = {
  user: ['account', 'accounts'],
  settings: ['co-op settings', 'co-op settings'],
  price: ['price', 'prices'],
  'price-index': ['price index', 'price indexes'],
  'farm-record': ['farm record', 'farm records'],
  'farm-land': ['farm land figure', 'farm land figures'],
  'farm-factor': ['fixed factor', 'fixed factors'],
  farm: ['farm', 'farms'],
  item: ['item', 'items'],
  season: ['season', 'seasons'],
  'delivery-point': ['delivery point', 'delivery points'],
  import: ['import', 'imports'],
  model: ['model', 'models'],
  'model-run': ['model fit', 'model fits'],
  budget: ['budget', 'budgets'],
  'fertiliser-product': ['fertiliser product', 'fertiliser products'],
  'futures-quote': ['futures quote', 'futures quotes'],
  outlook: ['outlook', 'outlooks'],
  mail: ['mail preference', 'mail preferences'],
  contract: ['delivery contract', 'delivery contracts'],
  booking: ['booking', 'bookings'],
  'booking-round': ['booking round', 'booking rounds'],
  'booking-payment': ['prepayment', 'prepayments'],
};

/** What the action's last word does, as a past-tense verb. */
const VERBS: Record<string, string> = {
  create: 'added',
  update: 'changed',
  delete: 'removed',
  invite: 'invited',
  'resend-invitation': 'sent the invitation again to',
  'send-reset-link': 'sent a password reset link to',
  'accept-invitation': 'accepted the invitation for',
  'reset-password': 'chose a new password for',
  publish: 'published',
  project: 'ran the projection of',
  expectations: 'set the expected prices of',
  'mail-retry': 'sent a failed e-mail again for',
  commit: 'committed',
  cancel: 'cancelled',
  prepaid: 'recorded the prepayment of',
  state: 'changed the state of',
  subscribe: 'turned outlook e-mails on for',
  unsubscribe: 'turned outlook e-mails off for',
  'unsubscribe-link': 'turned outlook e-mails off (unsubscribe link) for',
  'unsubscribe-one-click': "turned outlook e-mails off (mail program's one-click) for",
};

/** Field names in words; fields not listed are split from camelCase. Hidden fields are left out. */
const FIELD_WORDS: Record<string, string> = {
  farmId: 'farm',
  itemId: 'item',
  seasonId: 'season',
  deliveryPointId: 'delivery point',
  productId: 'product',
  modelRunId: 'model fit',
  runId: 'model fit',
  outlookVersionId: 'outlook version',
  landHa: 'land (ha)',
  nPct: 'N %',
  p2o5Pct: 'P2O5 %',
  k2oPct: 'K2O %',
  pricePerT: 'price per t',
  lotT: 'lot (t)',
  mailOptOut: 'outlook e-mails',
  active: 'status',
  observedOn: 'observed on',
  coopName: 'co-op name',
  storageCapacityT: 'storage capacity (t)',
  handlingCapacityTPerDay: 'handling capacity (t/day)',
  bookingPlan: 'booking plan',
  reference: 'contract number',
  deliveryFrom: 'first delivery month',
  deliveryTo: 'last delivery month',
  seasonCalendar: 'season calendar',
};
const HIDDEN = new Set(['id', 'createdAt', 'updatedAt', 'passwordHash', 'version', 'inputsHash', 'lastSignInAt']);

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

function words(field: string): string {
  return FIELD_WORDS[field] ?? field.replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase();
}

function clip(text: string): string {
  return text.length > MAX_TEXT ? `${text.slice(0, MAX_TEXT - 1)}…` : text;
}

function numberText(n: number): string {
  return Number.isInteger(n) ? n.toLocaleString('en-GB') : n.toLocaleString('en-GB', { maximumSignificantDigits: 6 });
}

function idName(field: string, id: unknown, names: AuditNames): string | null {
  if (typeof id !== 'number') return null;
  const map =
    field === 'farmId' ? names.farms
    : field === 'itemId' ? names.items
    : field === 'seasonId' ? names.seasons
    : field === 'deliveryPointId' ? names.deliveryPoints
    : field === 'productId' ? names.products
    : field === 'actorUserId' || field === 'userId' ? names.users
    : null;
  return map ? (map.get(id) ?? `no longer there (#${id})`) : null;
}

/** One value as people read it; `field` decides ids, roles and yes/no words. */
function valueText(field: string, value: unknown, names: AuditNames): string {
  if (value === undefined || value === null || value === '') return field === 'farmId' ? 'none' : '—';
  const named = idName(field, value, names);
  if (named) return named;
  if (field === 'role' && typeof value === 'string' && value in ROLE_LABELS) return ROLE_LABELS[value as Role];
  if (field === 'active' && typeof value === 'boolean') return value ? 'active' : 'deactivated';
  if (field === 'mailOptOut' && typeof value === 'boolean') return value ? 'off' : 'on';
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'number') return numberText(value);
  if (typeof value === 'string') return clip(value);
  if (Array.isArray(value)) return value.length === 0 ? 'none' : value.every((v) => typeof v !== 'object') ? clip(value.map((v) => valueText(field, v, names)).join(', ')) : `${value.length} entries`;
  if (isObject(value)) {
    if (typeof value['kind'] === 'string') return clip(Object.entries(value).map(([k, v]) => (typeof v === 'object' && v !== null ? null : `${words(k)} ${valueText(k, v, names)}`)).filter(Boolean).join(', '));
    return `${Object.keys(value).length} settings`;
  }
  return clip(String(value));
}

const same = (a: unknown, b: unknown) => JSON.stringify(a ?? null) === JSON.stringify(b ?? null);

/** The key that identifies an element of a list of records, and its name in words. */
function elementKey(v: unknown): string | null {
  if (!isObject(v)) return null;
  for (const k of ['id', 'productId', 'itemId', 'item', 'code', 'name', 'month']) if (v[k] !== undefined && v[k] !== null) return `${k}:${String(v[k])}`;
  return null;
}
function elementName(v: Record<string, unknown>, names: AuditNames): string {
  if (typeof v['productId'] === 'number') return idName('productId', v['productId'], names)!;
  if (typeof v['itemId'] === 'number') return idName('itemId', v['itemId'], names)!;
  for (const k of ['name', 'item', 'code', 'month', 'label']) if (typeof v[k] === 'string') return v[k] as string;
  return 'an entry';
}

/** Two lists of records: "3 products changed: Urea price per t 520 → 560; …; 1 added, 1 removed". */
function listSummary(field: string, before: unknown[], after: unknown[], names: AuditNames): AuditChange | null {
  const keyed = (list: unknown[]) => new Map(list.map((v, i) => [elementKey(v) ?? `#${i}`, v]));
  const b = keyed(before);
  const a = keyed(after);
  const changed: string[] = [];
  let added = 0;
  let removed = 0;
  for (const [k, v] of a) {
    const old = b.get(k);
    if (old === undefined) added++;
    else if (!same(old, v) && isObject(old) && isObject(v)) {
      const diffs = [...new Set([...Object.keys(old), ...Object.keys(v)])]
        .filter((f) => !same(old[f], v[f]) && typeof (old[f] ?? v[f]) !== 'object')
        .map((f) => `${words(f)} ${valueText(f, old[f], names)} → ${valueText(f, v[f], names)}`);
      changed.push(`${elementName(v, names)} ${diffs.join(', ') || 'details changed'}`);
    } else if (!same(old, v)) changed.push(elementName(isObject(v) ? v : {}, names));
  }
  for (const k of b.keys()) if (!a.has(k)) removed++;
  if (!changed.length && !added && !removed) return null;
  const label = words(field);
  const parts: string[] = [];
  if (changed.length) parts.push(`${changed.length} changed: ${changed.slice(0, 3).join('; ')}${changed.length > 3 ? '; …' : ''}`);
  if (added) parts.push(`${added} added`);
  if (removed) parts.push(`${removed} removed`);
  return { label, before: `${before.length} ${before.length === 1 ? 'entry' : 'entries'}`, after: parts.join('; ') };
}

/** The fields that differ between before and after, in words. */
export function describeChanges(before: unknown, after: unknown, names: AuditNames): AuditChange[] {
  const b = isObject(before) ? before : {};
  const a = isObject(after) ? after : {};
  const out: AuditChange[] = [];
  for (const field of [...new Set([...Object.keys(b), ...Object.keys(a)])]) {
    if (HIDDEN.has(field) || same(b[field], a[field])) continue;
    const x = b[field];
    const y = a[field];
    if (Array.isArray(x) && Array.isArray(y) && [...x, ...y].some((v) => typeof v === 'object' && v !== null)) {
      const summary = listSummary(field, x, y, names);
      if (summary) out.push(summary);
      continue;
    }
    if (isObject(x) && isObject(y) && typeof x['kind'] !== 'string') {
      // A nested group (e.g. a booking plan): its own changed fields, one line each.
      for (const c of describeChanges(x, y, names)) out.push({ ...c, label: `${words(field)}: ${c.label}` });
      continue;
    }
    out.push({ label: words(field), before: valueText(field, x, names), after: valueText(field, y, names) });
  }
  if (out.length > MAX_CHANGES) return [...out.slice(0, MAX_CHANGES - 1), { label: `${out.length - MAX_CHANGES + 1} more fields`, before: '', after: 'changed' }];
  return out;
}

/** The record an entry is about, in words: "the account of Sam Second", "farm Hollybrook Farm", "2 prices". */
function recordWords(row: AuditRowInput, names: AuditNames): string {
  const [one, many] = ENTITY_WORDS[row.entity] ?? [row.entity.replace(/-/g, ' '), `${row.entity.replace(/-/g, ' ')}s`];
  const ids = (row.entityId ?? '').split(',').filter((s) => /^\d+$/.test(s)).map(Number);
  if (ids.length > 1) return `${ids.length} ${many}`;
  const id = ids[0];
  const snapshot = isObject(row.after) ? row.after : isObject(row.before) ? row.before : {};
  const byId = (map: Map<number, string>) => (id !== undefined ? map.get(id) : undefined);
  const own =
    row.entity === 'user' ? byId(names.users)
    : row.entity === 'farm' ? byId(names.farms)
    : row.entity === 'item' ? byId(names.items)
    : row.entity === 'season' ? byId(names.seasons)
    : row.entity === 'delivery-point' ? byId(names.deliveryPoints)
    : row.entity === 'fertiliser-product' ? byId(names.products)
    : row.entity === 'budget' ? byId(names.budgets)
    : row.entity === 'model' ? byId(names.models)
    : row.entity === 'outlook' ? byId(names.outlooks)
    : undefined;
  const name = own ?? (['name', 'title', 'label', 'code'].map((k) => snapshot[k]).find((v) => typeof v === 'string') as string | undefined);
  if (row.entity === 'user') {
    const person = name ?? `a removed account (#${id})`;
    return /\.(update|accept-invitation|reset-password)$/.test(row.action) ? `the account of ${person}` : person;
  }
  if (row.entity === 'settings') return 'the co-op settings';
  if (row.entity === 'mail') return name ? `${name}'s outlook e-mails` : 'outlook e-mails';
  if (row.entity === 'contract') {
    const parts = ['farmId', 'itemId', 'seasonId'].map((f) => idName(f, snapshot[f], names)).filter(Boolean);
    const ref = typeof snapshot['reference'] === 'string' ? ` ${clip(snapshot['reference'] as string)}` : id !== undefined ? ` #${id}` : '';
    return `${one}${ref}${parts.length ? ` (${parts.join(', ')})` : ''}`;
  }
  if (row.entity === 'price' || row.entity === 'farm-record' || row.entity === 'farm-land' || row.entity === 'farm-factor') {
    const parts = ['farmId', 'itemId', 'seasonId', 'deliveryPointId'].map((f) => idName(f, snapshot[f], names)).filter(Boolean);
    return parts.length ? `a ${one} (${parts.join(', ')})` : `a ${one}`;
  }
  return name ? `${one} “${clip(name)}”` : id !== undefined ? `${one} #${id}` : `a ${one}`;
}

export function describeAudit(row: AuditRowInput, names: AuditNames): DescribedAudit {
  const who = row.actorName ?? 'The system';
  const verbKey = row.action.slice(row.action.indexOf('.') + 1);
  const verb = VERBS[verbKey] ?? `did “${verbKey.replace(/-/g, ' ')}” to`;
  const subject = recordWords(row, names);
  const sentence = `${who} ${verb} ${subject}.`;
  const created = row.before === null || row.before === undefined;
  // A new record lists its values, with no "before" column of dashes.
  const changes = row.action.endsWith('.delete') ? [] : describeChanges(row.before, row.after, names).map((c) => (created ? { ...c, before: '' } : c));
  return { sentence: sentence.charAt(0).toUpperCase() + sentence.slice(1), changes };
}
