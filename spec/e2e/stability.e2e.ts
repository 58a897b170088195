import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';
import { closedTender } from './support/closed-tender';

/**
 * How stable an award is, on the run page of a closed tender of this file's own (two demo vendors),
 * so that what other browser tests do to the demo's tenders changes nothing here: the status in
 * the buyer's words with the engine's figures in a collapsed panel, and the forecast check with
 * its chart, its table and its summary, for all regions and for one region alone.
 */
jest.setTimeout(240_000);
const TENDER = 'NHP-2026-047';

let b: Awaited<ReturnType<typeof openBrowser>>;
let tenderId: string;

beforeAll(async () => {
  // Depots S1–S3: 1,000 + 2,000 + 3,000 = 6,000 t. Glenmoor (vendor2): fee €500, €10/t, cap 6,300 t;
  // vendor4: fee €800, €12/t, no cap. Glenmoor alone up to 6,300 t: −20 % (4,800 t) to 0 %; at +10 %
  // (6,600 t) the cap leaves 300 t to vendor4. Depot S3 alone: +10 % is 6,300 t (same), +20 % 6,600 t.
  const regions = ['S1', 'S2', 'S3'].map((code, i) => ({ code, name: `Depot ${code}`, forecast: 1000 * (i + 1) }));
  tenderId = await closedTender({
    reference: TENDER, title: 'Salt for the southern depots, late winter', regions,
    bids: [
      { vendor: 'vendor2@demo.tendara.test', fixedFee: 500, capacity: 6300, prices: { S1: 10, S2: 10, S3: 10 } },
      { vendor: 'vendor4@demo.tendara.test', fixedFee: 800, capacity: null, prices: { S1: 12, S2: 12, S3: 12 } },
    ],
  });
  b = await openBrowser();
});
afterAll(() => b.close());

test('the run page says "Best possible award (proven)", keeps the engine figures in a collapsed panel, and the forecast check shows where the same vendors win, as a chart and a table', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await page.goto(`${baseUrl()}/tenders/${tenderId}/evaluation`);
  await page.getByRole('heading', { name: 'Award scenarios', level: 1 }).waitFor();
  await page.getByRole('button', { name: 'Run Published award basis', exact: true }).click();
  await page.waitForURL(/\/evaluation\/runs\/[0-9a-f-]+$/);
  await page.locator('.run-status .badge').filter({ hasText: 'Best possible award (proven)' }).waitFor({ timeout: 150_000 });
  await page.locator('.plain-status').filter({ hasText: 'No cheaper award meets every rule: the engine proved it.' }).waitFor();
  // The engine's words only inside the collapsed panel.
  const engine = page.locator('app-engine-details mat-expansion-panel');
  await expect(engine.getAttribute('class')).resolves.not.toContain('mat-expanded');
  await expect(page.locator('.state').getByText('Best bound').isVisible()).resolves.toBe(false);

  const section = page.locator('app-sensitivity-panel');
  await section.getByRole('heading', { name: 'If the forecasts are off', level: 2 }).waitFor();
  await section.getByRole('button', { name: 'Check forecast changes' }).click();
  await section.getByText('The same vendors win the same regions between −20 % and 0 %', { exact: false }).waitFor({ timeout: 200_000 });
  await section.getByText('At +10 % the award changes.', { exact: false }).waitFor();
  const table = section.getByRole('table', { name: 'Total cost and vendors awarded for each change of all forecasts' });
  // Five rows: −20 %, −10 %, the run, +10 %, +20 % (and the header).
  await expect(table.getByRole('row').count()).resolves.toBe(6);
  // −20 %: 500 + 10 × 4,800 = €48,500; the run: 500 + 60,000 = €60,500; +10 %: 500 + 63,000 + 800 + 3,600 = €67,900.
  await table.getByRole('row', { name: /−20 %.*€48,500\.00/ }).waitFor();
  await table.getByRole('row', { name: /0 % \(the run\).*€60,500\.00/ }).waitFor();
  await table.getByRole('row', { name: /\+10 %.*€67,900\.00.*The award changes/ }).waitFor();
  await table.getByText(/would be awarded/).first().waitFor();
  await expect(section.locator('canvas').count()).resolves.toBe(1);

  // One region alone: Depot S3.
  await section.getByRole('combobox', { name: 'Region' }).click();
  await page.getByRole('option', { name: 'Depot S3 (S3)' }).click();
  await section.getByRole('button', { name: 'Check this region alone' }).click();
  await section.getByRole('heading', { name: 'Depot S3 (S3) alone', level: 4 }).waitFor();
  await section.getByText('The same vendors win the same regions between −20 % and +10 % (tested at −20 %, −10 %, +10 % and +20 % of the forecast of Depot S3 alone', { exact: false }).waitFor({ timeout: 200_000 });

  // The page scrolls inside the side navigation's content: bring each part to the top for its picture.
  const toTop = (locator: ReturnType<typeof section.getByRole>) => locator.evaluate((el) => el.scrollIntoView({ block: 'start' }));
  await toTop(section.getByRole('heading', { name: 'If the forecasts are off', level: 2 }));
  await animationsDone(page);
  await screenshot(page, 'run-sensitivity-1280');
  await toTop(section.getByRole('heading', { name: 'One region alone', level: 3 }));
  await animationsDone(page);
  await screenshot(page, 'run-sensitivity-region-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await engine.getByRole('button', { name: 'Engine details' }).click();
  await engine.getByText('Bound from').waitFor();
  await animationsDone(page);
  await engine.scrollIntoViewIfNeeded();
  await screenshot(page, 'run-engine-details-1280');
  expect(await seriousViolations(page)).toEqual([]);

  // Each tested change opens its own re-solve, which says what was changed.
  const runPath = new URL(page.url()).pathname;
  await table.getByRole('link', { name: 'Open the award at +10 %' }).click();
  await page.waitForURL((url) => url.pathname !== runPath && /\/evaluation\/runs\/[0-9a-f-]+$/.test(url.pathname));
  await page.getByText('A forecast sensitivity re-solve: the same bids and rules, with every forecast changed by +10 %.').waitFor();
  await page.getByRole('heading', { name: 'Totals' }).waitFor();
  await expect(page.locator('app-sensitivity-panel').count()).resolves.toBe(0);
});
