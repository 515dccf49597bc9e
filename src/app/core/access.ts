import { ROLES, type Role } from '../../../shared/roles';

/**
 * Who may open what, mirroring the server's role checks (see the API contract). Routes and the
 * navigation both read this table, so a page and its menu entry cannot disagree.
 */
export const ACCESS = {
  everyone: ROLES,
  coopSummary: ['admin', 'planner', 'treasurer'],
  myFarm: ['member'],
  farms: ['admin', 'planner', 'treasurer'],
  models: ['admin', 'planner', 'treasurer'],
  modelsWrite: ['planner'],
  prices: ['admin', 'planner', 'treasurer'],
  imports: ['admin', 'planner'],
  reference: ['admin', 'planner', 'treasurer'],
  /** Who changes reference data, prices, farms and records (everyone else with access reads). */
  dataEdit: ['planner'],
  /** Season outlooks in full (every farm) and the accountability record; planners write, the board reads. */
  outlook: ['admin', 'planner', 'treasurer'],
  outlookWrite: ['planner'],
  /** The outlook e-mails' delivery log. */
  outlookLog: ['planner', 'admin'],
  budget: ['admin', 'planner', 'treasurer'],
  /** Who makes and changes fertiliser budgets and the product list (planners and admins read). */
  budgetEdit: ['treasurer'],
  users: ['admin'],
  settings: ['admin'],
  audit: ['admin', 'planner'],
  devMail: ['admin'],
} as const satisfies Record<string, readonly Role[]>;

export function roleAllows(role: Role | null | undefined, allowed: readonly Role[]): boolean {
  return role != null && allowed.includes(role);
}
