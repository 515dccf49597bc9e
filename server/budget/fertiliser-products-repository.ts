import { asc, count, eq, inArray } from 'drizzle-orm';
import type { Db } from '../db/client.js';
import { fertiliserProducts } from '../db/schema/index.js';
import { AppError } from '../core/app-error.js';
import { recordAudit } from '../audit/audit-repository.js';
import type { FertiliserProductInput } from '../../shared/budget-schemas.js';

export type FertiliserProduct = typeof fertiliserProducts.$inferSelect;

const CORNELL = 'Cornell NRCCA Competency Area 4, PO 26 (nrcca.cals.cornell.edu/nutrient/CA4/CA0426.php)';
const PASSEL = 'UNL PASSEL lesson (passel2.unl.edu/view/lesson/d01bf6ce5f62/3)';
const SPES = 'Virginia Tech SPES-201: MOP 60 % K2O (pubs.ext.vt.edu, SPES-201)';
const INVENTED = 'Invented demo price (not a market quote)';

/**
 * The seven example products of the demo co-op. Grades are the published ones (docs/fertiliser.md §3);
 * prices, lots and suppliers are invented for the demo.
 */
export const DEMO_FERTILISER_PRODUCTS: Omit<FertiliserProductInput, 'currency'>[] = [
  { name: 'Urea', nPct: 46, p2o5Pct: 0, k2oPct: 0, form: 'solid', pricePerT: 475, lotT: 25, supplier: 'Northgate Nutrients (demo)', gradeSource: `${CORNELL}: urea 46-0-0`, priceNote: INVENTED, active: true },
  { name: 'Anhydrous ammonia', nPct: 82, p2o5Pct: 0, k2oPct: 0, form: 'gas', pricePerT: 870, lotT: 20, supplier: 'Vale Agri Supply (demo)', gradeSource: `${CORNELL}: anhydrous ammonia NH3 82-0-0`, priceNote: INVENTED, active: true },
  { name: 'UAN 28 %', nPct: 28, p2o5Pct: 0, k2oPct: 0, form: 'liquid', pricePerT: 305, lotT: 25, supplier: 'Vale Agri Supply (demo)', gradeSource: `${CORNELL}: UAN solution 28-0-0 to 32-0-0`, priceNote: INVENTED, active: true },
  { name: 'UAN 32 %', nPct: 32, p2o5Pct: 0, k2oPct: 0, form: 'liquid', pricePerT: 345, lotT: 25, supplier: 'Vale Agri Supply (demo)', gradeSource: `${CORNELL}: UAN solution 28-0-0 to 32-0-0`, priceNote: INVENTED, active: true },
  { name: 'DAP', nPct: 18, p2o5Pct: 46, k2oPct: 0, form: 'solid', pricePerT: 650, lotT: 25, supplier: 'Northgate Nutrients (demo)', gradeSource: `${PASSEL}: DAP 18-46-0`, priceNote: INVENTED, active: true },
  { name: 'MAP', nPct: 11, p2o5Pct: 52, k2oPct: 0, form: 'solid', pricePerT: 690, lotT: 25, supplier: 'Northgate Nutrients (demo)', gradeSource: `${PASSEL}: MAP 11-52-0`, priceNote: INVENTED, active: true },
  { name: 'Muriate of potash', nPct: 0, p2o5Pct: 0, k2oPct: 60, form: 'solid', pricePerT: 355, lotT: 25, supplier: 'Northgate Nutrients (demo)', gradeSource: SPES, priceNote: INVENTED, active: true },
];

/** Inserts the demo products when the table is empty; answers whether it did. */
export async function seedFertiliserProducts(db: Db, currency = 'EUR'): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [{ n }] = await tx.select({ n: count() }).from(fertiliserProducts);
    if (Number(n) > 0) return false;
    await tx.insert(fertiliserProducts).values(DEMO_FERTILISER_PRODUCTS.map((p) => ({ ...p, currency })));
    return true;
  });
}

export async function listProducts(db: Db): Promise<FertiliserProduct[]> {
  return db.select().from(fertiliserProducts).orderBy(asc(fertiliserProducts.name));
}

export async function productsByIds(db: Db, ids: number[]): Promise<FertiliserProduct[]> {
  return ids.length ? db.select().from(fertiliserProducts).where(inArray(fertiliserProducts.id, ids)) : [];
}

export async function activeProducts(db: Db): Promise<FertiliserProduct[]> {
  return db.select().from(fertiliserProducts).where(eq(fertiliserProducts.active, true)).orderBy(asc(fertiliserProducts.id));
}

async function findProduct(db: Db, id: number): Promise<FertiliserProduct> {
  const [row] = await db.select().from(fertiliserProducts).where(eq(fertiliserProducts.id, id));
  if (!row) throw AppError.notFound('The fertiliser product');
  return row;
}

export async function createProduct(db: Db, input: FertiliserProductInput, actorUserId: number) {
  return db.transaction(async (tx) => {
    const [row] = await tx.insert(fertiliserProducts).values(input).returning();
    await recordAudit(tx, { actorUserId, action: 'fertiliser-product.create', entity: 'fertiliser-product', entityId: row!.id, after: row });
    return row!;
  });
}

export async function updateProduct(db: Db, id: number, input: FertiliserProductInput, actorUserId: number) {
  return db.transaction(async (tx) => {
    const before = await findProduct(tx, id);
    const [after] = await tx.update(fertiliserProducts).set({ ...input, updatedAt: new Date() }).where(eq(fertiliserProducts.id, id)).returning();
    await recordAudit(tx, { actorUserId, action: 'fertiliser-product.update', entity: 'fertiliser-product', entityId: id, before, after });
    return after!;
  });
}

/** Budgets keep their own copies of the products they used, so deleting one changes no saved budget. */
export async function deleteProduct(db: Db, id: number, actorUserId: number) {
  await db.transaction(async (tx) => {
    const before = await findProduct(tx, id);
    await tx.delete(fertiliserProducts).where(eq(fertiliserProducts.id, id));
    await recordAudit(tx, { actorUserId, action: 'fertiliser-product.delete', entity: 'fertiliser-product', entityId: id, before });
  });
}
