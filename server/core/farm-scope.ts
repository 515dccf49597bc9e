import type { SessionUser } from '../auth/session.js';

/** Who is reading: planners and treasurers read every farm, a member only their own. */
export type Reader = Pick<SessionUser, 'role' | 'farmId'>;

/**
 * The farms a query may return for `reader`: the requested ones (undefined for every farm) or, for
 * a member, their own farm whatever was requested (none when the account has no farm). Repository
 * queries call this, so no route can forget it.
 */
export function readableFarmIds(reader: Reader, requested?: number[]): number[] | undefined {
  if (reader.role !== 'member') return requested;
  if (reader.farmId === null) return [];
  return [reader.farmId];
}
