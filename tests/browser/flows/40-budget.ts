import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import Papa from 'papaparse';
import type { Page, Response } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assert, assertEqual, check, ensureFittedRun, mainNav, navTitles, shot, signIn, signOut } from '../harness.js';
import { demoModel } from '../../../seed/demo-model.js';

/** A fit takes seconds on the demo co-op, longer while other fits share the two cores. */
const RUN_TIMEOUT_MS = 180_000;
const COMPUTE_TIMEOUT_MS = 60_000;

/** The model the budget tests fit when no run has finished yet (all seven demo items, NQ, land + trend). */
const DEFINITION = demoModel({ backtestSeasons: 0 });

interface Line {
  name: string;
  tonnes: number;
  lots: number;
}

interface Scenario {
  name: string;
  demand: { nitrogen: number; phosphate: number; potash: number };
  mix: { lines: Line[] };
  totals: { cash: number; cost: number };
  productPrices: { name: string; pricePerT: number }[];
}

interface Result {
  unitSystem: 'metric' | 'us';
  source: { kind: string };
  cautions: string[];
  scenarios: Scenario[];
}

/** The page's own rounding (src/app/budget/budget-format.ts), to compare cells with the API's numbers. */
const fixed = (v: number, digits: number) =>
  new Intl.NumberFormat('en', { minimumFractionDigits: digits, maximumFractionDigits: digits }).format(v).replace('-', '−');
const tonnes = (v: number) => fixed(v, Math.abs(v) > 0 && Math.abs(v) < 1 ? 3 : 1);
const mass = (v: number) =>
  Math.abs(v) < 10_000 ? fixed(v, 0) : new Intl.NumberFormat('en', { maximumSignificantDigits: 4 }).format(v).replace('-', '−');
const money = (v: number, currency: string) => `${currency} ${fixed(v, 0)}`;

/** The next answer of a budget computation (preview, save or read), as JSON. */
async function nextResult(page: Page, test: (url: URL, response: Response) => boolean): Promise<{ result: Result; id?: number }> {
  const response = await page.waitForResponse((r) => test(new URL(r.url()), r) && r.ok(), { timeout: COMPUTE_TIMEOUT_MS });
  return (await response.json()) as { result: Result; id?: number };
}

const isPreview = (u: URL, r: Response) => u.pathname === '/api/budgets/preview' && r.request().method() === 'POST';

/** The text of a grid cell of the product plan, by product and column id order (AG Grid renders cells by col-id). */
async function planCell(page: Page, product: string, headerStart: string): Promise<string> {
  const grid = page.locator('np-product-plan ag-grid-angular');
  const header = grid.locator('.ag-header-cell', { hasText: headerStart }).first();
  const colId = await header.getAttribute('col-id');
  assert(colId, `no column headed "${headerStart}"`);
  // Pinned and scrolling parts of a row share its row-index; find the product's index in the pinned part.
  const nameCell = grid.locator('.ag-cell[col-id="name"]', { hasText: new RegExp(`^${product}$`) }).first();
  const rowIndex = await nameCell.locator('xpath=ancestor::*[@row-index][1]').getAttribute('row-index');
  assert(rowIndex !== null, `no plan row for ${product}`);
  return (await grid.locator(`.ag-row[row-index="${rowIndex}"] .ag-cell[col-id="${colId}"]`).first().innerText()).trim();
}

/** The cells of one row of the side-by-side table, in scenario order. */
async function comparisonRow(page: Page, group: RegExp, label: string): Promise<string[]> {
  const table = page.getByRole('table', { name: 'Scenarios side by side' });
  const body = table.locator('tbody').filter({ has: page.locator('tr.group th', { hasText: group }) });
  const row = body.locator('tr').filter({ has: page.getByRole('rowheader', { name: label, exact: true }) });
  return (await row.locator('td').allInnerTexts()).map((t) => t.trim());
}

/** Drafts, projects and publishes an outlook for the season after the newest run's data, through the API as the signed-in planner. */
async function publishOutlook(page: Page): Promise<string> {
  return (await page.evaluate(`(async () => {
    const token = decodeURIComponent((document.cookie.split('; ').find((c) => c.startsWith('XSRF-TOKEN=')) || '').split('=')[1] || '');
    const send = async (method, url, body) => {
      const r = await fetch(url, { method, headers: { 'X-XSRF-TOKEN': token, 'Content-Type': 'application/json' }, body: JSON.stringify(body || {}) });
      return { status: r.status, body: await r.json().catch(() => null) };
    };
    const models = await (await fetch('/api/models')).json();
    const run = models.flatMap((m) => m.runs).filter((r) => r.status === 'succeeded').sort((a, b) => b.id - a.id)[0];
    if (!run) return 'no finished run';
    const seasons = await (await fetch('/api/seasons')).json().catch(() => []);
    const next = Array.isArray(seasons) && seasons.length ? Math.max(...seasons.map((x) => Number(x.startYear))) + 1 : 2027;
    const label = next + '/' + String((next + 1) % 100).padStart(2, '0');
    const draft = await send('POST', '/api/outlooks', { season: label, modelRunId: run.id });
    if (draft.status !== 201) return 'POST /api/outlooks answered ' + draft.status + ' ' + JSON.stringify(draft.body);
    await send('PATCH', '/api/outlooks/' + draft.body.id, { draws: 300 });
    const job = await send('POST', '/api/outlooks/' + draft.body.id + '/projection');
    if (job.status !== 202) return 'projection answered ' + job.status;
    const deadline = Date.now() + 240000;
    for (;;) {
      const p = await (await fetch('/api/outlooks/' + draft.body.id + '/projection')).json();
      if (p.status === 'succeeded') break;
      if (p.status === 'failed' || Date.now() > deadline) return 'projection ' + p.status;
      await new Promise((r) => setTimeout(r, 500));
    }
    // This flow is about budgets: when the run's back-test is weak for an item the planner publishes
    // anyway, as the outlook page lets them (the refusal itself is checked in tests/api/forecast.test.ts).
    const pub = await send('POST', '/api/outlooks/' + draft.body.id + '/publish', { notifyMembers: false, acceptWeakSkill: true });
    return pub.status === 201 ? 'published ' + label : 'publish answered ' + pub.status + ' ' + JSON.stringify(pub.body);
  })()`)) as string;
}

/** Issue 7: a treasurer builds a fertiliser budget from the outlook (or a model run), tries N +20 %, switches units and exports. */
export default async function budget({ base, page }: Harness): Promise<void> {
  const currency = 'EUR';

  // --- planner: a finished model run must exist (the demo co-op ships none) -------------------------
  const plannerIn = await check('the planner signs in to make sure a model run has finished', () => signIn(page, base, 'planner@example.org'));
  if (!plannerIn) return;
  const runReady = await check('a finished model run exists (the planner fits one through the API if none has)', async () => {
    const outcome = await ensureFittedRun(page, { name: 'Fertiliser budget model', definition: DEFINITION, timeoutMs: RUN_TIMEOUT_MS });
    assert(/had finished|fitted/.test(outcome), outcome);
  });
  let versions = (await page.evaluate(() => fetch('/api/outlooks/versions').then((r) => r.json()))) as { id: number; title: string }[];
  if (!versions.length && runReady)
    await check('a published outlook exists (the planner publishes one through the API if none is), so the budget starts from its scenarios', async () => {
      const outcome = await publishOutlook(page);
      assert(/^published/.test(outcome), outcome);
      versions = (await page.evaluate(() => fetch('/api/outlooks/versions').then((r) => r.json()))) as { id: number; title: string }[];
    });
  await check('the planner signs out', () => signOut(page));
  if (!runReady) return;

  // --- treasurer: build, scenario, units, exports ----------------------------------------------------
  const treasurerIn = await check('the treasurer signs in', () => signIn(page, base, 'treasurer@example.org'));
  if (!treasurerIn) return;
  let budgetId = 0;
  let baseMetric: Scenario | null = null;
  /** The outlook's other scenarios, computed beside the base in an outlook budget. */
  let outlookRows: string[] = [];

  const opened = await check('Budget is in the navigation and opens the list with a New budget button', async () => {
    await mainNav(page).getByRole('link', { name: 'Budget' }).click();
    await page.waitForURL(/\/budget$/);
    await page.getByRole('heading', { level: 1, name: 'Fertiliser budgets' }).waitFor();
    assertEqual(await page.title(), 'Fertiliser budgets · Netput', 'page title');
    await page.getByText('it is not an application recommendation').first().waitFor();
  });

  const built =
    opened &&
    (await check(`a new budget starts from ${versions.length ? 'the published outlook' : 'the latest model run (no outlook is published)'} and shows product tonnes`, async () => {
      const preview = nextResult(page, isPreview);
      await page.getByRole('link', { name: 'New budget' }).click();
      await page.waitForURL(/\/budget\/new$/);
      const source = versions.length ? 'Published outlook' : 'Model run';
      assert(await page.getByRole('radio', { name: source }).isChecked(), `"${source}" is not the chosen source`);
      const { result } = await preview;
      assertEqual(result.source.kind, versions.length ? 'outlook' : 'model-run', 'source of the preview');
      baseMetric = result.scenarios[0]!;
      outlookRows = result.scenarios.filter((s) => s.name.startsWith('Outlook ')).map((s) => s.name);
      if (versions.length) {
        // Low, base and high side by side, each buying at its own nutrient prices: the squeeze (low) never costs less per kg of N.
        assertEqual(outlookRows, ['Outlook low', 'Outlook high'], 'outlook scenarios beside the base');
        const ureaPrice = (name: string) => result.scenarios.find((s) => s.name === name)!.productPrices.find((p) => p.name === 'Urea')!.pricePerT;
        assert(ureaPrice('Outlook low') >= ureaPrice('Base') && ureaPrice('Base') >= ureaPrice('Outlook high'), `urea prices low ${ureaPrice('Outlook low')}, base ${ureaPrice('Base')}, high ${ureaPrice('Outlook high')}`);
      }
      await page.getByRole('heading', { name: 'Product plan' }).waitFor();
      const urea = baseMetric.mix.lines.find((l) => l.name === 'Urea');
      assert(urea && urea.tonnes > 0, 'the least-cost mix buys no urea');
      await page.locator('np-product-plan .ag-row').first().waitFor();
      assertEqual(await planCell(page, 'Urea', 'Bought'), tonnes(urea.tonnes), 'urea tonnes bought');
      assertEqual(await planCell(page, 'Urea', 'Lots'), `${urea.lots} × 25`, 'urea lots (25 t each)');
      await page.getByText(result.cautions[1]!.slice(0, 60)).first().waitFor();
    }));

  if (built) {
    await check('the cash chart draws the monthly cash as SVG with its months', async () => {
      const chart = page.locator('np-cash-chart [role="img"]');
      await chart.locator('svg').waitFor();
      const label = (await chart.getAttribute('aria-label')) ?? '';
      assert(/^Cash by month, Base, \w{3} \d{4} to \w{3} \d{4}; most in \w{3} \d{4}: EUR [\d,]+; /.test(label), `chart label: ${label}`);
      // The running total ends at the cash the base pays: list value less prepayment discounts.
      // (to the euro: the chart sums the months, so a total on a half euro may round the other way)
      const total = Number(/EUR ([\d,]+) in all$/.exec(label)?.[1]?.replaceAll(',', '') ?? NaN);
      assert(Math.abs(total - baseMetric!.totals.cash) <= 1, `chart label ends "${label.slice(-40)}", cash ${baseMetric!.totals.cash}`);
      assert((await chart.locator('svg path').count()) > 5, 'the chart drew no bars');
      const table = page.getByRole('table', { name: 'Cash by month, Base' });
      assertEqual((await table.locator('tbody tr').count()) > 0, true, 'cash table rows');
    });
    await page.getByRole('heading', { name: 'Booking and cash' }).evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await shot(page, 'treasurer-budget-new-1280');
    await page.getByRole('heading', { name: 'Product plan' }).evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await shot(page, 'treasurer-budget-plan-1280');
    await check('at phone width the new budget shows its source, its plan and its booking', async () => {
      await page.setViewportSize({ width: 390, height: 844 });
      // Let the navigation drawer settle into its phone layout before the shots.
      await page.waitForTimeout(800);
      await page.getByRole('heading', { name: 'Nutrient demand and where it comes from' }).first().evaluate((el) => el.scrollIntoView({ block: 'start' }));
      await shot(page, 'treasurer-budget-source-390');
      await page.getByRole('heading', { name: 'Product plan' }).evaluate((el) => el.scrollIntoView({ block: 'start' }));
      await shot(page, 'treasurer-budget-plan-390');
      await page.getByRole('heading', { name: 'Booking and cash' }).evaluate((el) => el.scrollIntoView({ block: 'start' }));
      await shot(page, 'treasurer-budget-booking-390');
      await page.setViewportSize({ width: 1280, height: 860 });
    });

    await check('the treasurer saves the budget and lands on its own page', async () => {
      const saved = nextResult(page, (u, r) => u.pathname === '/api/budgets' && r.request().method() === 'POST');
      await page.getByRole('button', { name: 'Save budget' }).click();
      budgetId = (await saved).id!;
      await page.waitForURL(new RegExp(`/budget/${budgetId}$`));
      await page.getByRole('link', { name: 'Export XLSX' }).waitFor();
    });
  }

  let upMetric: Scenario | null = null;
  const scenarioAdded =
    budgetId > 0 &&
    (await check('a scenario N +20 % changes cost and demand, side by side with the base', async () => {
      const preview = nextResult(page, isPreview);
      await page.getByRole('button', { name: 'N +20 %' }).click();
      const { result } = await preview;
      upMetric = result.scenarios.find((s) => s.name === 'N +20 %')!;
      const b = result.scenarios[0]!;
      assert(upMetric, 'no scenario N +20 % in the preview');
      // Own-price elasticity below zero: dearer nitrogen, less nitrogen bought.
      assert(upMetric.demand.nitrogen < b.demand.nitrogen, 'nitrogen demand did not fall');
      await page.getByRole('columnheader', { name: 'N +20 %' }).waitFor();
      const k = result.scenarios.findIndex((s) => s.name === 'N +20 %');
      const nRow = await comparisonRow(page, /^Nutrient demand, kg$/, 'N');
      assert(nRow[0] === mass(b.demand.nitrogen), `base N cell ${nRow[0]}, expected ${mass(b.demand.nitrogen)}`);
      assert(nRow[k]!.startsWith(mass(upMetric.demand.nitrogen)), `N +20 % cell ${nRow[k]}, expected ${mass(upMetric.demand.nitrogen)}`);
      assert(/−\d/.test(nRow[k]!), `the N +20 % cell shows no fall: ${nRow[k]}`);
      const cash = await comparisonRow(page, /^Money, EUR$/, 'Cash paid');
      assertEqual(cash[0], money(b.totals.cash, currency), 'base cash');
      assert(cash[k]!.startsWith(money(upMetric.totals.cash, currency)), `N +20 % cash cell ${cash[k]}`);
      assert(upMetric.totals.cash !== b.totals.cash, 'the cash did not change');
    }));

  if (scenarioAdded) {
    await check('the treasurer adds a potash scenario named by hand and saves both', async () => {
      await page.getByRole('button', { name: 'Another scenario' }).click();
      const names = page.getByLabel('Scenario name');
      await names.last().fill('-10 % potash');
      await page.getByLabel('K2O price').last().fill('-10');
      await page.getByRole('columnheader', { name: '-10 % potash' }).waitFor({ timeout: COMPUTE_TIMEOUT_MS });
      const saved = nextResult(page, (u, r) => u.pathname === `/api/budgets/${budgetId}` && r.request().method() === 'PUT');
      await page.getByRole('button', { name: 'Save changes' }).click();
      const { result } = await saved;
      assertEqual(result.scenarios.map((s) => s.name), ['Base', ...outlookRows, 'N +20 %', '-10 % potash'], 'saved scenarios');
      await page.getByRole('link', { name: 'Export CSV' }).waitFor();
    });
    await check('the plan and the cash show the N +20 % scenario when chosen, beside the base', async () => {
      await page.getByRole('radio', { name: 'N +20 %' }).first().click();
      await page.getByRole('table', { name: 'Cash by month, N +20 %' }).waitFor();
      const urea = upMetric!.mix.lines.find((l) => l.name === 'Urea')!;
      assertEqual(await planCell(page, 'Urea', 'Bought'), tonnes(urea.tonnes), 'urea tonnes at N +20 %');
      await page.locator('np-cash-chart [role="img"]').getByText('Cumulative, Base').first().waitFor();
    });
    await page.getByRole('heading', { name: 'Price scenarios side by side' }).evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await shot(page, 'treasurer-budget-scenarios-1280');
  }

  if (budgetId > 0 && baseMetric) {
    await check('US units show lb and short tons, converted exactly', async () => {
      const read = nextResult(page, (u) => u.pathname === `/api/budgets/${budgetId}` && u.searchParams.get('units') === 'us');
      await page.getByRole('radio', { name: 'US (lb, short ton)' }).click();
      const { result } = await read;
      assertEqual(result.unitSystem, 'us', 'unit system read');
      await page.locator('np-product-plan .ag-header-cell', { hasText: 'Bought, short tons' }).waitFor();
      await page.getByRole('radio', { name: 'Base' }).first().click();
      const urea = baseMetric!.mix.lines.find((l) => l.name === 'Urea')!;
      // 1 short ton = 2000 lb × 0.45359237 kg = 907.18474 kg exactly.
      assertEqual(await planCell(page, 'Urea', 'Bought'), tonnes((urea.tonnes * 1000) / 907.18474), 'urea short tons');
      assertEqual(await planCell(page, 'Urea', 'Lots'), `${urea.lots} × 27.56`, 'urea lots (25 t = 27.56 short tons, to 0.01)');
      const demand = page.getByRole('table', { name: 'Base nutrient demand' });
      await demand.getByText(`${mass(baseMetric!.demand.nitrogen / 0.45359237)} lb N`).waitFor();
      await page.getByRole('table', { name: 'Cash by month, Base' }).getByRole('columnheader', { name: 'Booked, short tons' }).waitFor();
    });
    await page.getByRole('heading', { name: 'Product plan' }).evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await shot(page, 'treasurer-budget-us-1280');

    const dir = mkdtempSync(join(tmpdir(), 'netput-budget-downloads-'));
    try {
      await check('the XLSX export downloads, each sheet headed by the cautions', async () => {
        const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Export XLSX' }).click()]);
        assert(/^budget-\d+-.+\.xlsx$/.test(download.suggestedFilename()), `file name ${download.suggestedFilename()}`);
        const file = join(dir, download.suggestedFilename());
        await download.saveAs(file);
        const wb = new ExcelJS.Workbook();
        await wb.xlsx.readFile(file);
        assertEqual(wb.worksheets.map((w) => w.name), ['Summary', 'Scenarios', 'Plan', 'Cash', 'Cautions'], 'sheets');
        const first = String(wb.getWorksheet('Summary')!.getCell('A1').value);
        assert(first.includes('not an application recommendation'), `Summary!A1 is "${first}"`);
        // The side-by-side sheet: a header row naming every scenario, under the caution rows.
        let header: unknown[] = [];
        wb.getWorksheet('Scenarios')!.eachRow((row) => {
          const values = row.values as unknown[];
          if (values[2] === 'Base') header = values.slice(2);
        });
        assertEqual(header, ['Base', ...outlookRows, 'N +20 %', "'-10 % potash"], 'scenario columns (a name starting with "-" is escaped)');
      });

      await check('the CSV export is a board table: cautions, cash flow by month and purchases by product, in US units, money in whole euros, cells escaped', async () => {
        const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Export CSV' }).click()]);
        assert(download.suggestedFilename().endsWith('.csv'), `file name ${download.suggestedFilename()}`);
        const file = join(dir, download.suggestedFilename());
        await download.saveAs(file);
        const text = readFileSync(file, 'utf8').replace(/^\uFEFF/, '');
        const cells = Papa.parse<string[]>(text, { skipEmptyLines: true }).data;
        assertEqual(cells[0]?.[0], 'Fertiliser budget', 'first cell');
        const cautions = cells.filter((c) => c[0] === 'Caution');
        assert(cautions.length >= 3 && cautions.some((c) => c[1]!.includes('certified adviser')), 'the cautions do not name the certified adviser');
        const at = (title: string) => cells.findIndex((c) => c[0] === title);
        assert(at('Cash flow by month') > 0 && at('Purchases by product') > at('Cash flow by month'), 'the two tables');
        const cashHead = cells[at('Cash flow by month') + 1]!;
        assertEqual(cashHead.slice(0, 3), ['Month', 'Base: booked (short ton)', 'Base: paid in the month (EUR)'], 'cash-flow headings');
        // OWASP CSV injection: a heading that starts like a formula gets a leading apostrophe.
        assert(cashHead.some((h) => h.startsWith("'-10 % potash: ")), `potash headings: ${cashHead.join(' | ')}`);
        assert(!/(^|,)-10 % potash/m.test(text), 'a cell starts with "-" unescaped');
        const months = cells.slice(at('Cash flow by month') + 2, at('Purchases by product'));
        assert(months.length >= 2 && /^[A-Z][a-z]{2} \d{4}$/.test(months[0]![0]!) && months.at(-1)![0] === 'Total', `month rows: ${months.map((m) => m[0]).join(', ')}`);
        for (const m of months) for (const v of m.slice(1)) assert(/^(-?\d+(\.\d)?)?$/.test(v), `unrounded cell ${v} in ${m[0]}`);
        const urea = cells.slice(at('Purchases by product') + 2).find((c) => c[0] === 'Urea');
        assert(urea !== undefined && /^\d+$/.test(urea[2]!), `urea row: ${urea?.join(' | ')}`);
      });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }

    await check('the budget list shows the saved budget with its scenarios', async () => {
      await page.getByRole('link', { name: 'Fertiliser budgets' }).first().click();
      await page.waitForURL(/\/budget$/);
      // One chip per scenario, so a name holding a comma cannot read as two.
      const chips = page.getByRole('list', { name: `${2 + outlookRows.length} scenarios beside the base` }).first();
      await chips.waitFor();
      assertEqual((await chips.getByRole('listitem').allInnerTexts()).map((t) => t.trim()), [...outlookRows, 'N +20 %', '-10 % potash'], 'scenario chips');
    });
    // Leave the next flows in the co-op's default units.
    await page.getByRole('radio', { name: 'Metric (kg, t)' }).click();
  }
  await check('the treasurer signs out', () => signOut(page));

  // --- planner reads without edit affordances; a member is turned away -------------------------------
  if (budgetId > 0) {
    const plannerAgain = await check('the planner signs in to read the budget', () => signIn(page, base, 'planner@example.org'));
    if (plannerAgain) {
      await check('the planner reads the budget and may export it, but sees nothing to edit', async () => {
        await page.goto(`${base}/budget/${budgetId}`);
        await page.getByRole('heading', { name: 'Price scenarios side by side' }).waitFor();
        await page.getByRole('link', { name: 'Export CSV' }).waitFor();
        for (const name of ['Save changes', 'Delete', 'N +20 %', 'Add a booking month']) assertEqual(await page.getByRole('button', { name, exact: true }).count(), 0, `"${name}" buttons`);
        assertEqual(await page.getByLabel('Scenario name').count(), 0, 'scenario name fields');
        await page.getByRole('table', { name: 'Booking plan' }).waitFor();
        await page.goto(`${base}/budget`);
        await page.getByRole('heading', { level: 1, name: 'Fertiliser budgets' }).waitFor();
        assertEqual(await page.getByRole('link', { name: 'New budget' }).count(), 0, '"New budget" links');
      });
      await shot(page, 'planner-budget-read-1280');
      await check('the planner cannot open a new budget', async () => {
        await page.goto(`${base}/budget/new`);
        await page.getByRole('heading', { name: 'Your role cannot open this page' }).waitFor();
      });
      await check('the planner signs out', () => signOut(page));
    }
    const memberIn = await check('the member signs in', () => signIn(page, base, 'member@example.org'));
    if (memberIn) {
      await check('the member has no Budget entry and is turned away from budgets', async () => {
        const titles = await navTitles(page);
        assert(!titles.includes('Budget'), 'the member sees Budget');
        await page.goto(`${base}/budget/${budgetId}`);
        await page.getByRole('heading', { name: 'Your role cannot open this page' }).waitFor();
      });
      await check('the member signs out', () => signOut(page));
    }
  }

  // --- admin: the season calendar the budget books by ---------------------------------------------------
  const adminIn = await check('the admin signs in', () => signIn(page, base, 'admin@example.org'));
  if (adminIn) {
    await check('the settings page shows the season calendar and reads it for a season, at 1280 and 390 px', async () => {
      await page.goto(`${base}/admin/settings`);
      const calendar = page.getByRole('group', { name: 'Season calendar' });
      await calendar.waitFor();
      const example = (await calendar.locator('.calendar-example').innerText()).trim();
      assert(/^Season (\d{4})\/\d{2}: inputs bought Aug (\d{4}) – Mar \d{4}, crop delivered Jul \d{4} – Sep \d{4}\.$/.test(example), `calendar line: ${example}`);
      const [, season, from] = /^Season (\d{4})\/\d{2}: inputs bought Aug (\d{4})/.exec(example)!;
      assertEqual(Number(from), Number(season) - 1, 'the default calendar buys the inputs in the year before the season starts');
      await calendar.evaluate((el) => el.scrollIntoView({ block: 'start' }));
      await shot(page, 'admin-settings-calendar-1280');
      await page.setViewportSize({ width: 390, height: 844 });
      await page.reload();
      await calendar.waitFor();
      await calendar.evaluate((el) => el.scrollIntoView({ block: 'start' }));
      await shot(page, 'admin-settings-calendar-390');
      await page.setViewportSize({ width: 1280, height: 860 });
    });
    await check('the admin signs out', () => signOut(page));
  }
}
