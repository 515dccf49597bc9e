import { sql } from 'drizzle-orm';
import { boolean, check, index, integer, pgTable, text, timestamp, type AnyPgColumn } from 'drizzle-orm/pg-core';
import { farms } from './farms.js';
import { ROLES } from '../../../shared/roles.js';

export const users = pgTable(
  'users',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    email: text('email').notNull().unique(),
    name: text('name').notNull(),
    role: text('role', { enum: ROLES }).notNull(),
    /** argon2id; null while an invitation has not been accepted. */
    passwordHash: text('password_hash'),
    active: boolean('active').notNull().default(true),
    /** Members may opt out of outlook e-mails. */
    mailOptOut: boolean('mail_opt_out').notNull().default(false),
    /** A member's farm; several members may share one (a family farm). Null for staff. */
    farmId: integer('farm_id').references((): AnyPgColumn => farms.id, { onDelete: 'set null' }),
    failedSignIns: integer('failed_sign_ins').notNull().default(0),
    lockedUntil: timestamp('locked_until', { withTimezone: true }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    lastSignInAt: timestamp('last_sign_in_at', { withTimezone: true }),
  },
  // The roles of shared/roles.ts; a change there needs a migration (npm run db:generate).
  (t) => [check('users_role_check', sql`${t.role} in (${sql.raw(ROLES.map((r) => `'${r}'`).join(','))})`), index('users_farm_id_idx').on(t.farmId)],
);
