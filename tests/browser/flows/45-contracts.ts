import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Locator, Page } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assert, check, shot, signIn, signOut, waitForDemoPrepared } from '../harness.js';

/** The evaluation runs 2,000 draws for each contracting farm in a worker thread. */
const EVALUATE_TIMEOUT_MS = 180_000;

async function bothWidths(page: Page, name: string, focus?: Locator): Promise<void> {
  await focus?.scrollIntoViewIfNeeded();
  await shot(page, `${name}-1280`);
  await page.setViewportSize({ width: 390, height: 844 });
  await page.waitForTimeout(300);
  await focus?.scrollIntoViewIfNeeded();
  await shot(page, `${name}-390`);
  await page.setViewportSize({ width: 1280, height: 860 });
}

/**
 * Issue 19: a planner records a delivery contract in the form and more from a file, evaluates the
 * season's contracts on the outlook and reads the margin per tonne; the treasurer compares the
 * contract-based demand with the outlook's in the budget and builds a budget on the contracted
 * output; a member reads their own contract.
 */
export default async function contracts({ base, page }: Harness): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'netput-contracts-'));
  const file = join(dir, 'contracts-2026.csv');
  writeFileSync(file, 'contract number,farm,season,item,quantity (t),price (EUR/t),first delivery month,last delivery month,status\nLG-2026-201,F06,2026/27,wheat,900,214.50,2026-08,2026-10,signed\nLG-2026-202,F08,2026/27,canola,250,455,2026-08,2026-09,offered\n');
  try {
    if (!(await check('the planner signs in', () => signIn(page, base, 'planner@example.org')))) return;
    await check('the demo is prepared', async () => {
      const said = await waitForDemoPrepared(page);
      assert(said === 'the demo is prepared', said);
    });

    await check('the planner records a contract in the form and finds it in the grid', async () => {
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Contracts' }).click();
      await page.waitForURL(/\/contracts$/);
      await page.getByRole('heading', { level: 1, name: 'Delivery contracts' }).waitFor();
      await page.getByRole('button', { name: 'Record a contract' }).click();
      const dialog = page.getByRole('dialog');
      await dialog.getByLabel('Contract number').fill('LG-2026-100');
      await dialog.getByRole('combobox', { name: 'Farm' }).click();
      await page.getByRole('option', { name: /^F04 · / }).click();
      await dialog.getByLabel('Quantity').fill('600');
      await dialog.getByLabel('Contract price').fill('205');
      await dialog.getByLabel('First delivery month').fill('2026-08');
      await dialog.getByLabel('Last delivery month').fill('2026-10');
      await dialog.getByRole('button', { name: 'Record contract' }).click();
      await page.getByText('Contract LG-2026-100 recorded: 600 t of wheat at 205.00 EUR/t').waitFor();
      await page.locator('ag-grid-angular[aria-label="Delivery contracts"]').getByText('LG-2026-100').waitFor();
    });
    await bothWidths(page, 'contracts-grid');

    await check('the planner imports two more from a CSV file and commits them', async () => {
      await page.getByRole('link', { name: 'Import from a file' }).click();
      await page.waitForURL(/\/imports\?kind=contracts$/);
      await page.getByLabel('Choose a CSV or XLSX file to import').setInputFiles(file);
      await page.getByText('No problems found: every row can be written.').waitFor({ timeout: 30_000 });
      await page.getByText('2 rows to write').waitFor();
      await page.getByRole('button', { name: 'Commit 2 rows' }).click();
      await page.getByText(/Committed .*: 2 added, 0 updated, 0 skipped\./).waitFor({ timeout: 30_000 });
      await page.getByRole('link', { name: 'Open contracts' }).click();
      await page.locator('ag-grid-angular[aria-label="Delivery contracts"]').getByText('LG-2026-201').waitFor();
    });

    await check('on the 2026/27 outlook the planner evaluates the contracts and reads the margin per tonne with its band', async () => {
      const outlooks = (await page.evaluate(() => fetch('/api/outlooks').then((r) => r.json()))) as { id: number; season: string }[];
      const o = outlooks.find((x) => x.season === '2026/27');
      assert(o, 'no 2026/27 outlook');
      await page.goto(`${base}/outlook/${o.id}`);
      const section = page.getByRole('region', { name: 'Contracted deliveries' });
      await section.waitFor();
      await section.getByRole('button', { name: /Evaluate (contracts|again)/ }).click();
      await section.getByRole('progressbar', { name: 'Progress of the contract evaluation' }).waitFor({ timeout: 10_000 }).catch(() => undefined);
      await section.getByRole('columnheader', { name: 'Margin per unit', exact: true }).waitFor({ timeout: EVALUATE_TIMEOUT_MS });
      await section.getByText('Up to date').waitFor();
      const wheat = section.getByRole('region', { name: 'Co-op margin per unit' }).getByRole('row', { name: /^Wheat/ });
      const text = await wheat.innerText();
      assert(/EUR\/t/.test(text), `the wheat row reads "${text}"`);
      await section.getByRole('region', { name: 'Contracts per farm' }).getByText('F04 · ').waitFor();
      await section.getByRole('region', { name: 'Input demand of the contracting farms' }).getByText('Nitrogen (N)').waitFor();
      await section.scrollIntoViewIfNeeded();
    });
    await bothWidths(page, 'contracts-outlook', page.getByRole('heading', { name: 'Contracted deliveries' }));
    await check('the planner signs out', () => signOut(page));

    if (await check('the treasurer signs in', () => signIn(page, base, 'treasurer@example.org'))) {
      await check('the treasurer compares the contract basis with the outlook basis in the budget', async () => {
        // A budget on the 2026/27 outlook (in the whole suite an earlier flow also budgets on a 2025/26 one).
        const chosen = await page.evaluate(async () => {
          const outlooks = (await fetch('/api/outlooks').then((r) => r.json())) as { id: number; season: string }[];
          const season = outlooks.find((x) => x.season === '2026/27');
          const list = (await fetch('/api/budgets').then((r) => r.json())) as { id: number }[];
          for (const b of list) {
            const full = (await fetch(`/api/budgets/${b.id}`).then((r) => r.json())) as { source?: { kind?: string; outlookId?: number } };
            if (full.source?.kind === 'outlook' && full.source.outlookId === season?.id) return b.id;
          }
          return list[0]?.id ?? null;
        });
        assert(chosen !== null, 'no budget');
        await page.goto(`${base}/budget/${chosen}`);
        const section = page.getByRole('region', { name: 'Contracts or outlook: which demand to budget on' });
        await section.waitFor({ timeout: 30_000 });
        // The section starts at the newest outlook; in the whole suite that is a later season's, so choose 2026/27.
        const pick = section.getByRole('combobox', { name: 'Season outlook' });
        await pick.waitFor({ timeout: 30_000 });
        if (!(await pick.innerText()).includes('2026/27')) {
          await pick.click();
          await page.getByRole('option', { name: /^2026\/27/ }).click();
        }
        const table = section.getByRole('region', { name: 'Demand on the two bases' });
        await table.waitFor({ timeout: 30_000 });
        await table.getByRole('row', { name: /^Nitrogen \(N\)/ }).waitFor();
        await section.scrollIntoViewIfNeeded();
      });
      await bothWidths(page, 'contracts-budget', page.getByRole('heading', { name: 'Contracts or outlook: which demand to budget on' }));

      let contractBudget = 0;
      await check('the treasurer builds a budget on the contracted output of 2026/27, saves it and reads the contract basis beside the outlook basis after a reload', async () => {
        await page.goto(`${base}/budget/new`);
        await page.getByRole('heading', { name: 'Nutrient demand and where it comes from' }).first().waitFor({ timeout: 30_000 });
        const contracted = page.getByRole('radio', { name: 'Contracted output' });
        // Enabled once the season outlooks have loaded.
        await page.waitForFunction(() => {
          const radio = [...document.querySelectorAll('input[type="radio"]')].find((r) => r.closest('mat-radio-button')?.textContent?.includes('Contracted output'));
          return radio instanceof HTMLInputElement && !radio.disabled;
        });
        const outlooks = (await page.evaluate(() => fetch('/api/outlooks').then((r) => r.json()))) as { id: number; season: string }[];
        const season = outlooks.find((x) => x.season === '2026/27');
        assert(season, 'no 2026/27 outlook');
        // The preview of this very source (an earlier one may be of another outlook, before the choice below).
        const preview = page.waitForResponse((r) => {
          if (new URL(r.url()).pathname !== '/api/budgets/preview' || r.request().method() !== 'POST') return false;
          const source = (JSON.parse(r.request().postData() ?? '{}') as { source?: { kind?: string; outlookId?: number } }).source;
          return source?.kind === 'contracted' && source.outlookId === season.id;
        }, { timeout: 60_000 });
        await contracted.click();
        // The demand source's own outlook choice (the basis comparison further down has one too).
        await page.locator('np-budget-source-section').getByRole('combobox', { name: 'Season outlook' }).click();
        await page.getByRole('option', { name: /2026\/27/ }).click();
        const answer = await preview;
        assert(answer.ok(), `the preview answered ${answer.status()}: ${(await answer.text()).slice(0, 300)}`);
        const saved = page.waitForResponse((r) => new URL(r.url()).pathname === '/api/budgets' && r.request().method() === 'POST', { timeout: 60_000 });
        await page.getByRole('button', { name: 'Save budget' }).click();
        const created = await saved;
        assert(created.status() === 201, `POST /api/budgets answered ${created.status()}: ${(await created.text()).slice(0, 300)}`);
        contractBudget = ((await created.json()) as { id: number }).id;
        await page.waitForURL(new RegExp(`/budget/${contractBudget}$`));
        await page.reload();
        const facts = page.locator('np-demand-summary dl.facts');
        const from = facts.locator('dt', { hasText: /^Demand from$/ }).locator('xpath=following-sibling::dd[1]');
        await from.waitFor({ timeout: 30_000 });
        const fromText = (await from.innerText()).replace(/\s+/g, ' ').trim();
        const farms = /^Contracted output, season 2026\/27: (\d+) contracting farms? at their signed tonnage \(conditional demand\), every other farm as the outlook projects it/.exec(fromText);
        assert(farms && Number(farms[1]) >= 1, `"Demand from" reads "${fromText}"`);
        const basis = (await facts.locator('dt', { hasText: /^Outlook basis$/ }).locator('xpath=following-sibling::dd[1]').innerText()).replace(/\s+/g, ' ').trim();
        const outlook = /^N ([\d,.]+) kg N · P2O5 ([\d,.]+) kg P2O5 · K2O ([\d,.]+) kg K2O \(every farm's output free, for comparison\)$/.exec(basis);
        assert(outlook && outlook.slice(1).every((v) => Number(v.replaceAll(',', '')) > 0), `"Outlook basis" reads "${basis}"`);
        const demand = page.getByRole('table', { name: 'Base nutrient demand' });
        for (const label of ['N', 'P2O5', 'K2O']) {
          const cell = (await demand.getByRole('row').filter({ has: page.getByRole('rowheader', { name: label, exact: true }) }).locator('td').first().innerText()).trim();
          assert(new RegExp(`^[\\d,.]+ kg ${label}$`).test(cell) && Number(cell.split(' ')[0]!.replaceAll(',', '')) > 0, `base ${label} demand reads "${cell}"`);
        }
      });
      if (contractBudget > 0) {
        const heading = page.getByRole('heading', { name: 'Nutrient demand and where it comes from' }).first();
        await heading.evaluate((el) => el.scrollIntoView({ block: 'start' }));
        await shot(page, 'contracts-budget-contracted-1280');
        await page.setViewportSize({ width: 390, height: 844 });
        await page.waitForTimeout(800);
        await heading.evaluate((el) => el.scrollIntoView({ block: 'start' }));
        await shot(page, 'contracts-budget-contracted-390');
        await page.setViewportSize({ width: 1280, height: 860 });

        await check('on the contract basis an N +20 % scenario lowers the nitrogen tonnage, and the page says output is held at the contracted tonnage', async () => {
          const preview = page.waitForResponse((r) => new URL(r.url()).pathname === '/api/budgets/preview' && r.request().method() === 'POST', { timeout: 60_000 });
          await page.getByRole('button', { name: 'N +20 %' }).click();
          const answer = await preview;
          assert(answer.ok(), `the preview answered ${answer.status()}`);
          const { result } = (await answer.json()) as { result: { demand: { elasticitySource: string }; scenarios: { name: string; demand: { nitrogen: number; phosphate: number } }[] } };
          assert(result.demand.elasticitySource === 'contracts', `elasticities from ${result.demand.elasticitySource}`);
          const up = result.scenarios.find((x) => x.name === 'N +20 %');
          assert(up && up.demand.nitrogen < result.scenarios[0]!.demand.nitrogen, 'the contract-basis nitrogen did not fall with its price');
          const section = page.locator('np-budget-scenarios-section');
          await section.getByText(/On a contract basis the contracting farms' output is held at the contracted tonnage, so only their input mix responds/).waitFor();
          await page.getByRole('columnheader', { name: 'N +20 %' }).waitFor({ timeout: 60_000 });
          await page.locator('np-demand-summary').getByText(/with the contracted output held at its tonnage/).waitFor();
        });
        await bothWidths(page, 'contracts-budget-scenario', page.getByRole('heading', { name: 'Price scenarios side by side' }));
      }
      await check('the treasurer signs out', () => signOut(page));
    }

    if (await check('the member signs in', () => signIn(page, base, 'member@example.org'))) {
      await check("the member reads their own contract with the estimated marginal cost and the fertiliser need, and the caution", async () => {
        await page.goto(`${base}/my-farm/outlook`);
        const section = page.getByRole('region', { name: 'Your delivery contracts' });
        await section.waitFor({ timeout: 30_000 });
        await section.getByText(/Your contract LG-2026-\d+: [\d,]+ t of wheat at [\d.,]+ EUR\/t; estimated marginal cost at that tonnage [\d,]+ EUR\/t \(likely range/).waitFor();
        await section.getByText(/your farm needs about .* N/).waitFor();
        await section.getByText(/not financial advice/).waitFor();
        assert((await section.getByText('LG-2026-100').count()) === 0, 'the member sees another farm’s contract');
        await section.scrollIntoViewIfNeeded();
      });
      await bothWidths(page, 'contracts-member', page.getByRole('heading', { name: 'Your delivery contracts' }));
      await check('the member signs out', () => signOut(page));
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
