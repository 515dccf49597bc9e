import { eq } from 'drizzle-orm';
import type { CoopSettings } from '../../shared/api-types.js';
import { settingsSchema } from '../../shared/schemas.js';
import { DEFAULT_SEASON_CALENDAR } from '../../shared/season-calendar.js';
import type { Db } from '../db/client.js';
import { settings } from '../db/schema/index.js';
import { recordAudit } from '../audit/audit-repository.js';

export const DEFAULT_SETTINGS: CoopSettings = {
  coopName: 'Your co-operative',
  currency: 'EUR',
  unitSystem: 'metric',
  decimalMark: 'point',
  storageCapacityT: 0,
  handlingCapacityTPerDay: 0,
  seasonCalendar: DEFAULT_SEASON_CALENDAR,
};

export async function getSettings(db: Db): Promise<CoopSettings> {
  const [row] = await db.select().from(settings).where(eq(settings.key, 'coop'));
  if (!row) return DEFAULT_SETTINGS;
  const parsed = settingsSchema.safeParse({ ...DEFAULT_SETTINGS, ...(row.value as object) });
  return parsed.success ? parsed.data : DEFAULT_SETTINGS;
}

export async function saveSettings(db: Db, value: CoopSettings, actorUserId: number | null): Promise<CoopSettings> {
  return db.transaction(async (tx) => {
    const before = await getSettings(tx);
    await tx
      .insert(settings)
      .values({ key: 'coop', value })
      .onConflictDoUpdate({ target: settings.key, set: { value } });
    await recordAudit(tx, { actorUserId, action: 'settings.update', entity: 'settings', entityId: 'coop', before, after: value });
    return value;
  });
}
