import { describe, expect, it } from 'vitest';
import { describeAudit, type AuditNames } from './audit-describe.js';

const names: AuditNames = {
  users: new Map([[24, 'Sam Second'], [1, 'Ada Admin']]),
  farms: new Map([[3, 'Hollybrook Farm']]),
  items: new Map([[1, 'Wheat']]),
  seasons: new Map([[5, '2025/26']]),
  deliveryPoints: new Map([[2, 'Larkfield terminal']]),
  products: new Map([[7, 'Urea 46 % N'], [8, 'Triple superphosphate'], [9, 'Muriate of potash']]),
  budgets: new Map([[4, 'Spring fertiliser 2027']]),
  models: new Map(),
  outlooks: new Map(),
};

describe('describeAudit', () => {
  it('a user change reads as a sentence with the farm and role in words, not "user #24" or "farmId (none) → null"', () => {
    const d = describeAudit(
      {
        actorName: 'Ada Admin',
        action: 'user.update',
        entity: 'user',
        entityId: '24',
        before: { id: 24, name: 'Sam Second', role: 'planner', farmId: null, status: 'active' },
        after: { id: 24, name: 'Sam Second', role: 'member', farmId: 3, status: 'active' },
      },
      names,
    );
    expect(d.sentence).toBe('Ada Admin changed the account of Sam Second.');
    expect(d.changes).toEqual([
      { label: 'role', before: 'Planner', after: 'Member' },
      { label: 'farm', before: 'none', after: 'Hollybrook Farm' },
    ]);
  });

  it("a budget's product list is summarised per product, not dumped as JSON", () => {
    const plan = { months: [{ month: '2026-09', share: 1, prepay: true }], deliveryMonth: '2027-03', prepayDiscountPct: 0 };
    const d = describeAudit(
      {
        actorName: 'Tess Treasurer',
        action: 'budget.update',
        entity: 'budget',
        entityId: '4',
        before: { name: 'Spring fertiliser 2027', products: [{ productId: 7, pricePerT: 520 }, { productId: 8 }, { productId: 9, lotT: 24 }], bookingPlan: plan },
        after: { name: 'Spring fertiliser 2027', products: [{ productId: 7, pricePerT: 560 }, { productId: 9, lotT: 12 }], bookingPlan: { ...plan, prepayDiscountPct: 2 } },
      },
      names,
    );
    expect(d.sentence).toBe('Tess Treasurer changed budget “Spring fertiliser 2027”.');
    expect(d.changes).toEqual([
      { label: 'products', before: '3 entries', after: '2 changed: Urea 46 % N price per t 520 → 560; Muriate of potash lot (t) 24 → 12; 1 removed' },
      { label: 'booking plan: prepay discount pct', before: '0', after: '2' },
    ]);
  });

  it('several prices at once, a deleted record and an unknown action still read as sentences', () => {
    expect(describeAudit({ actorName: 'Pat Planner', action: 'price.delete', entity: 'price', entityId: '11,12,13', before: [{}, {}, {}], after: null }, names)).toEqual({
      sentence: 'Pat Planner removed 3 prices.',
      changes: [],
    });
    const price = describeAudit(
      { actorName: 'Pat Planner', action: 'price.update', entity: 'price', entityId: '11', before: { itemId: 1, seasonId: 5, deliveryPointId: 2, price: 204.5 }, after: { itemId: 1, seasonId: 5, deliveryPointId: 2, price: 214.5 } },
      names,
    );
    expect(price).toEqual({ sentence: 'Pat Planner changed a price (Wheat, 2025/26, Larkfield terminal).', changes: [{ label: 'price', before: '204.5', after: '214.5' }] });
    expect(describeAudit({ actorName: null, action: 'job.sweep', entity: 'job', entityId: null, before: null, after: null }, names).sentence).toBe('The system did “sweep” to a job.');
  });
});

describe('describeAudit, new records', () => {
  it('an invitation names the person and lists the new values without a before column', () => {
    const d = describeAudit(
      { actorName: 'Ada Admin', action: 'user.invite', entity: 'user', entityId: '24', before: null, after: { email: 'sam.second@example.org', name: 'Sam Second', role: 'member', farmId: 3 } },
      names,
    );
    expect(d.sentence).toBe('Ada Admin invited Sam Second.');
    expect(d.changes).toEqual([
      { label: 'email', before: '', after: 'sam.second@example.org' },
      { label: 'name', before: '', after: 'Sam Second' },
      { label: 'role', before: '', after: 'Member' },
      { label: 'farm', before: '', after: 'Hollybrook Farm' },
    ]);
  });
});
