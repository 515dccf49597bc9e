import type { Role } from '../../../shared/roles';
import { ACCESS } from './access';

/** One entry of the side navigation. Adding a feature to the menu is one line in `NAV_ITEMS`. */
export interface NavItem {
  readonly path: string;
  readonly label: string;
  /** A Material Symbols ligature name. */
  readonly icon: string;
  readonly roles: readonly Role[];
  /** Where the entry sits: the work pages (default), under "Administration", or last with the person's own pages. */
  readonly group?: 'admin' | 'personal';
  /** The step of the season's work the page belongs to; the navigation draws the steps in this order. */
  readonly stage?: SeasonStage;
  /** Shown only while the server runs in development mode (GET /api/dev/mail answers 200). */
  readonly devOnly?: boolean;
}

/** The season's work in the order it is done: records, then the model, the outlook and the budget. */
export const SEASON_STAGES = [
  { key: 'records', label: 'Records', hint: 'prices, farms and imports' },
  { key: 'model', label: 'Model', hint: 'fit and compare' },
  { key: 'outlook', label: 'Outlook', hint: 'project and publish' },
  { key: 'budget', label: 'Budget', hint: 'fertiliser and cash' },
] as const;
export type SeasonStage = (typeof SEASON_STAGES)[number]['key'];

export const NAV_ITEMS: readonly NavItem[] = [
  { path: '/', label: 'Home', icon: 'home', roles: ACCESS.everyone },
  { path: '/my-farm/outlook', label: 'Season outlook', icon: 'wb_sunny', roles: ACCESS.myFarm },
  { path: '/my-farm/bookings', label: 'Fertiliser booking', icon: 'shopping_cart', roles: ACCESS.myFarm },
  { path: '/prices', label: 'Prices', icon: 'price_change', roles: ACCESS.prices, stage: 'records' },
  { path: '/farms', label: 'Farms', icon: 'agriculture', roles: ACCESS.farms, stage: 'records' },
  { path: '/imports', label: 'Imports', icon: 'upload_file', roles: ACCESS.imports, stage: 'records' },
  { path: '/contracts', label: 'Contracts', icon: 'handshake', roles: ACCESS.contracts, stage: 'records' },
  { path: '/reference', label: 'Reference data', icon: 'dataset', roles: ACCESS.reference, stage: 'records' },
  { path: '/models', label: 'Models', icon: 'query_stats', roles: ACCESS.models, stage: 'model' },
  { path: '/outlook', label: 'Outlook', icon: 'insights', roles: ACCESS.outlook, stage: 'outlook' },
  { path: '/budget', label: 'Budget', icon: 'request_quote', roles: ACCESS.budget, stage: 'budget' },
  { path: '/admin/users', label: 'Users', icon: 'group', roles: ACCESS.users, group: 'admin' },
  { path: '/admin/settings', label: 'Co-op settings', icon: 'tune', roles: ACCESS.settings, group: 'admin' },
  { path: '/admin/audit', label: 'Audit log', icon: 'fact_check', roles: ACCESS.audit, group: 'admin' },
  { path: '/admin/mail', label: 'Mail outbox', icon: 'outgoing_mail', roles: ACCESS.devMail, group: 'admin', devOnly: true },
  { path: '/account', label: 'Account', icon: 'manage_accounts', roles: ACCESS.everyone, group: 'personal' },
];

/** The entries a role may use, in menu order. */
export function navItemsFor(role: Role | null, options: { devMail: boolean }): NavItem[] {
  if (role === null) return [];
  return NAV_ITEMS.filter((item) => item.roles.includes(role) && (!item.devOnly || options.devMail));
}
