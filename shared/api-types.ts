import type { Role } from './roles.js';
import type { SeasonCalendar } from './season-calendar.js';

/** The one JSON error shape every failing API call answers with. */
export interface ApiError {
  error: {
    code: string;
    message: string;
    /** Field-level problems: `path` names the field (e.g. `email`, `rows.3.price`). */
    details?: { path: string; message: string }[];
  };
}

/** `GET /api/auth/me`. */
export interface Me {
  id: number;
  email: string;
  name: string;
  role: Role;
  farmId: number | null;
}

export type UserStatus = 'active' | 'invited' | 'deactivated';

/** A row of `GET /api/users` (admin only). */
export interface UserSummary {
  id: number;
  email: string;
  name: string;
  role: Role;
  farmId: number | null;
  farmName: string | null;
  status: UserStatus;
  createdAt: string;
  lastSignInAt: string | null;
}

/** `GET /api/auth/tokens/:token`: what a one-time link is for. */
export interface TokenInfo {
  purpose: 'invite' | 'reset';
  email: string;
  name: string;
  expiresAt: string;
}

/** `GET /api/farms`: members get only their own farm. */
export interface FarmSummary {
  id: number;
  code: string;
  name: string;
  region: string;
  landHa: number;
  /** The member accounts linked to the farm (a family farm may have several), by name. */
  members: FarmMember[];
}

export interface FarmMember {
  id: number;
  name: string;
}

/** "Ann Ash, Ben Ash", or "no account linked". */
export function farmMemberNames(members: readonly FarmMember[]): string {
  return members.length ? members.map((m) => m.name).join(', ') : 'no account linked';
}

/** `GET /api/settings` (everyone signed in reads; admin writes). */
export interface CoopSettings {
  coopName: string;
  currency: string;
  unitSystem: 'metric' | 'us';
  /** How numbers are written in grids, pasted blocks and imports: 1234.5 (`point`) or 1234,5 (`comma`). */
  decimalMark: 'point' | 'comma';
  storageCapacityT: number;
  handlingCapacityTPerDay: number;
  /** When a season's inputs are bought and its crop delivered. */
  seasonCalendar: SeasonCalendar;
}

/** `GET /api/summary`: the figures a home page starts from. */
export interface CoopSummary {
  coopName: string;
  farms: number;
  members: number;
  items: { outputs: number; inputs: number };
  /** Seasons with any price or farm record; `opened`: later seasons set up (e.g. for an outlook) with no data yet. */
  seasons: { count: number; first: string | null; last: string | null; opened: string[] };
  priceObservations: number;
  farmRecords: number;
  /** Seasons (labels) for which some farm has no record, newest first. */
  recordGaps: { season: string; farmsMissing: number }[];
  /** The newest season any farm has records for (null when none has). */
  lastRecordedSeason: string | null;
  /** What the signed-in person could do next, worded for their role, most pressing first. */
  nextSteps: NextStep[];
  /** While the demo co-op's model, outlook and budget are being prepared after a fresh start. */
  demo: { status: 'preparing' | 'failed'; stage: string; error: string | null } | null;
}

/** One thing to do next on Home. */
export interface NextStep {
  /** A stable name for the kind of step (tests and icons key on it). */
  kind: 'invite-members' | 'no-farms' | 'no-prices' | 'records-missing' | 'records-gap' | 'no-model' | 'fit-running' | 'model-stale' | 'outlook-unpublished' | 'outlook-changed' | 'budget-missing' | 'budget-behind';
  icon: string;
  text: string;
  link?: { path: string; label: string };
}

/** `GET /api/my-farm` (member): their own farm and its records. */
export interface MyFarm {
  farm: FarmSummary;
  records: { season: string; item: string; role: 'output' | 'input'; unit: string; quantity: number }[];
}

/** `GET /api/dev/mail` (admin, development only). */
export interface StoredMail {
  id: number;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  /** The Message-ID header as sent (the outbox sets one per message; retries keep it). */
  messageId?: string | null;
}

export interface Item {
  id: number;
  code: string;
  name: string;
  role: 'output' | 'input';
  category: 'grain' | 'oilseed' | 'fertiliser' | 'fuel' | 'labour' | 'other';
  unit: string;
  nPct: number | null;
  p2o5Pct: number | null;
  k2oPct: number | null;
}

export interface Season {
  id: number;
  label: string;
  startYear: number;
  startMonth: number;
  startsOn: string;
}

export interface DeliveryPoint {
  id: number;
  name: string;
  kind: 'delivery point' | 'region';
  region: string;
}

export interface PriceRow {
  id: number;
  itemId: number;
  itemCode: string;
  itemName: string;
  unit: string;
  seasonId: number;
  season: string;
  deliveryPointId: number;
  deliveryPoint: string;
  price: number;
  currency: string;
  source: string;
  observedOn: string;
  /** Raised by every change; PUT sends it back and a stale one is refused (409 `stale`). */
  version: number;
}

/** `GET /api/prices/series`: one mean price per item and season (deflated when an index is named). */
export interface PriceSeries {
  deflator: { name: string; base: string } | null;
  seasons: string[];
  series: { itemCode: string; itemName: string; unit: string; currency: string; values: (number | null)[] }[];
}

export interface FarmRecordRow {
  farmId: number;
  farmCode: string;
  seasonId: number;
  season: string;
  itemId: number;
  itemCode: string;
  itemName: string;
  role: 'output' | 'input';
  unit: string;
  quantity: number;
  /** Raised by every change; a grid edit sends it back and a stale one is refused (409 `stale`). */
  version: number;
}

export interface PriceIndex {
  id: number;
  name: string;
  base: string;
  source: string;
  values: { seasonId: number; season: string; value: number }[];
}

/** `GET /api/settings/server` (admin): how this server is set up. */
export interface ServerSetup {
  /** The address links in e-mails point to. */
  publicUrl: string;
  publicUrlSet: boolean;
  /** Why links may not work for members (PUBLIC_URL unset); null when set. */
  publicUrlWarning: string | null;
  /** 'local': the built-in fake SMTP server (no mail leaves the machine); 'smtp': SMTP_URL. */
  mail: 'local' | 'smtp';
}
