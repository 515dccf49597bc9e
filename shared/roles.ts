/** The four roles of Netput; each route on the server and each page on the client names the roles it admits. */
export const ROLES = ['admin', 'planner', 'treasurer', 'member'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  planner: 'Planner',
  treasurer: 'Treasurer',
  member: 'Member',
};

/**
 * Who may open or change what. The server's routes (their `access`) and the client's routes and
 * navigation all read this one table, so a page, its menu entry and its API cannot disagree.
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
  /** Who changes reference data, prices, farms and records, and runs imports (everyone else with access reads). */
  dataEdit: ['planner'],
  /** Season outlooks in full (every farm) and the accountability record; planners write, the board reads. */
  outlook: ['admin', 'planner', 'treasurer'],
  outlookWrite: ['planner'],
  /** The outlook e-mails' delivery log. */
  outlookLog: ['admin', 'planner'],
  /** Forward delivery contracts: planners and administrators keep them, the treasurer reads (a member sees their own in the portal). */
  contracts: ['admin', 'planner', 'treasurer'],
  contractsEdit: ['admin', 'planner'],
  budget: ['admin', 'planner', 'treasurer'],
  /** Who makes and changes fertiliser budgets and the product list (planners and admins read). */
  budgetEdit: ['treasurer'],
  /** Booking rounds: who opens and changes them and reads the members' bookings and the round's report (the board reads the nutrient comparison under `budget`; members book under `myFarm`). */
  bookingRounds: ['admin', 'treasurer'],
  users: ['admin'],
  settings: ['admin'],
  audit: ['admin', 'planner'],
  devMail: ['admin'],
  /** The local fake payment service's page (development only). */
  devPayments: ['admin'],
} as const satisfies Record<string, readonly Role[]>;
