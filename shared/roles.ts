/** The four roles of Netput; each route on the server and each page on the client names the roles it admits. */
export const ROLES = ['admin', 'planner', 'treasurer', 'member'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  planner: 'Planner',
  treasurer: 'Treasurer',
  member: 'Member',
};
