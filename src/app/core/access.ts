import type { Role } from '../../../shared/roles';

/** The role table lives in shared/ so the server's route checks and the client's pages read the same one. */
export { ACCESS } from '../../../shared/roles';

export function roleAllows(role: Role | null | undefined, allowed: readonly Role[]): boolean {
  return role != null && allowed.includes(role);
}
