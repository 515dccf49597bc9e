/**
 * Issue 15 items 1 and 8: two planners on two servers sharing one database. A save names the
 * version it edited; the later of two saves from the same version is refused with 409 `stale` and
 * the stored row, and the audit's "before" is always the value the write replaced. A price far from
 * its item's history is refused with 422 `needs_confirmation` unless the request confirms it.
 */
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp, type NetputApp } from '../../server/app.js';
import { loadConfig } from '../../server/config.js';
import { createMailer } from '../../server/mail/mailer.js';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
let second: NetputApp;
let mailer: ReturnType<typeof createMailer>;
beforeAll(async () => {
  t = await startTestApp();
  // A second app on the same database: another server process in production.
  const config = loadConfig({ LOG_LEVEL: 'silent', PUBLIC_URL: 'http://netput.test', APP_DIR: path.join(os.tmpdir(), 'netput-no-app') }, []);
  mailer = createMailer(t.smtp.url, config.mailFrom);
  second = createApp({ db: t.database.db, dbKind: t.database.kind, changes: t.database.changes, config, mailer, fakeSmtp: t.smtp });
});
afterAll(async () => {
  mailer.close();
  await t.close();
});

type PriceRow = { id: number; itemId: number; seasonId: number; deliveryPointId: number; price: number; currency: string; source: string; observedOn: string; version: number; itemCode: string; season: string };

async function wheatPrice(a: Awaited<ReturnType<typeof signedIn>>, season = '2024/25'): Promise<PriceRow> {
  const rows = (await a.get('/api/prices')).body as PriceRow[];
  return rows.find((r) => r.itemCode === 'wheat' && r.season === season)!;
}

const body = (r: PriceRow, price: number) => ({
  itemId: r.itemId,
  seasonId: r.seasonId,
  deliveryPointId: r.deliveryPointId,
  price,
  currency: r.currency,
  source: r.source,
  observedOn: r.observedOn,
  version: r.version,
});

describe('two planners edit the same price on two servers', () => {
  it('the later save from the same version gets 409 with the stored value; nothing is lost silently', async () => {
    const anna = await signedIn(t.app, 'planner@example.org');
    const ben = await signedIn(second, 'planner@example.org');
    const seenByAnna = await wheatPrice(anna);
    const seenByBen = await wheatPrice(ben);
    expect(seenByBen.version).toBe(seenByAnna.version);

    const first = await anna.put(`/api/prices/${seenByAnna.id}`).send(body(seenByAnna, seenByAnna.price + 5));
    expect(first.status).toBe(200);
    expect(first.body.version).toBe(seenByAnna.version + 1);

    const late = await ben.put(`/api/prices/${seenByBen.id}`).send(body(seenByBen, seenByBen.price + 7));
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('stale');
    expect(late.body.error.current).toMatchObject({ id: seenByAnna.id, price: seenByAnna.price + 5, version: seenByAnna.version + 1 });
    expect((await wheatPrice(ben)).price).toBe(seenByAnna.price + 5);

    // Keeping his value: Ben saves again from the version he was shown.
    const kept = await ben.put(`/api/prices/${seenByBen.id}`).send(body(late.body.error.current, seenByBen.price + 7));
    expect(kept.status).toBe(200);
    const audit = (await anna.get('/api/audit?entity=price&limit=2')).body.rows as { before: { price: number }; after: { price: number } }[];
    // Every "before" is the value the write replaced.
    expect(audit.map((a) => [a.before.price, a.after.price])).toEqual([
      [seenByAnna.price + 5, seenByBen.price + 7],
      [seenByAnna.price, seenByAnna.price + 5],
    ]);
  });

  it('of many saves racing from one version exactly one wins, and the audit chain has no gap', async () => {
    const agents = await Promise.all([t.app, second, t.app, second].map((a) => signedIn(a, 'planner@example.org')));
    const start = await wheatPrice(agents[0], '2023/24');
    const answers = await Promise.all(agents.map((a, i) => a.put(`/api/prices/${start.id}`).send(body(start, start.price + i + 1))));
    expect(answers.map((r) => r.status).sort()).toEqual([200, 409, 409, 409]);
    const audit = (await agents[0].get('/api/audit?entity=price&limit=1')).body.rows[0];
    expect(audit.before.price).toBe(start.price);
  });

  it('a farm record edited from a stale version gets 409 with the stored quantity', async () => {
    const anna = await signedIn(t.app, 'planner@example.org');
    const ben = await signedIn(second, 'planner@example.org');
    const [rec] = (await anna.get('/api/records')).body as { farmId: number; seasonId: number; itemId: number; quantity: number; version: number }[];
    const key = { farmId: rec.farmId, seasonId: rec.seasonId, itemId: rec.itemId };
    expect((await anna.put('/api/records').send({ rows: [{ ...key, quantity: rec.quantity + 1, version: rec.version }] })).status).toBe(200);
    const late = await ben.put('/api/records').send({ rows: [{ ...key, quantity: rec.quantity + 2, version: rec.version }] });
    expect(late.status).toBe(409);
    expect(late.body.error).toMatchObject({ code: 'stale', current: { quantity: rec.quantity + 1, version: rec.version + 1 } });
  });
});

describe('prices far from their history need confirmation, also from a script', () => {
  it('nitrogen at 1,214 EUR/kg N and wheat at 20.41 EUR/t are refused with 422 unless confirmed', async () => {
    const planner = await signedIn(t.app, 'planner@example.org');
    const rows = (await planner.get('/api/prices')).body as PriceRow[];
    const n = rows.find((r) => r.itemCode === 'nitrogen' && r.season === '2024/25')!;
    const w = rows.find((r) => r.itemCode === 'wheat' && r.season === '2024/25')!;
    const block = [
      { itemId: n.itemId, seasonId: n.seasonId, deliveryPointId: n.deliveryPointId, price: 1214, currency: 'EUR', source: 'Script', observedOn: '2024-12-14' },
      { itemId: w.itemId, seasonId: w.seasonId, deliveryPointId: w.deliveryPointId, price: 20.41, currency: 'EUR', source: 'Script', observedOn: '2024-12-14' },
    ];
    const count = ((await planner.get('/api/prices')).body as unknown[]).length;
    const refused = await planner.post('/api/prices').send({ rows: block });
    expect(refused.status).toBe(422);
    expect(refused.body.error.code).toBe('needs_confirmation');
    expect(refused.body.error.details.map((d: { path: string }) => d.path)).toEqual(['body.rows.0.price', 'body.rows.1.price']);
    expect(refused.body.error.details[0].message).toMatch(/^1,214 EUR\/kg N is about .* times .*; is it a price per tonne entered per kg N\?$/);
    expect(refused.body.error.details[1].message).toMatch(/^20\.41 EUR\/t is about 1\/\d+(\.\d+)? of .*; is the decimal mark in the right place\?$/);
    expect(((await planner.get('/api/prices')).body as unknown[]).length).toBe(count);
    const confirmed = await planner.post('/api/prices').send({ rows: block, confirmImplausible: true });
    expect(confirmed.status).toBe(201);

    // An edit too: a price typed ten times too high.
    const edit = await planner.put(`/api/prices/${w.id}`).send(body(w, w.price * 10));
    expect(edit.status).toBe(422);
    expect(edit.body.error.details[0].path).toBe('body.price');
    expect((await planner.put(`/api/prices/${w.id}`).send({ ...body(w, w.price * 10), confirmImplausible: true })).status).toBe(200);
  });
});
