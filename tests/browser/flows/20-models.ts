import type { Page, Response } from 'playwright-core';
import type { Harness } from '../harness.js';
import { assert, assertEqual, check, mainNav, shot, shotPath, signIn, signOut } from '../harness.js';

/** A fit takes seconds on the demo co-op, longer while other fits share the two cores. */
const RUN_TIMEOUT_MS = 180_000;

interface StatusAnswer {
  id: number;
  status: string;
  progress: number;
  stage: string;
}

interface RunJson {
  id: number;
  dataHash: string;
  createdByName: string | null;
  result: {
    summary: { items: { name: string }[]; elasticities: number[][] };
    fit: { equations: { coefficients: unknown[] }[] };
    spec?: string;
    forecast?: { fit: { equations: { coefficients: unknown[] }[] } } | null;
    forecastElasticities?: { elasticities: number[][] } | null;
  };
}

/** The same rounding the page uses for quantities (model-format.ts formatAmount), for comparing cells. */
function amount(v: number): string {
  const a = Math.abs(v);
  const digits = a >= 1000 ? 0 : a >= 10 ? 1 : 2;
  return new Intl.NumberFormat('en', { minimumFractionDigits: digits, maximumFractionDigits: digits }).format(v).replace('-', '−');
}

async function defineModel(
  page: Page,
  base: string,
  name: string,
  change: (page: Page) => Promise<void>,
): Promise<number> {
  await page.goto(`${base}/models`);
  await page.getByRole('button', { name: 'Define a model' }).click();
  const form = page.getByRole('form', { name: 'Define a model' });
  await form.getByRole('checkbox', { name: /Hired labour/ }).waitFor();
  await form.getByLabel('Model name').fill(name);
  await change(page);
  // The form's default back-test: the last 5 seasons, as the demo's own model (seed/demo-model.ts).
  assertEqual(await form.getByLabel('Seasons to back-test').inputValue(), '5', 'seasons to back-test');
  await form.getByRole('button', { name: 'Save and run' }).click();
  await page.waitForURL(/\/models\/\d+$/);
  return Number(new URL(page.url()).pathname.split('/').at(-1));
}

/** Issue 5: a planner defines, runs, reads and compares two models on the demo co-op. */
export default async function models({ base, page }: Harness): Promise<void> {
  const statuses: StatusAnswer[] = [];
  const onResponse = async (response: Response) => {
    // The run as the page started it (202) and every status poll after.
    const path = new URL(response.url()).pathname;
    const started = /\/api\/models\/\d+\/runs$/.test(path) && response.request().method() === 'POST';
    if ((started || /\/api\/model-runs\/\d+\/status$/.test(path)) && response.ok()) {
      // A poll answered while the page navigates away has no body left to read: skip that one.
      const answer = await response.json().catch(() => null);
      if (answer) statuses.push(answer as StatusAnswer);
    }
  };
  page.on('response', onResponse);

  const plannerIn = await check('the planner signs in for the model workspace', () => signIn(page, base, 'planner@example.org'));
  if (plannerIn) {
    await check('Models is in the navigation and opens the model list', async () => {
      await mainNav(page).getByRole('link', { name: 'Models' }).click();
      await page.waitForURL(/\/models$/);
      await page.getByRole('heading', { level: 1, name: 'Models' }).waitFor();
      assertEqual(await page.title(), 'Models · Netput', 'page title');
    });

    let modelA = 0;
    const definedA = await check('the planner defines model A (all 7 items, NQ, labour numeraire, land + trend) and runs it', async () => {
      modelA = await defineModel(page, base, 'A · all items, NQ, land + trend', async (p) => {
        const form = p.getByRole('form', { name: 'Define a model' });
        assertEqual(await form.getByRole('checkbox').and(form.locator(':checked')).count(), 9, 'checked boxes (7 items, land and trend)');
        assert((await form.getByRole('combobox', { name: 'Numeraire' }).innerText()).includes('Hired labour'), 'the numeraire is not hired labour');
        assert(await form.getByRole('radio', { name: /Normalised quadratic/ }).isChecked(), 'NQ is not the form');
        assert(await form.getByRole('checkbox', { name: /Linear trend/ }).isChecked(), 'the trend is off');
        // With land chosen, farms are forecast per hectare with farm and season effects unless the planner says otherwise.
        assert(await form.getByRole('radio', { name: /Per hectare, with farm and season effects/ }).isChecked(), 'the per-hectare form is not the default');
      });
      await page.getByRole('heading', { level: 1, name: 'A · all items, NQ, land + trend' }).waitFor();
      await page.getByText('Per hectare, with farm and season effects', { exact: true }).waitFor();
    });

    await check("the page shows A's run waiting or running, with its progress", async () => {
      await page.getByRole('progressbar', { name: /^Progress of run \d+$/ }).first().waitFor({ timeout: 30_000 });
      await page.locator('.stage').first().waitFor();
      await shot(page, 'models-run-progress-1280');
    });

    let modelB = 0;
    const definedB = await check('the planner defines model B (five items, generalised Leontief, no trend) and runs it', async () => {
      modelB = await defineModel(page, base, 'B · five items, GL, land, no trend', async (p) => {
        const form = p.getByRole('form', { name: 'Define a model' });
        await form.getByRole('checkbox', { name: /Phosphate/ }).uncheck();
        await form.getByRole('checkbox', { name: /Potash/ }).uncheck();
        await form.getByRole('radio', { name: /Generalised Leontief/ }).check();
        await form.getByRole('checkbox', { name: /Linear trend/ }).uncheck();
      });
      await page.getByRole('heading', { level: 1, name: 'B · five items, GL, land, no trend' }).waitFor();
    });

    await check('both runs finish, and the polled status went from waiting or running to done, its progress never falling', async () => {
      await page.getByRole('link', { name: 'Open result' }).first().waitFor({ timeout: RUN_TIMEOUT_MS });
      await page.goto(`${base}/models/${modelA}`);
      await page.getByRole('link', { name: 'Open result' }).first().waitFor({ timeout: RUN_TIMEOUT_MS });
      // A fit of the demo co-op takes well under a second here, so a poll may land before it starts
      // (queued) and the next after it ends: either unfinished state shows the page followed it.
      const unfinished = statuses.filter((s) => s.status === 'running' || s.status === 'queued');
      assert(unfinished.length > 0, `no poll answered "queued" or "running" (saw ${[...new Set(statuses.map((s) => s.status))].join(', ')})`);
      assert(statuses.some((s) => s.status === 'succeeded' && s.progress === 1), 'no poll answered "succeeded" at 100 %');
      const progressOfA = statuses.filter((s) => s.id === statuses[0]!.id).map((s) => s.progress);
      assert(progressOfA.every((v, i) => i === 0 || v >= progressOfA[i - 1]!), `progress went backwards: ${progressOfA.join(', ')}`);
    });

    const runIdOf = async (modelId: number) => {
      const model = (await page.evaluate((id) => fetch(`/api/models/${id}`).then((r) => r.json()), modelId)) as { runs: { id: number; status: string }[] };
      const run = model.runs.find((r) => r.status === 'succeeded');
      assert(run, `model ${modelId} has no finished run`);
      return run.id;
    };

    let runA = 0;
    let runB = 0;
    if (definedA && definedB) {
      await check("A's result page shows the elasticity table, the plain-language reading and drawn charts", async () => {
        runA = await runIdOf(modelA);
        runB = await runIdOf(modelB);
        await page.goto(`${base}/models/${modelA}`);
        await page.getByRole('link', { name: 'Open result' }).first().click();
        await page.waitForURL(new RegExp(`/models/runs/${runA}$`));
        const run = (await page.evaluate((id) => fetch(`/api/model-runs/${id}`).then((r) => r.json()), runA)) as RunJson;
        const { items } = run.result.summary;
        // A per-hectare run (the default with land) reads and tabulates its per-hectare model's elasticities.
        const perHa = run.result.spec === 'per-hectare' && !!run.result.forecastElasticities;
        const elasticities = perHa ? run.result.forecastElasticities!.elasticities : run.result.summary.elasticities;
        const n = items.findIndex((i) => i.name === 'nitrogen');

        const table = page.getByRole('table', { name: 'Short-run price elasticities (land fixed)' });
        await table.waitFor();
        assertEqual(await table.locator('tbody tr').count(), 7, 'elasticity rows');
        assertEqual(await table.locator('tbody td').count(), 49, 'elasticity cells');
        const ownN = table.locator('tbody tr').nth(n).locator('td').nth(n);
        assertEqual((await ownN.locator('.value').innerText()).trim(), elasticities[n]![n]!.toFixed(2).replace('-', '−'), 'nitrogen own-price cell');
        const background = await ownN.evaluate((el) => getComputedStyle(el).backgroundColor);
        assert(background !== 'rgba(0, 0, 0, 0)' && background !== 'rgb(255, 255, 255)', `the nitrogen cell is not coloured (${background})`);

        // The sentence for the nitrogen price, with the size the API's elasticity gives (10 × e, rounded).
        const pct = Math.abs(10 * elasticities[n]![n]!);
        const size = pct >= 0.95 ? `${Math.round(pct)} %` : `${pct.toFixed(1)} %`;
        const reading = page.getByRole('list', { name: 'What the model says' }).getByText(/rise in the price of nitrogen \(N\)/);
        const sentence = await reading.innerText();
        assert(
          sentence.startsWith(`In this model a 10 % rise in the price of nitrogen (N) lowers nitrogen (N) use by about ${size}`),
          `unexpected reading: ${sentence}`,
        );
        assert(/wheat supply by about/.test(sentence), `the reading does not say what happens to wheat: ${sentence}`);
        await page.getByText('These are estimates from past behaviour').waitFor();
        await page.getByText('not a forecast of what members will do', { exact: false }).first().waitFor();

        for (const id of ['fitted', 'residuals', 'response', 'backtest']) {
          const paths = page.locator(`#${id} .chart svg path`);
          await paths.first().waitFor({ state: 'attached' });
          assert((await paths.count()) > 3, `the ${id} chart has no drawn SVG paths`);
        }
      });

      await check("the result page shows the run's provenance: short data hash, options, software, sample and who started it", async () => {
        const run = (await page.evaluate((id) => fetch(`/api/model-runs/${id}`).then((r) => r.json()), runA)) as RunJson;
        const provenance = page.locator('np-run-provenance');
        await provenance.getByText(run.dataHash.slice(0, 12), { exact: true }).waitFor();
        await provenance.getByText(/Netput \d+\.\d+\.\d+/).waitFor();
        await provenance.getByText(/20 seasons \(2006\/07 – 2025\/26\), 20 farms, 400 farm-seasons/).waitFor();
        assertEqual(run.createdByName, 'Priya Planner', 'createdByName from the API');
        await provenance.getByText('Started by Priya Planner', { exact: false }).waitFor();
        // One sheet per netput equation, each coefficient in plain words with its 95 % range; no program's labels.
        // A per-hectare run shows its per-hectare profit function, in units per ha.
        await page.locator('#coefficients .sheet').first().waitFor();
        const perHa = run.result.spec === 'per-hectare' && !!run.result.forecast;
        const shown = perHa ? run.result.forecast!.fit : run.result.fit;
        assertEqual(await page.locator('#coefficients .sheet').count(), shown.equations.length, 'coefficient sheets (one per equation)');
        const lines = await page.locator('#coefficients li.line:not(.head)').count();
        assertEqual(lines, shown.equations.reduce((n, e) => n + e.coefficients.length, 0), 'coefficient lines');
        await page.locator('#coefficients').getByText(perHa ? 'Base level per hectare, before prices and trend' : 'Base level, before prices, land and trend').first().waitFor();
        if (perHa) await page.locator('#coefficients h3').getByText('kg N per ha').first().waitFor();
        const coefText = await page.locator('#coefficients').innerText();
        for (const stock of ['(Intercept)', 't value', 'Std. error']) assert(!coefText.includes(stock), `the coefficients still say "${stock}"`);
        await page.getByRole('table', { name: 'Wrong-signed fitted quantities by item' }).waitFor();
      });
      await shot(page, 'models-result-1280');

      await check("the back-test says in words how much closer A came than the plain rules and how often its bands held, with a row per item", async () => {
        const run = (await page.evaluate((id) => fetch(`/api/model-runs/${id}`).then((r) => r.json()), runA)) as {
          result: { skill: { items: { item: string; beatsRule: boolean; coverage: { coop: { held: number; total: number } } }[] } };
        };
        const section = page.locator('#backtest');
        const lead = section.locator('np-skill-section p.lead');
        await lead.waitFor();
        const text = await lead.innerText();
        assert(/farm projections were \d+ % (closer|further off) than last season’s figures/.test(text), `no comparison with last season's figures: ${text}`);
        assert(/the farm’s own average per hectare times its land/.test(text), `no comparison with the per-hectare rule: ${text}`);
        const coop = run.result.skill.items.reduce((a, it) => [a[0]! + it.coverage.coop.held, a[1]! + it.coverage.coop.total], [0, 0]);
        assert(text.includes(`${coop[0]} of ${coop[1]} co-op totals`), `the co-op coverage is not ${coop[0]} of ${coop[1]}: ${text}`);
        const table = section.getByRole('region', { name: 'Back-test against the plain rules, per item' }).locator('table');
        assertEqual(await table.locator('tbody tr').count(), 7, 'back-test rows');
        await table.getByRole('columnheader', { name: 'Smallest third' }).waitFor();
        const weak = run.result.skill.items.filter((i) => !i.beatsRule).length;
        assertEqual(await section.getByText('Not better than a plain rule:').count(), weak ? 1 : 0, 'warning about weak items');
        // The section as a reader scrolls to it: its heading at the top of the screen, below the toolbar.
        const view = async (name: string) => {
          await page.locator('#bt-heading').evaluate((el) => el.scrollIntoView({ block: 'start' }));
          await page.evaluate(() => window.scrollBy(0, -80));
          await page.screenshot({ path: shotPath(name) });
        };
        await view('models-backtest-1280');
        await page.setViewportSize({ width: 390, height: 844 });
        await view('models-backtest-390');
        await page.setViewportSize({ width: 1280, height: 860 });
      });

      await check('the planner compares A and B side by side, with projections at the same prices', async () => {
        await page.getByRole('link', { name: 'Compare with…' }).click();
        await page.waitForURL(new RegExp(`/models/compare\\?a=${runA}$`));
        await page.getByRole('combobox', { name: 'Run B' }).click();
        await page.getByRole('option', { name: new RegExp(`^#${runB} · B · five items`) }).click();
        await page.waitForURL(new RegExp(`b=${runB}`));
        const stats = page.getByRole('table', { name: 'Fit statistics of run A and run B' });
        await stats.waitFor();
        await stats.getByRole('row', { name: /Functional form Normalised quadratic Generalised Leontief/ }).waitFor();
        // Both keep land, so both forecast per hectare; each says how it did against the plain rules.
        await stats.getByRole('row', { name: /Farms forecast Per hectare, with farm and season effects Per hectare, with farm and season effects/ }).waitFor();
        await stats.getByRole('row', { name: /Back-test against the plain rules beat the per-hectare rule for \d of 7 items.* beat the per-hectare rule for \d of 5 items/ }).waitFor();
        await page.getByRole('table', { name: 'A · run #' + runA }).waitFor();
        await page.getByRole('table', { name: 'B · run #' + runB }).waitFor();

        // Same prices for both: raise nitrogen to 2.00 and project again.
        const evaluated = Promise.all(
          [runA, runB].map((id) =>
            page.waitForResponse((r) => r.url().includes(`/api/model-runs/${id}/evaluate`) && /[=,]nitrogen=2(,|&|$)/.test(decodeURIComponent(r.url()))),
          ),
        );
        await page.getByLabel('Nitrogen (N)').fill('2');
        await page.getByRole('button', { name: 'Project both' }).click();
        const [ra, rb] = await evaluated;
        const evA = (await ra!.json()) as { items: { name: string }[]; point: { prices: number[] }; netputs: number[] };
        const evB = (await rb!.json()) as { items: { name: string }[]; point: { prices: number[] }; netputs: number[] };
        const iA = evA.items.findIndex((i) => i.name === 'nitrogen');
        const iB = evB.items.findIndex((i) => i.name === 'nitrogen');
        assertEqual(evA.point.prices[iA], 2, 'nitrogen price sent to A');
        assertEqual(evB.point.prices[iB], 2, 'nitrogen price sent to B');
        const projection = page.getByRole('table', { name: 'Projected quantities of run A and run B at the same prices' });
        await projection.waitFor();
        assertEqual((await projection.locator('td[data-item="nitrogen"][data-side="a"]').innerText()).trim(), amount(-evA.netputs[iA]!), 'A nitrogen use');
        assertEqual((await projection.locator('td[data-item="nitrogen"][data-side="b"]').innerText()).trim(), amount(-evB.netputs[iB]!), 'B nitrogen use');
        assertEqual((await projection.locator('td[data-item="phosphate"][data-side="b"]').innerText()).trim(), 'not in B', 'phosphate in B');
      });
      await shot(page, 'models-compare-1280');
    }
    await check('the planner signs out of the model workspace', () => signOut(page));

    if (runA) {
      const treasurerIn = await check('the treasurer signs in to read models', () => signIn(page, base, 'treasurer@example.org'));
      if (treasurerIn) {
        await check('the treasurer reads the models and a result but cannot define, run or repeat', async () => {
          await page.goto(`${base}/models`);
          await page.getByRole('table', { name: 'Models' }).getByRole('link', { name: 'A · all items, NQ, land + trend' }).waitFor();
          assertEqual(await page.getByRole('button', { name: 'Define a model' }).count(), 0, '"Define a model" buttons');
          await page.goto(`${base}/models/runs/${runA}`);
          await page.getByRole('table', { name: 'Short-run price elasticities (land fixed)' }).waitFor();
          assertEqual(await page.getByRole('button', { name: 'Run again' }).count(), 0, '"Run again" buttons');
        });
        await check('the treasurer signs out', () => signOut(page));
      }
    }
  }

  const memberIn = await check('the member signs in (models are not for members)', () => signIn(page, base, 'member@example.org'));
  if (memberIn) {
    await check('the member is turned away from the model workspace', async () => {
      await page.goto(`${base}/models`);
      await page.getByRole('heading', { name: 'Your role cannot open this page' }).waitFor();
    });
    await check('the member signs out', () => signOut(page));
  }
  page.off('response', onResponse);
  await page.setViewportSize({ width: 1280, height: 860 });
}
