/**
 * The in-memory answers of the read routes (PGlite mode): served from memory while nothing they
 * were read from has changed, and never stale after a write through the API, a write made by
 * background work straight to the database, or a change of the signed-in user's account.
 */
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { modelRuns, models, users } from '../../server/db/schema/index.js';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => t.close());

const cache = () => t.app.readCache!;
const pglite = process.env.NETPUT_TEST_DB !== 'postgres';

describe.runIf(pglite)('read cache', () => {
  it('answers a repeated read from memory, and a write through the API shows at once', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const first = await planner.get('/api/items');
    const hits = cache().hits;
    const again = await planner.get('/api/items');
    expect(cache().hits).toBe(hits + 1);
    expect(again.body).toEqual(first.body);
    expect(again.headers['content-type']).toMatch(/^application\/json/);
    const created = await planner.post('/api/items').send({ code: 'sulphur', name: 'Sulphur', role: 'input', category: 'fertiliser', unit: 't' });
    expect(created.status).toBe(201);
    const after = await planner.get('/api/items');
    expect(after.body.map((i: { code: string }) => i.code)).toContain('sulphur');
  });

  it('a write straight to the database (as a background job makes) shows at once', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const [model] = await t.database.db.insert(models).values({ name: 'Cache check', definition: {}, createdBy: 1 }).returning();
    const listed = (await planner.get('/api/models')).body as { id: number; runs: unknown[] }[];
    expect(listed.find((m) => m.id === model!.id)?.runs).toEqual([]);
    await planner.get('/api/models');
    await t.database.db.insert(modelRuns).values({ modelId: model!.id, definition: {}, dataset: {}, excluded: [], dataHash: 'x', optionsHash: 'y', softwareVersion: 'test', status: 'running', progress: 0.5, createdBy: 1 });
    const relisted = (await planner.get('/api/models')).body as { id: number; runs: { status: string; progress: number }[] }[];
    expect(relisted.find((m) => m.id === model!.id)?.runs).toMatchObject([{ status: 'running', progress: 0.5 }]);
  });

  it('answers are kept per user: a member never receives a planner’s cached list', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const all = (await planner.get('/api/farms')).body as unknown[];
    await planner.get('/api/farms');
    expect(all.length).toBe(20);
    const member = await signedIn(t.app, 'member@example.org');
    const own = (await member.get('/api/farms')).body as { code: string }[];
    expect(own.map((f) => f.code)).toEqual(['F01']);
  });

  it('deactivating an account ends its session on the next request, cached or not', async () => {
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    expect((await treasurer.get('/api/summary')).status).toBe(200);
    expect((await treasurer.get('/api/summary')).status).toBe(200);
    await t.database.db.update(users).set({ active: false }).where(eq(users.email, 'treasurer@example.org'));
    expect((await treasurer.get('/api/summary')).status).toBe(401);
    expect((await treasurer.get('/api/auth/me')).status).toBe(401);
    await t.database.db.update(users).set({ active: true }).where(eq(users.email, 'treasurer@example.org'));
  });

  it('a role change takes effect on the next request, cached answers or not', async () => {
    const admin = await signedIn(t.app, 'admin@example.org');
    const treasurer = await signedIn(t.app, 'treasurer@example.org');
    const me = (await treasurer.get('/api/auth/me')).body as { id: number; role: string };
    expect(me.role).toBe('treasurer');
    expect((await treasurer.get('/api/prices/series')).status).toBe(200);
    const changed = await admin.patch(`/api/users/${me.id}`).send({ role: 'member' });
    expect(changed.status, JSON.stringify(changed.body)).toBe(200);
    // A role change ends the account's sessions; signed in again, the new role applies.
    expect((await treasurer.get('/api/auth/me')).status).toBe(401);
    const again = await signedIn(t.app, 'treasurer@example.org');
    expect((await again.get('/api/auth/me')).body.role).toBe('member');
    expect((await again.get('/api/prices/series')).status).toBe(403);
    expect((await admin.patch(`/api/users/${me.id}`).send({ role: 'treasurer' })).status).toBe(200);
  });

  it('an error answer is not kept', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const bad = await planner.get('/api/prices?items=abc');
    expect(bad.status).toBe(400);
    const hits = cache().hits;
    expect((await planner.get('/api/prices?items=abc')).status).toBe(400);
    expect(cache().hits).toBe(hits);
  });
});
