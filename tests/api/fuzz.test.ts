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
import { demoModel } from '../../seed/demo-model.js';
import { agent, signedIn, startTestApp, type TestApp } from './test-app.js';

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
      definition: demoModel({ backtestSeasons: 0 }),
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

/**
 * Hostile values on every route of the route table, for an anonymous caller and every role (issue
 * 15, item 5): ids of 2^31 and more in a path, an id list, a query or a body, and text with a NUL
 * character or a lone UTF-16 surrogate. Each request carries one hostile spot (the path, the query
 * or one field of an otherwise well-formed body), so the value gets as deep as validation lets it.
 * Every answer is below 500, and a 400 names the field.
 */
describe('property: hostile ids and text on every route, for every role', () => {
  const BIG_IDS = [2 ** 31, 2 ** 31 + 7, 2 ** 32, 2 ** 53, 2 ** 53 + 2, 1e20];
  const BAD_TEXT = ['a\u0000b', '\u0000', '\ud800', 'x\udfffy', 'planner@example.org\u0000', '\ud83d'];
  const hostileNumber = fc.constantFrom(...BIG_IDS);
  const hostileText = fc.constantFrom(...BAD_TEXT);
  /** In a path or query string: as the client would percent-encode it. */
  const hostileUrlText = fc.oneof(
    hostileNumber.map((n) => (n >= 1e21 ? String(n) : BigInt(n).toString())),
    fc.constantFrom('1,2147483648', '2147483648,1', '99999999999', '%00', '1%00', 'a%00b', '%ED%A0%80', '%ED%BF%BF', '%C0%80', '%FF'),
  );

  /** A well-formed body per write route (ids of demo rows, which need not exist). */
  const TEMPLATES: Record<string, unknown> = {
    'post /api/auth/login': { email: 'nobody@example.org', password: 'not-the-password' },
    'post /api/auth/password-reset': { email: 'nobody@example.org' },
    'post /api/auth/tokens/:token': { password: 'a-long-enough-password' },
    'post /api/users/invitations': { email: 'fuzz@example.org', name: 'Fuzz Person', role: 'member', farmId: 1 },
    'patch /api/users/:id': { name: 'Fuzz Person', role: 'member', farmId: 1, active: true },
    'put /api/settings/': { coopName: 'Fuzz co-op', currency: 'EUR', unitSystem: 'metric', storageCapacityT: 1000, handlingCapacityTPerDay: 100 },
    'post /api/items/': { code: 'fuzz', name: 'Fuzz', role: 'output', category: 'grain', unit: 't' },
    'put /api/items/:id': { code: 'fuzz', name: 'Fuzz', role: 'output', category: 'grain', unit: 't' },
    'post /api/seasons/': { label: '2031/32', startYear: 2031, startMonth: 8 },
    'put /api/seasons/:id': { label: '2031/32', startYear: 2031, startMonth: 8 },
    'post /api/delivery-points/': { name: 'Fuzz point', kind: 'delivery point', region: 'North' },
    'put /api/delivery-points/:id': { name: 'Fuzz point', kind: 'delivery point', region: 'North' },
    'post /api/farms/': { code: 'F98', name: 'Fuzz farm', region: 'North', landHa: 10 },
    'put /api/farms/:id': { code: 'F98', name: 'Fuzz farm', region: 'North', landHa: 10 },
    'post /api/prices/': { rows: [{ itemId: 1, seasonId: 1, deliveryPointId: 1, price: 100, currency: 'EUR', source: 'fuzz', observedOn: '2024-08-01' }] },
    'put /api/prices/:id': { itemId: 1, seasonId: 1, deliveryPointId: 1, price: 100, currency: 'EUR', source: 'fuzz', observedOn: '2024-08-01' },
    'post /api/prices/deletions': { ids: [1, 2] },
    'post /api/price-indexes/': { name: 'Fuzz index', base: '2020 = 100', source: 'fuzz', values: [{ seasonId: 1, value: 100 }] },
    'put /api/price-indexes/:id': { name: 'Fuzz index', base: '2020 = 100', source: 'fuzz', values: [{ seasonId: 1, value: 100 }] },
    'put /api/records/factors': { farmId: 1, seasonId: 1, factor: 'irrigated_ha', value: 1 },
    'delete /api/records/factors': { farmId: 1, seasonId: 1, factor: 'irrigated_ha' },
    'put /api/records/': { rows: [{ farmId: 1, seasonId: 1, itemId: 1, quantity: 10 }] },
    'delete /api/records/': { farmId: 1, seasonId: 1, itemId: 1 },
    'put /api/records/land': { farmId: 1, seasonId: 1, landHa: 10 },
    'post /api/imports/:id/validate': { mapping: { item: 'item' }, deliveryPoint: null },
    'post /api/imports/:id/commit': { onExisting: 'update' },
    'post /api/models/': { name: 'Fuzz', definition: { items: ['wheat', 'nitrogen', 'labour'], numeraire: 'labour' } },
    'post /api/budgets/preview': {
      name: 'Fuzz',
      source: { kind: 'outlook', outlookVersionId: 1, scenario: 'base' },
      products: [{ productId: 1 }],
      bookingPlan: { months: [{ month: '2026-09', share: 1 }], deliveryMonth: '2027-03' },
    },
    'post /api/budgets/': {
      name: 'Fuzz',
      source: { kind: 'model-run', runId: 1, prices: { wheat: 200 } },
      products: [{ productId: 1 }],
      bookingPlan: { months: [{ month: '2026-09', share: 1 }], deliveryMonth: '2027-03' },
    },
    'put /api/budgets/:id': {
      name: 'Fuzz',
      source: { kind: 'outlook', outlookVersionId: 1, scenario: 'base' },
      products: [{ productId: 1, pricePerT: 500 }],
      bookingPlan: { months: [{ month: '2026-09', share: 1 }], deliveryMonth: '2027-03' },
    },
    'post /api/fertiliser-products/': { name: 'Fuzz', nPct: 46, form: 'solid', pricePerT: 500, currency: 'EUR', lotT: 24 },
    'put /api/fertiliser-products/:id': { name: 'Fuzz', nPct: 46, form: 'solid', pricePerT: 500, currency: 'EUR', lotT: 24 },
    'post /api/outlooks/': { season: '2031/32', title: 'Fuzz', modelRunId: 1 },
    'patch /api/outlooks/:id': { title: 'Fuzz', modelRunId: 1, commentary: 'Fuzz' },
    'put /api/outlooks/:id/expectations': { items: [{ item: 'wheat', method: { kind: 'trend', seasons: 10 }, note: 'fuzz' }] },
    'post /api/outlooks/:id/publish': { commentary: 'Fuzz', notifyMembers: false },
    'post /api/futures-quotes/': { itemId: 1, seasonId: 1, contract: 'Fuzz', quote: 200, currency: 'EUR', quotedOn: '2026-11-20', source: 'fuzz' },
    'put /api/futures-quotes/:id': { itemId: 1, seasonId: 1, contract: 'Fuzz', quote: 200, currency: 'EUR', quotedOn: '2026-11-20', source: 'fuzz' },
    'put /api/account/mail-preferences': { outlookEmails: true },
  };
  /** Every query name the API reads; a GET gets all of them with one hostile value. */
  const QUERY_NAMES = ['items', 'seasons', 'farms', 'deliveryPoints', 'deflator', 'version', 'itemId', 'seasonId', 'limit', 'offset', 'format', 'units', 'item', 'prices', 'fixed', 'entity', 'q'];

  type Leaf = { path: (string | number)[]; value: unknown };
  function leaves(v: unknown, path: (string | number)[] = []): Leaf[] {
    if (Array.isArray(v)) return v.flatMap((x, i) => leaves(x, [...path, i]));
    if (v && typeof v === 'object') return Object.entries(v).flatMap(([k, x]) => leaves(x, [...path, k]));
    return [{ path, value: v }];
  }
  function withLeaf(v: unknown, path: (string | number)[], value: unknown): unknown {
    if (!path.length) return value;
    const copy = (Array.isArray(v) ? [...v] : { ...(v as object) }) as Record<string | number, unknown>;
    copy[path[0]!] = withLeaf(copy[path[0]!], path.slice(1), value);
    return copy;
  }

  it('no route answers 500 to an id of 2^31 or more, a NUL or a lone surrogate, whoever calls', async () => {
    const seed = Number(process.env.FUZZ_SEED ?? 20261203);
    console.log(`hostile-input walk: seed ${seed} (set FUZZ_SEED to replay)`);
    const app = await startTestApp({ dev: true });
    try {
      const callers = {
        anonymous: await agent(app.app),
        admin: await signedIn(app.app, 'admin@example.org'),
        planner: await signedIn(app.app, 'planner@example.org'),
        treasurer: await signedIn(app.app, 'treasurer@example.org'),
        member: await signedIn(app.app, 'member@example.org'),
      };
      // Routes that end the caller's own session go last.
      const routes = [...app.app.routeTable].sort((a, b) => Number(a.fullPath === '/api/auth/logout') - Number(b.fullPath === '/api/auth/logout'));
      const failures: string[] = [];
      let requests = 0;
      let refusedWithField = 0;
      for (const [index, route] of routes.entries()) {
        const key = `${route.method} ${route.fullPath}`;
        const template = TEMPLATES[key] ?? {};
        const params = route.fullPath.match(/:[a-zA-Z]+/g) ?? [];
        const modes: ('path' | 'query' | 'body')[] = [];
        if (params.length) modes.push('path');
        if (route.method === 'get') modes.push('query');
        else if (leaves(template).length && Object.keys(template as object).length) modes.push('body');
        if (!modes.length) modes.push('query');
        const request = fc.record({
          mode: fc.constantFrom(...modes),
          param: fc.nat(),
          urlValue: hostileUrlText,
          leaf: fc.nat(),
          bodyValue: fc.oneof(hostileNumber, hostileText, hostileNumber.map((n) => [n])),
          keyText: fc.boolean(),
        });
        await fc.assert(
          fc.asyncProperty(request, async (r) => {
            const concrete = (value: string | null) =>
              params.reduce((url, p, i) => url.replace(p, value !== null && i === r.param % params.length ? value : p === ':token' ? 'A'.repeat(43) : '1'), route.fullPath);
            let url = concrete(r.mode === 'path' ? r.urlValue : null);
            let body: unknown = template;
            if (r.mode === 'query') url += `?${QUERY_NAMES.map((q) => `${q}=${r.urlValue}`).join('&')}`;
            if (r.mode === 'body') {
              const all = leaves(template);
              const target = all[r.leaf % all.length]!;
              // A text field gets hostile text, a number gets a hostile id, either way round now and then.
              let value = r.bodyValue;
              if (typeof target.value === 'string' && typeof value !== 'string') value = BAD_TEXT[r.leaf % BAD_TEXT.length];
              if (typeof target.value === 'number' && typeof value === 'string' && !r.keyText) value = BIG_IDS[r.leaf % BIG_IDS.length];
              body = withLeaf(template, target.path, value);
              if (r.keyText) body = { ...(body as object), ['bad\u0000key']: 1 };
            }
            for (const [who, a] of Object.entries(callers)) {
              requests++;
              const res = await a[route.method](url).send(body as object);
              const shown = `${key} as ${who}: ${route.method.toUpperCase()} ${url} ${JSON.stringify(body)?.slice(0, 160)} → ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`;
              if (res.status >= 500) failures.push(shown);
              if (res.status === 400) {
                const details: { path: string; message: string }[] = res.body.error?.details ?? [];
                if (!res.body.error?.message) failures.push(`${shown} (400 without a message)`);
                else if (details.length && details.every((d) => !/^(body|query|params)\b/.test(d.path))) failures.push(`${shown} (400 naming no field)`);
                else refusedWithField++;
              }
            }
          }),
          { seed: seed + index, numRuns: route.fullPath === '/api/auth/logout' ? 1 : 4 },
        );
      }
      console.log(`hostile-input walk: ${routes.length} routes, ${requests} requests, ${refusedWithField} refused with 400 naming a field, ${failures.length} answered 500`);
      expect(failures).toEqual([]);
    } finally {
      await app.close();
    }
  }, 600_000);
});

describe('hostile text in an uploaded file', () => {
  it('a CSV with a NUL in a cell, or a mapping with one, is refused or previewed with errors; never a 500', async () => {
    const csv = Buffer.from('item,season,delivery_point,price,observed_on\nwheat\u0000,2024/25,Larkfield terminal,230,2024-08-20\nwheat,2024/25,Lark\u0000field,2147483648,2024-08-20\n');
    const res = await planner.post('/api/imports').field('kind', 'prices').attach('file', csv, { filename: 'nul.csv', contentType: 'text/csv' });
    expect(res.status, JSON.stringify(res.body)).toBeLessThan(500);
    const mapped = await planner
      .post('/api/imports')
      .field('kind', 'prices')
      .field('mapping', JSON.stringify({ item: 'item\u0000' }))
      .attach('file', Buffer.from('item,season\nwheat,2024/25\n'), { filename: 'ok.csv', contentType: 'text/csv' });
    expect(mapped.status, JSON.stringify(mapped.body)).toBe(400);
    expect(mapped.body.error.details[0].path).toMatch(/^body\.mapping/);
  });
});
