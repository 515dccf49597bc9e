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
  users: ['admin'],
  settings: ['admin'],
  audit: ['admin', 'planner'],
  devMail: ['admin'],
} as const satisfies Record<string, readonly Role[]>;

export function roleAllows(role: Role | null | undefined, allowed: readonly Role[]): boolean {
  return role != null && allowed.includes(role);
}
