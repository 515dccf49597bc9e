import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assert, assertEqual, check, navHrefs, shot, signIn, signOut } from '../harness.js';

/**
 * Issue 4, the data desk, tried as a new planner would: upload a messy CSV of prices, read which rows
 * are wrong, upload the corrected file, commit it and watch the progress bar finish; then change a
 * price in the grid and see the chart redraw. A treasurer then finds the same pages read-only.
 * The files are written by this flow (invented prices, demo co-op names).
 */
const HEADER = 'item,season,delivery_point,price,unit,currency,source,observed_on';
const MESSY = [
  HEADER,
  // row 2: already stored in the demo data (same item, season, point and date): the planner updates it
  'wheat,2024/25,Larkfield terminal,228.40,t,EUR,Flow check bid sheet,2024-08-15',
  'wheat,2024/25,Ashby elevator,"231,8",t,EUR,Flow check bid sheet,2024-09-03',
  'barley,2024/25,Millbrook store,190,t,EUR,Flow check bid sheet,2024-09-03',
  'nitrogen,2024/25,Co-op input depot,1.21,kg,EUR,Flow check price list,2024-09-03',
  'canola,2024/25,Millbrook store,468.10,t,EUR,Flow check bid sheet,03/09/2024',
  'canola,2024/25,Larkfield terminal,-468,t,EUR,Flow check bid sheet,2024-09-03',
  'diesel,2033/34,Co-op input depot,1.09,L,EUR,Flow check price list,2024-09-03',
  'wheat,2024/25,Larkfield terminal,228.40,t,EUR,Flow check bid sheet,2024-08-15',
].join('\n');
/** Each wrong row of MESSY, with the column the import must name (null: the row as a whole). */
const MESSY_ERRORS: [number, string | null][] = [
  [3, 'price'], // decimal comma
  [4, 'item'], // no such item
  [5, 'unit'], // kg is not kg N
  [6, 'observed_on'], // day/month order unknown
  [7, 'price'], // not more than 0
  [8, 'season'], // no such season
  [9, null], // repeats row 2
];
const FIXED = [
  HEADER,
  'wheat,2024/25,Larkfield terminal,228.40,t,EUR,Flow check bid sheet,2024-08-15',
  'wheat,2024/25,Ashby elevator,231.8,t,EUR,Flow check bid sheet,2024-09-03',
  'wheat,2024/25,Millbrook store,226.5,t,EUR,Flow check bid sheet,2024-09-03',
  'nitrogen,2024/25,Co-op input depot,1.21,kg N,EUR,Flow check price list,2024-09-03',
  'canola,2024/25,Millbrook store,468.10,t,EUR,Flow check bid sheet,2024-09-03',
  'canola,2024/25,Larkfield terminal,468,t,EUR,Flow check bid sheet,2024-09-03',
  'diesel,2024/25,Co-op input depot,1.09,L,EUR,Flow check price list,2024-09-03',
].join('\n');

/** The rows of the prices grid (AG Grid 36 draws each row once when no column is pinned). */
const PRICE_ROWS = 'ag-grid-angular[aria-label="Price observations"] .ag-row';

/**
 * Waits until the prices grid shows exactly `n` rows with their data: the grid reads its rows from
 * the server block by block (infinite row model), and a row is drawn empty while its block loads.
 */
async function shownPriceRows(page: Page, n: number): Promise<void> {
  await page.waitForFunction(
    ({ rows, n }) => {
      const drawn = [...document.querySelectorAll(rows)];
      return drawn.length === n && drawn.every((r) => (r.querySelector('[col-id="price"]')?.textContent ?? '').trim() !== '');
    },
    { rows: PRICE_ROWS, n },
  );
}

/** The `d` of every path the price chart's SVG draws, joined: changes whenever a line moves. */
async function chartPaths(page: Page): Promise<string> {
  return page.locator('np-price-chart svg path').evaluateAll((paths) => paths.map((p) => p.getAttribute('d') ?? '').join('|'));
}

async function waitForChart(page: Page): Promise<string> {
  await page.locator('np-price-chart svg path').first().waitFor({ state: 'attached', timeout: 30_000 });
  // Let the first draw settle (the series arrives after the chart library).
  let previous = '';
  for (let i = 0; i < 20; i++) {
    const now = await chartPaths(page);
    if (now && now === previous) return now;
    previous = now;
    await page.waitForTimeout(250);
  }
  return previous;
}

/** The rows of the import's problem list as [row, column] pairs; "(header)"/"(whole row)" as null. */
async function problemRows(page: Page): Promise<[number, string | null][]> {
  const cells = await page
    .getByRole('region', { name: /Rows to fix before anything is written/ })
    .locator('tbody tr')
    .evaluateAll((trs) => trs.map((tr) => [...tr.querySelectorAll('td')].map((td) => (td.textContent ?? '').trim())));
  return cells.map(([row, column]) => [Number(row), column.startsWith('(') ? null : column]);
}

export default async function dataDesk({ base, page }: Harness): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'netput-data-desk-'));
  const messyFile = join(dir, 'grain-desk-prices.csv');
  const fixedFile = join(dir, 'grain-desk-prices-fixed.csv');
  writeFileSync(messyFile, MESSY);
  writeFileSync(fixedFile, FIXED);
  try {
    const plannerIn = await check('the planner signs in for the data desk', () => signIn(page, base, 'planner@example.org'));
    if (plannerIn) await planner(base, page, messyFile, fixedFile);
    await page.setViewportSize({ width: 1280, height: 860 });
    const treasurerIn = await check('the treasurer signs in', () => signIn(page, base, 'treasurer@example.org'));
    if (treasurerIn) await treasurer(base, page);
  } finally {
    await page.setViewportSize({ width: 1280, height: 860 });
    rmSync(dir, { recursive: true, force: true });
  }
}

async function planner(base: string, page: Page, messyFile: string, fixedFile: string): Promise<void> {
  await check('the planner’s navigation has Prices, Farms, Imports and Reference data, in that order', async () => {
    const hrefs = await navHrefs(page);
    const at = ['/prices', '/farms', '/imports', '/reference'].map((h) => hrefs.indexOf(h));
    assert(at.every((i) => i >= 0), `navigation is ${hrefs.join(', ')}`);
    assertEqual([...at].sort((a, b) => a - b), at, 'order of the data-desk entries');
  });

  const messyShown = await check('a messy CSV: the preview lists exactly the wrong rows, with their columns', async () => {
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Imports' }).click();
    await page.waitForURL(/\/imports$/);
    await page.getByRole('heading', { level: 1, name: 'Imports' }).waitFor();
    await page.getByLabel('Choose a CSV or XLSX file to import').setInputFiles(messyFile);
    await page.getByRole('region', { name: /Rows to fix before anything is written/ }).waitFor({ timeout: 30_000 });
    assertEqual(await problemRows(page), MESSY_ERRORS, 'rows and columns of the problem list');
    const list = page.getByRole('region', { name: /Rows to fix/ });
    await list.getByText('"231,8" is written with a decimal comma').waitFor();
    await list.getByText('unknown item "barley"').waitFor();
    await list.getByText(`unit "kg" is not nitrogen's unit "kg N"`).waitFor();
    await list.getByText('7 problems in 7 rows').waitFor();
    assertEqual(await page.getByRole('button', { name: /^Commit/ }).count(), 0, 'commit buttons while the file has errors');
    // The preview marks the bad cells of the rows shown.
    assert((await page.locator('.preview td.bad').count()) >= 6, 'fewer than 6 marked cells in the preview');
  });
  await shot(page, 'data-desk-import-errors-1280');

  if (messyShown) {
    await check('the corrected file has no problems and names the row already stored', async () => {
      await page.getByRole('button', { name: 'Import another file' }).click();
      await page.getByLabel('Choose a CSV or XLSX file to import').setInputFiles(fixedFile);
      await page.getByText('No problems found: every row can be written.').waitFor({ timeout: 30_000 });
      await page.getByText('7 rows to write').waitFor();
      await page.getByRole('radio', { name: 'Update them with the file’s values' }).check();
    });
    await check('the commit runs with a progress bar to 100 % and reports what it wrote', async () => {
      await page.getByRole('button', { name: 'Commit 7 rows' }).click();
      await page.getByRole('progressbar', { name: 'Commit progress' }).waitFor();
      await page.getByText(/Committed .*: 6 added, 1 updated, 0 skipped\./).waitFor({ timeout: 30_000 });
      assertEqual(await page.getByRole('progressbar', { name: 'Commit progress' }).getAttribute('aria-valuenow'), '100', 'progress bar value');
      await page.getByText('7 of 7 rows written (100%)').waitFor();
      await page.getByRole('table', { name: 'Recent imports' }).getByText('grain-desk-prices-fixed.csv').waitFor();
    });
    await shot(page, 'data-desk-import-committed-1280');
  }

  let before = '';
  const chartDrawn = await check('the prices page draws the series of several items as SVG', async () => {
    await page.getByRole('link', { name: 'Open prices' }).click();
    await page.waitForURL(/\/prices$/);
    before = await waitForChart(page);
    const legend = await page.locator('np-price-chart svg text').allTextContents();
    for (const name of ['Wheat', 'Canola (rapeseed)', 'Nitrogen (N)']) assert(legend.includes(name), `legend lacks ${name}: ${legend.join(', ')}`);
    assert(legend.includes('EUR/t') && legend.includes('EUR/kg N'), 'the panels do not name their units');
  });

  const row = page.locator(PRICE_ROWS).first();
  const priceCell = row.locator('[col-id="price"]');
  await check('the grid finds the imported price, with its unit, currency, source and date', async () => {
    await page.getByLabel('Search prices').fill('Wheat Larkfield 2024-08-15');
    await shownPriceRows(page, 1);
    assertEqual((await priceCell.innerText()).trim(), '228.40', 'price');
    assertEqual((await row.locator('[col-id="per"]').innerText()).trim(), 'EUR/t', 'unit and currency');
    assertEqual((await row.locator('[col-id="source"]').innerText()).trim(), 'Flow check bid sheet', 'source');
    assertEqual((await row.locator('[col-id="observedOn"]').innerText()).trim(), '2024-08-15', 'date');
  });

  await check('a price of 0 or less is refused in the cell, in words', async () => {
    await priceCell.dblclick();
    const editor = priceCell.locator('input');
    await editor.fill('-5');
    await editor.press('Enter');
    await page.getByRole('status').getByText('A price must be more than 0').waitFor();
    assertEqual(await editor.count(), 1, 'the editor stays open on a refused value');
    await editor.press('Escape');
    // The grid puts the cell back asynchronously after the editor closes.
    for (let i = 0; i < 50 && (await priceCell.innerText()).trim() !== '228.40'; i++) await page.waitForTimeout(100);
    assertEqual((await priceCell.innerText()).trim(), '228.40', 'price after Escape');
  });

  /** A screenshot at 1280 px and one at 390 px (a phone), of the page as it is now. */
  const shotBoth = async (name: string) => {
    const size = page.viewportSize();
    await shot(page, `${name}-1280`);
    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(400);
    await shot(page, `${name}-390`);
    if (size) await page.setViewportSize(size);
    await page.waitForTimeout(400);
  };

  await check('issue 15: a decimal comma (204,5) and a letter O (2O4.5) are refused in the cell, naming the value, never read as 2045 or 245', async () => {
    for (const [typed, words] of [
      ['204,5', '"204,5" is written with a decimal comma'],
      ['2O4.5', '"2O4.5" is not a number: it has the letter "O" in it'],
    ] as const) {
      await priceCell.dblclick();
      const editor = priceCell.locator('input');
      await editor.fill(typed);
      await editor.press('Enter');
      await page.getByRole('status').getByText(words).waitFor();
      assertEqual(await editor.count(), 1, `the editor stays open on ${typed}`);
      if (typed === '204,5') await shotBoth('data-desk-prices-refused');
      await editor.press('Escape');
      for (let i = 0; i < 50 && (await priceCell.innerText()).trim() !== '228.40'; i++) await page.waitForTimeout(100);
      assertEqual((await priceCell.innerText()).trim(), '228.40', `price after ${typed} and Escape`);
    }
  });

  await check('issue 15: a price far from its history (22.84 for 228.40, a slipped decimal mark) asks before saving', async () => {
    await priceCell.dblclick();
    const editor = priceCell.locator('input');
    await editor.fill('22.84');
    await editor.press('Enter');
    const dialog = page.getByRole('dialog');
    await dialog.getByRole('heading', { name: 'Is this price right?' }).waitFor();
    await dialog.getByText('is the decimal mark in the right place?').waitFor();
    await page.waitForTimeout(600); // the dialog's opening animation
    await shotBoth('data-desk-prices-plausibility');
    await dialog.getByRole('button', { name: 'Go back' }).click();
    for (let i = 0; i < 50 && (await priceCell.innerText()).trim() !== '228.40'; i++) await page.waitForTimeout(100);
    assertEqual((await priceCell.innerText()).trim(), '228.40', 'price after going back');
    const stored = (await page.evaluate(() => fetch('/api/prices?items=1').then((r) => r.json()))) as { observedOn: string; deliveryPoint: string; price: number }[];
    assert(!stored.some((p) => p.price === 22.84), 'the doubted price was stored');
  });

  await check('a price edited in the grid is saved and the chart redraws', async () => {
    await priceCell.dblclick();
    const editor = priceCell.locator('input');
    await editor.fill('320');
    await editor.press('Enter');
    await page.getByText('Saved: Wheat, 2024/25, Larkfield terminal, 2024-08-15, price 320.00 EUR/t (was 228.40).').waitFor();
    assertEqual((await priceCell.innerText()).trim(), '320.00', 'price after saving');
    if (chartDrawn) {
      await page.waitForFunction(
        (old) => [...document.querySelectorAll('np-price-chart svg path')].map((p) => p.getAttribute('d') ?? '').join('|') !== old,
        before,
        { timeout: 15_000 },
      );
      assert((await chartPaths(page)) !== before, 'the chart did not change');
    }
    // The server keeps the change, and the audit log has it with the old and new value.
    const stored = (await page.evaluate(() => fetch('/api/prices/series?items=1').then((r) => r.json()))) as { seasons: string[]; series: { values: (number | null)[] }[] };
    const mean = stored.series[0].values[stored.seasons.indexOf('2024/25')];
    assert(mean !== null && mean > 240, `the wheat mean of 2024/25 is ${mean}`);
  });
  await shot(page, 'data-desk-prices-edited-1280');

  await check('a pasted block lists its bad line, then adds all its rows at once', async () => {
    await page.getByLabel('Search prices').fill('');
    await page.getByRole('button', { name: 'Paste rows' }).click();
    const dialog = page.getByRole('dialog');
    const block = [
      'Item\tSeason\tDelivery point\tPrice\tSource\tObserved on',
      'Wheat\t2023/24\tMillbrook store\t205.4\tFlow paste check\t2023-11-02',
      'Wheat\t2023/24\tAshby elevator\t20x\tFlow paste check\t2023-11-02',
    ].join('\n');
    await dialog.getByLabel('Pasted cells').fill(block);
    await dialog.getByText('"20x" is not a number').waitFor();
    assert(await dialog.getByRole('button', { name: /^Add/ }).isDisabled(), 'Add is enabled with a bad line');
    await dialog.getByLabel('Pasted cells').fill(block.replace('20x', '207.9'));
    await dialog.getByRole('button', { name: 'Add 2 prices' }).click();
    await page.getByText('2 prices added.').waitFor();
    await page.getByLabel('Search prices').fill('Flow paste check');
    await shownPriceRows(page, 2);
  });

  await check('the two pasted rows are chosen and deleted together, after a confirmation', async () => {
    const boxes = page.locator(`${PRICE_ROWS} .ag-selection-checkbox input`);
    await boxes.nth(0).check();
    await boxes.nth(1).check();
    await page.getByRole('button', { name: 'Delete 2 selected' }).click();
    await page.getByRole('dialog').getByRole('button', { name: 'Delete 2 prices' }).click();
    await page.getByText('2 prices deleted.').waitFor();
    await shownPriceRows(page, 0);
    await page.getByLabel('Search prices').fill('');
  });

  await check('the prices download as CSV in the import’s own columns, the edit included', async () => {
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'CSV', exact: true }).click()]);
    const path = await download.path();
    const lines = readFileSync(path, 'utf8').replace(/^\uFEFF/, '').trim().split(/\r?\n/);
    assertEqual(lines[0], HEADER, 'header line');
    assert(lines.some((l) => l.startsWith('wheat,2024/25,Larkfield terminal,320,t,EUR,Flow check bid sheet,2024-08-15')), 'the edited price is not in the file');
    assert(download.suggestedFilename().endsWith('.csv'), `file name ${download.suggestedFilename()}`);
  });

  await check('the audit log shows the edit as old value → new value, filtered to prices', async () => {
    await page.getByRole('link', { name: 'Change history' }).click();
    await page.waitForURL(/\/admin\/audit\?entity=price$/);
    const first = page.getByRole('table', { name: 'Audit log' }).locator('tr.mat-mdc-row').filter({ hasText: /changed/ }).filter({ hasText: '228.4' }).first();
    await first.waitFor();
    assert((await first.innerText()).includes('228.4') && (await first.innerText()).includes('320'), `audit row: ${await first.innerText()}`);
  });

  await check('reference data opens as tabs; a season form explains what is missing', async () => {
    await page.goto(`${base}/reference?tab=seasons`);
    await page.getByRole('tab', { name: 'Seasons', selected: true }).waitFor();
    await page.locator('ag-grid-angular[aria-label="Seasons"]').getByText('2024/25', { exact: true }).waitFor();
    await page.getByRole('button', { name: 'Add a season' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Label').fill('');
    await dialog.getByRole('button', { name: 'Add season' }).click();
    await dialog.getByText('Enter a label such as 2024/25').waitFor();
    await shotBoth('data-desk-season-dialog-error');
    await dialog.getByRole('button', { name: 'Cancel' }).click();
  });
  await shot(page, 'data-desk-reference-1280');

  await check('a stored price index is corrected in its dialog and saved', async () => {
    await page.getByRole('tab', { name: 'Price indexes' }).click();
    const grid = page.locator('ag-grid-angular[aria-label="Price indexes"]');
    await grid.getByText('Consumer prices (demo)').click();
    await page.getByRole('button', { name: 'Edit', exact: true }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByRole('heading', { name: 'Correct the price index Consumer prices (demo)' }).waitFor();
    assert((await dialog.getByLabel(/^Values/).inputValue()).split('\n').length === 20, 'the stored values are not filled in');
    await dialog.getByLabel('Source').fill('Invented for the demo co-op (revised)');
    await dialog.getByRole('button', { name: 'Save index' }).click();
    await page.getByText('Consumer prices (demo) saved with 20 seasons').waitFor();
    await grid.getByText('Invented for the demo co-op (revised)').waitFor();
  });

  await check('a farm opens on its records per season, with land, outputs and inputs in their units', async () => {
    await page.goto(`${base}/farms`);
    await page.locator('.ag-row [col-id="code"] a').first().click();
    await page.waitForURL(/\/farms\/\d+$/);
    const grid = page.locator('ag-grid-angular[aria-label^="Records of "]');
    await grid.getByText('Land (ha)').waitFor();
    await grid.getByText('Wheat (t)').waitFor();
    await grid.getByText('Nitrogen (N) (kg N)').waitFor();
    await page.getByText('fertiliser rates follow soil tests').waitFor();
  });
  await check('a farm record is edited in place; land of 0 ha is refused', async () => {
    const grid = page.locator('ag-grid-angular[aria-label^="Records of "]');
    const newest = grid.locator('.ag-row[row-index="0"]');
    const season = (await newest.locator('[col-id="season"]').first().innerText()).trim();
    const land = newest.locator('[col-id="landHa"]');
    await land.dblclick();
    await land.locator('input').fill('0');
    await land.locator('input').press('Enter');
    await page.getByRole('status').getByText(`${season}: Land must be more than 0 ha`).waitFor();
    await land.locator('input').press('Escape');
    const wheat = newest.locator('[col-id="i1"]');
    await wheat.dblclick();
    await wheat.locator('input').fill('1200.5');
    await wheat.locator('input').press('Enter');
    await page.getByText(`Saved: Wheat in ${season} is 1,200.5 t.`).waitFor();
    const farmId = Number(new URL(page.url()).pathname.split('/').pop());
    const stored = (await page.evaluate((id) => fetch(`/api/records?farms=${id}`).then((r) => r.json()), farmId)) as { season: string; itemCode: string; quantity: number }[];
    assertEqual(stored.find((r) => r.season === season && r.itemCode === 'wheat')?.quantity, 1200.5, 'stored wheat quantity');
  });
  await check('another fixed factor gets a column of its own, and a value typed in it is stored', async () => {
    await page.getByLabel('Another fixed factor').fill('Irrigated area');
    await page.getByRole('button', { name: 'Add column' }).click();
    await page.getByText('Use lower-case letters, digits and _').waitFor();
    await page.getByLabel('Another fixed factor').fill('irrigated_ha');
    await page.getByRole('button', { name: 'Add column' }).click();
    const grid = page.locator('ag-grid-angular[aria-label^="Records of "]');
    await grid.getByText('Other fixed factors').waitFor();
    const newest = grid.locator('.ag-row[row-index="0"]');
    const season = (await newest.locator('[col-id="season"]').first().innerText()).trim();
    const cell = newest.locator('[col-id="fx_irrigated_ha"]');
    await cell.dblclick();
    await cell.locator('input').fill('42.5');
    await cell.locator('input').press('Enter');
    await page.getByText(`Saved: irrigated_ha in ${season} is 42.5.`).waitFor();
    const farmId = Number(new URL(page.url()).pathname.split('/').pop());
    const stored = (await page.evaluate((id) => fetch(`/api/records/factors?farms=${id}`).then((r) => r.json()), farmId)) as { season: string; factor: string; value: number }[];
    assertEqual(stored.find((r) => r.season === season && r.factor === 'irrigated_ha')?.value, 42.5, 'stored irrigated area');
    // The wheat edited before still shows its new value after the grid was rebuilt with the new column.
    await newest.locator('[col-id="i1"]').getByText('1,200.5').waitFor();
  });
  await shot(page, 'data-desk-farm-records-1280');

  await page.setViewportSize({ width: 375, height: 780 });
  await check('the prices page fits a 375 px screen', async () => {
    await page.goto(`${base}/prices`);
    await page.getByRole('heading', { level: 1, name: 'Prices' }).waitFor();
    await page.locator('np-price-chart svg').waitFor({ state: 'attached', timeout: 30_000 });
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    assert(overflow <= 0, `the page is ${overflow}px wider than the screen`);
  });
  await shot(page, 'data-desk-prices-375');
  await page.setViewportSize({ width: 1280, height: 860 });
  await check('the planner signs out of the data desk', () => signOut(page));
}

async function treasurer(base: string, page: Page): Promise<void> {
  await check('the treasurer reads prices without any edit affordance', async () => {
    await page.goto(`${base}/prices`);
    await page.getByText('Read only: planners keep the prices.').waitFor();
    for (const name of ['Add a price', 'Paste rows']) assertEqual(await page.getByRole('button', { name }).count(), 0, `"${name}" buttons`);
    const cell = page.locator(PRICE_ROWS).first().locator('[col-id="price"]');
    await cell.dblclick();
    assertEqual(await cell.locator('input').count(), 0, 'editors opened for the treasurer');
    assertEqual(await page.locator('.ag-selection-checkbox').count(), 0, 'row selection boxes');
  });
  await check('the treasurer has no Imports page and reads reference data only', async () => {
    assert(!(await navHrefs(page)).includes('/imports'), 'Imports is in the treasurer’s navigation');
    await page.goto(`${base}/reference`);
    await page.getByText('Read only: planners keep the reference data.').waitFor();
    assertEqual(await page.getByRole('button', { name: 'Add an item' }).count(), 0, '"Add an item" buttons');
  });
  await check('the treasurer signs out', () => signOut(page));
}
