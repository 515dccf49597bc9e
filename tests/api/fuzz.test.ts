/**
 * Property tests (fast-check) of the fit API and of the JSON and XLSX entry points: random and
 * malformed input always gets a 4xx with a message (never a 500), and nothing is half-written.
 * A model definition that passes the checks may be stored (201) and its fit queued (202) or
 * refused (4xx); a queued fit that cannot be estimated ends `failed` with a message.
 */
import ExcelJS from 'exceljs';
import fc from 'fast-check';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedIn, startTestApp, type TestApp } from './test-app.js';

let t: TestApp;
let planner: Awaited<ReturnType<typeof signedIn>>;
beforeAll(async () => {
  t = await startTestApp({ jobs: true });
  planner = await signedIn(t.app, 'planner@example.org');
});
afterAll(async () => t.close());

async function tableCounts(): Promise<Record<string, number>> {
  const q = async (s: ReturnType<typeof sql>) => ((await t.database.db.execute(s)) as unknown as { rows: Record<string, unknown>[] }).rows;
  const out: Record<string, number> = {};
  for (const { table_name } of await q(sql`select table_name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by table_name`)) {
    const name = String(table_name);
    // Bookkeeping that any request may touch: sessions, rate limits, the job queue and the audit of model writes.
    if (['sessions', 'rate_limit_hits', 'jobs', 'audit_log'].includes(name)) continue;
    out[name] = Number((await q(sql`select count(*)::int as n from ${sql.identifier(name)}`))[0]!.n);
  }
  return out;
}

function expectClientError(res: { status: number; body: { error?: { message?: string } } }) {
  expect(res.status, JSON.stringify(res.body)).toBeGreaterThanOrEqual(400);
  expect(res.status, JSON.stringify(res.body)).toBeLessThan(500);
  expect(res.body.error?.message?.length ?? 0).toBeGreaterThan(0);
}

const ITEMS = ['wheat', 'canola', 'barley', 'nitrogen', 'phosphate', 'potash', 'diesel', 'labour', 'gold', '', ' ', 'WHEAT'];
/** Near-valid model definitions: right keys, values from the edges of what is allowed. */
const fields = {
    items: fc.oneof(
      { weight: 20, arbitrary: fc.shuffledSubarray(['wheat', 'canola', 'barley', 'nitrogen', 'phosphate', 'potash', 'diesel'], { minLength: 1 }).map((a) => [...a, 'labour']) },
      { weight: 1, arbitrary: fc.uniqueArray(fc.constantFrom(...ITEMS), { maxLength: 9 }) },
      { weight: 1, arbitrary: fc.array(fc.constantFrom(...ITEMS), { maxLength: 4 }) },
      { weight: 1, arbitrary: fc.anything() },
    ),
    numeraire: fc.oneof({ weight: 20, arbitrary: fc.constant('labour') }, { weight: 1, arbitrary: fc.constantFrom(...ITEMS) }, { weight: 1, arbitrary: fc.anything() }),
    fixedFactors: fc.oneof({ weight: 20, arbitrary: fc.constantFrom(['land_ha'], []) }, { weight: 1, arbitrary: fc.constant(['water']) }, { weight: 1, arbitrary: fc.anything() }),
    trend: fc.oneof({ weight: 20, arbitrary: fc.boolean() }, { weight: 1, arbitrary: fc.anything() }),
    form: fc.oneof({ weight: 20, arbitrary: fc.constantFrom('nq', 'gl') }, { weight: 1, arbitrary: fc.constant('translog') }, { weight: 1, arbitrary: fc.anything() }),
    curvature: fc.oneof({ weight: 20, arbitrary: fc.constantFrom('auto', 'impose', 'check') }, { weight: 1, arbitrary: fc.constant('none') }, { weight: 1, arbitrary: fc.anything() }),
    fromSeason: fc.oneof({ weight: 20, arbitrary: fc.constantFrom(null, '2006/07', '2012/13') }, { weight: 1, arbitrary: fc.constantFrom('2024/25', '2030/31', 'last year') }, { weight: 1, arbitrary: fc.anything() }),
    toSeason: fc.oneof({ weight: 20, arbitrary: fc.constantFrom(null, '2025/26') }, { weight: 1, arbitrary: fc.constantFrom('2007/08', '1999/00') }, { weight: 1, arbitrary: fc.anything() }),
    farms: fc.oneof({ weight: 20, arbitrary: fc.constant(null) }, { weight: 1, arbitrary: fc.uniqueArray(fc.constantFrom('F01', 'F02', 'F03', 'F99'), { maxLength: 3 }) }, { weight: 1, arbitrary: fc.anything() }),
    backtestSeasons: fc.oneof({ weight: 20, arbitrary: fc.integer({ min: 0, max: 3 }) }, { weight: 1, arbitrary: fc.integer({ min: -2, max: 12 }) }, { weight: 1, arbitrary: fc.double() }, { weight: 1, arbitrary: fc.anything() }),
};
/** Mostly every key present (so some definitions pass); sometimes any of them missing. */
const definition = fc.oneof({ weight: 3, arbitrary: fc.record(fields) }, { weight: 1, arbitrary: fc.record(fields, { requiredKeys: [] }) });

describe('property: the fit API', () => {
  it('a random model definition is stored and fitted, or refused with a 4xx and a message; never a 500', async () => {
    const before = await tableCounts();
    let created = 0;
    let runs = 0;
    const runIds: number[] = [];
    const statuses: string[] = [];
    await fc.assert(
      fc.asyncProperty(fc.oneof({ weight: 4, arbitrary: fc.constant('Fuzz model') }, { weight: 1, arbitrary: fc.string({ maxLength: 20 }) }, { weight: 1, arbitrary: fc.anything() }), definition, async (name, def) => {
        const res = await planner.post('/api/models').send({ name, definition: def });
        if (res.status !== 201) return expectClientError(res);
        created++;
        const run = await planner.post(`/api/models/${res.body.id}/runs`).send({});
        if (run.status !== 202) {
          if (process.env.FUZZ_DEBUG) console.log(JSON.stringify(def), run.status, JSON.stringify(run.body));
          return expectClientError(run);
        }
        runs++;
        runIds.push(run.body.id);
      }),
      { numRuns: 60, seed: 1205 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
    // The generator reaches both sides: some definitions pass and are fitted.
    expect(created).toBeGreaterThan(0);
    expect(runs).toBeGreaterThan(0);
    // Every queued fit ends, and one that failed says why.
    for (const id of runIds) {
      let s: { status: string; error: string | null } | undefined;
      for (let i = 0; i < 600; i++) {
        s = (await planner.get(`/api/model-runs/${id}/status`)).body;
        if (['succeeded', 'failed', 'cancelled'].includes(s!.status)) break;
        await new Promise((r) => setTimeout(r, 100));
      }
      expect(['succeeded', 'failed']).toContain(s!.status);
      statuses.push(s!.status);
      if (s!.status === 'failed') expect(s!.error!.length).toBeGreaterThan(0);
    }
    console.log(`fit API property: ${created} models stored, ${runs} fits queued (${statuses.filter((x) => x === 'succeeded').length} succeeded)`);
    // Refused requests wrote nothing: only the accepted models and their runs are new.
    expect(await tableCounts()).toEqual({ ...before, models: before.models! + created, model_runs: before.model_runs! + runs });
  }, 240_000);

  it('evaluation at random prices answers 200 or a 4xx with a message', async () => {
    const model = await planner.post('/api/models').send({
      name: 'Fuzz evaluation',
      definition: { items: ['wheat', 'canola', 'nitrogen', 'phosphate', 'potash', 'diesel', 'labour'], numeraire: 'labour', backtestSeasons: 0 },
    });
    const run = await planner.post(`/api/models/${model.body.id}/runs`).send({});
    let status = '';
    for (let i = 0; i < 600 && status !== 'succeeded' && status !== 'failed'; i++) {
      status = (await planner.get(`/api/model-runs/${run.body.id}/status`)).body.status;
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(status).toBe('succeeded');
    let answered = 0;
    const pair = fc.tuple(fc.constantFrom('wheat', 'canola', 'nitrogen', 'labour', 'land_ha', 'trend', 'gold', 'x'), fc.oneof(fc.double(), fc.constantFrom('0', '-1', '1e309', 'NaN', '', '1.5.2')));
    await fc.assert(
      fc.asyncProperty(fc.array(pair, { maxLength: 4 }), fc.array(pair, { maxLength: 2 }), fc.string({ maxLength: 12 }), async (prices, fixed, junk) => {
        const q = new URLSearchParams();
        if (prices.length) q.set('prices', prices.map(([k, v]) => `${k}=${v}`).join(','));
        if (fixed.length) q.set('fixed', fixed.map(([k, v]) => `${k}=${v}`).join(','));
        if (junk) q.set(junk, junk);
        const res = await planner.get(`/api/model-runs/${run.body.id}/evaluate?${q}`);
        if (res.status === 200) {
          answered++;
          expect(Object.keys(res.body.netputs).length).toBe(7);
          return;
        }
        expectClientError(res);
      }),
      { numRuns: 60, seed: 1206 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
    expect(answered).toBeGreaterThan(0);
  }, 120_000);
});

describe('property: malformed JSON bodies', () => {
  const endpoints = ['/api/models', '/api/prices', '/api/items', '/api/outlooks', '/api/budgets', '/api/auth/login'];
  it('a body that is not JSON, or JSON of the wrong shape, answers 400 with a message', async () => {
    const before = await tableCounts();
    const broken = fc.oneof(
      fc.string({ maxLength: 40 }).map((s) => `{${s}`),
      fc.constantFrom('{"a":', '[1,2', 'null', 'true', '"text"', '{"__proto__":{"admin":true}}', '{"rows":[{"price":1e400}]}', `${'['.repeat(2000)}${']'.repeat(2000)}`),
      fc.jsonValue({ maxDepth: 4 }).map((v) => JSON.stringify(v)),
    );
    await fc.assert(
      fc.asyncProperty(fc.constantFrom(...endpoints), broken, async (url, text) => {
        const res = await planner.post(url).set('content-type', 'application/json').send(text);
        if (url === '/api/auth/login' && res.status === 429) return;
        expectClientError(res);
      }),
      { numRuns: 80, seed: 1207 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
    expect(await tableCounts()).toEqual(before);
  }, 120_000);

  it('a body over 1 MB answers 413', async () => {
    const res = await planner.post('/api/prices').set('content-type', 'application/json').send(`{"rows":[${'1,'.repeat(600_000)}1]}`);
    expect(res.status).toBe(413);
    expect(res.body.error.message.length).toBeGreaterThan(0);
  });
});

describe('property: malformed XLSX through the importer', () => {
  const cell = fc.oneof(fc.constantFrom('wheat', '2024/25', 'Larkfield terminal', '230', '-5', '=1+1', '', '2024-08-20'), fc.double(), fc.string({ maxLength: 8 }), fc.date({ noInvalidDate: true }), fc.boolean());
  it('a random workbook, or bytes that only look like one, gets a 4xx or a preview with errors; never a 500, never a write', async () => {
    const before = await tableCounts();
    let staged = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.array(cell, { maxLength: 8 }), { maxLength: 10 }),
        fc.constantFrom('prices', 'records', 'observations'),
        fc.constantFrom('workbook', 'truncated', 'zip-garbage'),
        async (rows, kind, shape) => {
          const wb = new ExcelJS.Workbook();
          const ws = wb.addWorksheet('Sheet1');
          ws.addRow(['item', 'season', 'delivery_point', 'price', 'farm', 'quantity']);
          for (const r of rows) ws.addRow(r);
          ws.addRow(['barley', '2031/32', 'Dover', '12,5x', 'F99', '-5']); // no file with this row is ever fully valid
          let bytes = Buffer.from(await wb.xlsx.writeBuffer());
          if (shape === 'truncated') bytes = bytes.subarray(0, Math.max(30, Math.floor(bytes.length / 2)));
          if (shape === 'zip-garbage') bytes = Buffer.concat([Buffer.from('PK\u0003\u0004'), Buffer.from(rows.flat().join(','))]);
          const res = await planner.post('/api/imports').field('kind', kind).attach('file', bytes, { filename: 'random.xlsx', contentType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' });
          if (res.status !== 201) return expectClientError(res);
          staged++;
          expect(res.body.errorCount).toBeGreaterThan(0);
          const c = await planner.post(`/api/imports/${res.body.id}/commit`).send({ onExisting: 'update' });
          expect(c.status).toBe(409);
        },
      ),
      { numRuns: 30, seed: 1208 }, // fixed seed; a failure prints { seed, path } to replay the case
    );
    expect(await tableCounts()).toEqual({ ...before, imports: before.imports! + staged });
  }, 120_000);
});
