import type { CoopSettings } from '../../shared/api-types.js';
import type { Db } from '../db/client.js';
import { recordAudit } from '../audit/audit-repository.js';
import { getSettings, putSettings } from './settings-repository.js';

export { DEFAULT_SETTINGS, getSettings } from './settings-repository.js';

export async function saveSettings(db: Db, value: CoopSettings, actorUserId: number | null): Promise<CoopSettings> {
  return db.transaction(async (tx) => {
    const before = await getSettings(tx);
    await putSettings(tx, value);
    await recordAudit(tx, { actorUserId, action: 'settings.update', entity: 'settings', entityId: 'coop', before, after: value });
    return value;
  });
}
