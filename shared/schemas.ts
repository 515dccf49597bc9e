import { z } from 'zod';
import { DEFAULT_SEASON_CALENDAR, seasonCalendarSchema } from './season-calendar.js';
import { ROLES } from './roles.js';
import { idSchema } from './ids.js';
import { DECIMAL_MARKS } from './cell-parsers.js';
import { currencySchema, TEXT_MAX } from './field-limits.js';

/** Shortest password we accept (NIST SP 800-63B §5.1.1.2 asks for at least 8; we ask for 10). */
export const PASSWORD_MIN_LENGTH = 10;

export const emailSchema = z.string({ error: 'Enter an e-mail address' }).trim().toLowerCase().email('Enter a valid e-mail address').max(254);
export const passwordSchema = z
  .string()
  .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
  .max(TEXT_MAX.password, `Use at most ${TEXT_MAX.password} characters`);

export const loginSchema = z.object({
  email: emailSchema,
  password: z.string({ error: 'Enter your password' }).min(1, 'Enter your password').max(TEXT_MAX.password),
});

export const invitationSchema = z.object({
  email: emailSchema,
  name: z.string().trim().min(1, 'Enter a name').max(TEXT_MAX.name),
  role: z.enum(ROLES),
  farmId: idSchema.nullable().optional(),
});

export const userPatchSchema = z
  .object({
    name: z.string().trim().min(1).max(TEXT_MAX.name),
    role: z.enum(ROLES),
    farmId: idSchema.nullable(),
    active: z.boolean(),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Send at least one field to change');

export const passwordResetRequestSchema = z.object({ email: emailSchema });
export const setPasswordSchema = z.object({ password: passwordSchema });

export const settingsSchema = z.object({
  coopName: z.string().trim().min(1).max(TEXT_MAX.name),
  currency: currencySchema,
  unitSystem: z.enum(['metric', 'us']),
  /** How the co-op writes decimals in the grids, pasted blocks and imported files (1234.5 or 1234,5). */
  decimalMark: z.enum(DECIMAL_MARKS).default('point'),
  storageCapacityT: z.number().nonnegative().max(1e9),
  handlingCapacityTPerDay: z.number().nonnegative().max(1e7),
  /** When a season's inputs are bought and its crop delivered (shared/season-calendar.ts). */
  seasonCalendar: seasonCalendarSchema.default(DEFAULT_SEASON_CALENDAR),
});

export { idParamSchema } from './ids.js';
