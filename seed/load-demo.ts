import { count, eq } from 'drizzle-orm';
import type { Db } from '../server/db/client.js';
import {
  deliveryPoints,
  farmRecords,
  farms,
  farmSeasonFactors,
  items,
  priceIndexes,
  priceIndexValues,
  priceObservations,
  seasons,
  settings,
  users,
} from '../server/db/schema/index.js';
import { hashPassword } from '../server/auth/passwords.js';
import { newToken } from '../server/core/tokens.js';
import { buildDemoCoop, DEMO_ACCOUNTS, DEMO_PASSWORD } from './demo-coop.js';
import { seedFertiliserProducts } from '../server/budget/fertiliser-products-repository.js';
import { tablesInDependencyOrder } from '../server/db/portable.js';
import { seedDemoContracts } from './demo-contracts.js';
import { purgeOutlookData } from '../server/outlook/outlook-repository.js';
import { enqueueDemoSetup } from './prepare-demo.js';

export async function isDatabaseEmpty(db: Db): Promise<boolean> {
  const [{ n }] = await db.select({ n: count() }).from(users);
  return Number(n) === 0;
}

/** Deletes every row of every table (keeps the schema). */
export async function clearDatabase(db: Db) {
  // Children before the tables they point to.
  const tables = tablesInDependencyOrder().reverse();
  await db.transaction(async (tx) => {
    // Published outlooks refuse deletion unless the purge flag is set in this transaction.
    await purgeOutlookData(tx);
    for (const t of tables) await tx.delete(t);
  });
}

function chunks<T>(rows: T[], size = 500): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < rows.length; i += size) out.push(rows.slice(i, i + size));
  return out;
}

/**
 * Loads the invented demo co-op in one transaction. With `prepare`, the same transaction queues the
 * background job that fits the demo model, publishes the coming season's outlook and builds the
 * treasurer's budget (seed/prepare-demo.ts); tests leave it out unless they need those figures.
 */
export async function loadDemoCoop(db: Db, options: { prepare?: boolean } = {}) {
  const demo = buildDemoCoop();
  const demoHash = await hashPassword(DEMO_PASSWORD);
  // Other members cannot sign in until they ask for a reset link: one hash of a discarded random secret.
  const lockedHash = await hashPassword(newToken());
  await db.transaction(async (tx) => {
    await tx.insert(settings).values({ key: 'coop', value: demo.settings });
    const accounts = [
      ...DEMO_ACCOUNTS.map((a) => ({ ...a, passwordHash: demoHash })),
      ...demo.farms.slice(1).map((f) => ({ email: f.ownerEmail, name: f.ownerName, role: 'member' as const, passwordHash: lockedHash })),
    ];
    const userRows = await tx.insert(users).values(accounts).returning({ id: users.id, email: users.email });
    const userId = new Map(userRows.map((u) => [u.email, u.id]));
    const itemRows = await tx
      .insert(items)
      .values(
        demo.items.map((i) => ({
          code: i.code,
          name: i.name,
          role: i.role,
          category: i.category,
          unit: i.unit,
          nPct: i.nPct ?? null,
          p2o5Pct: i.p2o5Pct ?? null,
          k2oPct: i.k2oPct ?? null,
        })),
      )
      .returning({ id: items.id, code: items.code });
    const itemId = new Map(itemRows.map((r) => [r.code, r.id]));
    const seasonRows = await tx.insert(seasons).values(demo.seasons).returning({ id: seasons.id, label: seasons.label });
    const seasonId = new Map(seasonRows.map((r) => [r.label, r.id]));
    const dpRows = await tx.insert(deliveryPoints).values(demo.deliveryPoints).returning({ id: deliveryPoints.id, name: deliveryPoints.name });
    const dpId = new Map(dpRows.map((r) => [r.name, r.id]));
    const farmRows = await tx
      .insert(farms)
      .values(demo.farms.map((f) => ({ code: f.code, name: f.name, region: f.region, landHa: f.landHa })))
      .returning({ id: farms.id, code: farms.code });
    const farmId = new Map(farmRows.map((r) => [r.code, r.id]));
    for (const f of demo.farms) await tx.update(users).set({ farmId: farmId.get(f.code)! }).where(eq(users.id, userId.get(f.ownerEmail)!));
    for (const part of chunks(demo.prices)) {
      await tx.insert(priceObservations).values(
        part.map((p) => ({
          itemId: itemId.get(p.item)!,
          seasonId: seasonId.get(p.season)!,
          deliveryPointId: dpId.get(p.deliveryPoint)!,
          price: p.price,
          currency: demo.settings.currency,
          source: p.source,
          observedOn: p.observedOn,
        })),
      );
    }
    for (const part of chunks(demo.records)) {
      await tx
        .insert(farmRecords)
        .values(part.map((r) => ({ farmId: farmId.get(r.farm)!, seasonId: seasonId.get(r.season)!, itemId: itemId.get(r.item)!, quantity: r.quantity })));
    }
    const [ix] = await tx.insert(priceIndexes).values(demo.deflator).returning({ id: priceIndexes.id });
    await tx.insert(priceIndexValues).values(demo.deflatorValues.map((v) => ({ indexId: ix.id, seasonId: seasonId.get(v.season)!, value: v.value })));
    await seedFertiliserProducts(tx, demo.settings.currency);
    for (const part of chunks(demo.land)) {
      await tx
        .insert(farmSeasonFactors)
        .values(part.map((l) => ({ farmId: farmId.get(l.farm)!, seasonId: seasonId.get(l.season)!, factor: 'land_ha', value: l.landHa })));
    }
    await seedDemoContracts(tx);
    if (options.prepare) await enqueueDemoSetup(tx);
  });
}

/** Loads the demo only into an empty database; answers whether it did. */
export async function seedDemoIfEmpty(db: Db, options: { prepare?: boolean } = {}): Promise<boolean> {
  if (!(await isDatabaseEmpty(db))) return false;
  await loadDemoCoop(db, options);
  return true;
}
