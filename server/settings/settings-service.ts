import type { AppContext } from '../context.js';
import { publicUrlWarning } from '../config.js';
import type { ServerSetup } from '../../shared/api-types.js';
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

/** `GET /api/settings/server` (admin): the environment's choices an administrator should see. */
export function serverSetup(ctx: Pick<AppContext, 'config' | 'fakeSmtp'>): ServerSetup {
  return {
    publicUrl: ctx.config.publicUrl,
    publicUrlSet: ctx.config.publicUrlSet,
    publicUrlWarning: publicUrlWarning(ctx.config),
    mail: ctx.fakeSmtp ? 'local' : 'smtp',
  };
}
