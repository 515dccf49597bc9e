import { eq } from 'drizzle-orm';
import type { CoopSettings } from '../../shared/api-types.js';
import { settingsSchema } from '../../shared/schemas.js';
import { DEFAULT_SEASON_CALENDAR } from '../../shared/season-calendar.js';
import type { Db } from '../db/client.js';
import { settings } from '../db/schema/index.js';

export const DEFAULT_SETTINGS: CoopSettings = {
  coopName: 'Your co-operative',
  currency: 'EUR',
  unitSystem: 'metric',
  decimalMark: 'point',
  storageCapacityT: 0,
  handlingCapacityTPerDay: 0,
  seasonCalendar: DEFAULT_SEASON_CALENDAR,
};

/** The co-op's settings; the defaults fill what is not stored (or no longer reads as valid). */
export async function getSettings(db: Db): Promise<CoopSettings> {
  const [row] = await db.select().from(settings).where(eq(settings.key, 'coop'));
  if (!row) return DEFAULT_SETTINGS;
  const parsed = settingsSchema.safeParse({ ...DEFAULT_SETTINGS, ...(row.value as object) });
  return parsed.success ? parsed.data : DEFAULT_SETTINGS;
}

export async function putSettings(db: Db, value: CoopSettings): Promise<void> {
  await db
    .insert(settings)
    .values({ key: 'coop', value })
    .onConflictDoUpdate({ target: settings.key, set: { value } });
}
