import type { Page } from 'playwright-core';
import { animationsDone, openBrowser, openTender, screenshot, seriousViolations, signIn } from './support/browser';
import { closedTender } from './support/closed-tender';

/**
 * Every wait shows progress, in a real browser, on a closed tender of this file's own (seven demo
 * vendors over twelve depots), so what other browser tests do to the demo's tenders changes nothing:
 * the runs table shows skeleton rows while it loads, a run shows its progress while it waits or
 * solves, and an export says what it is doing until the browser has the file.
 */
jest.setTimeout(240_000);
const TENDER = 'NHP-2026-077';

const depots = Array.from({ length: 12 }, (_, i) => ({ code: `P${String(i + 1).padStart(2, '0')}`, name: `Depot P${i + 1}`, forecast: 100 + 10 * i }));
/** Fictional prices: each vendor cheapest somewhere, caps that make the award share the depots. */
const price = (vendor: number, depot: number) => 40 + ((vendor * 7 + depot * 5) % 13) + vendor / 10;

let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  await closedTender({
    reference: TENDER, title: 'Brine for the twelve upland depots, progress check',
    regions: depots,
    bids: Array.from({ length: 7 }, (_, v) => ({
      vendor: `vendor${v + 1}@demo.tendara.test`, fixedFee: 500 + 100 * v, capacity: 450,
      prices: Object.fromEntries(depots.map((d, i) => [d.code, price(v, i)])),
    })),
  });
  b = await openBrowser();
});
afterAll(() => b.close());

/** Records, from the page's first script on, the words of every skeleton and progress note that appears, however briefly. */
async function watchWaits(page: Page): Promise<void> {
  await page.addInitScript(() => {
    const seen: string[] = [];
    (window as unknown as { seenWaits: string[] }).seenWaits = seen;
    new MutationObserver(() => {
      for (const el of Array.from(document.querySelectorAll('app-skeleton-rows [role=status], app-progress-note .progress-text'))) {
        const text = el.textContent?.replace(/\s+/g, ' ').trim() ?? '';
        if (text && !seen.includes(text)) seen.push(text);
      }
    }).observe(document, { subtree: true, childList: true, characterData: true });
  });
}
const seenWaits = (page: Page) => page.evaluate(() => (window as unknown as { seenWaits: string[] }).seenWaits);

test('the evaluation shows skeleton rows while it loads, a run shows its progress in words, and the run export says "Preparing the workbook…" until saved', async () => {
  const { page } = b;
  await watchWaits(page);
  await signIn(page, 'buyer@demo.tendara.test');
  await openTender(page, TENDER);
  await page.getByRole('link', { name: 'Evaluation', exact: true }).click();
  await page.getByRole('heading', { name: 'Award scenarios', level: 1 }).waitFor();
  await page.getByRole('row', { name: /Published award basis/ }).first().waitFor();
  // While the scenarios and runs were loading, skeleton rows (not "No runs yet") were shown and announced.
  expect(await seenWaits(page)).toEqual(expect.arrayContaining(['Loading scenarios…', 'Loading runs…']));

  await page.getByRole('button', { name: 'Run Published award basis', exact: true }).click();
  await page.waitForURL(/\/evaluation\/runs\/[0-9a-f-]+$/);
  // The run waits in the queue (the workers look for jobs every few seconds), then solves: the progress note says which.
  const note = page.locator('app-progress-note .progress-text');
  await note.first().waitFor({ timeout: 30_000 });
  await animationsDone(page);
  await screenshot(page, 'progress-run-1280');
  expect(await seriousViolations(page)).toEqual([]);
  await page.getByRole('heading', { name: 'Totals' }).waitFor({ timeout: 150_000 });
  const waits = await seenWaits(page);
  const runWaits = waits.filter((w) => w.startsWith('Waiting to start') || w.startsWith('Solving'));
  expect(runWaits.length).toBeGreaterThan(0);
  for (const w of runWaits) expect(w).toMatch(/^(Waiting to start: the run is in the queue\.|Solving: \d+ s of at most 60 s)$/);

  // The export: its request is held until the picture is taken (the server's real answer, only later).
  let release: () => void = () => undefined;
  const held = new Promise<void>((resolve) => { release = resolve; });
  await page.route('**/export.xlsx', async (route) => {
    await held;
    await route.continue();
  });
  const downloading = page.waitForEvent('download', { timeout: 60_000 });
  await page.getByRole('link', { name: 'Export to .xlsx' }).click();
  const preparing = page.locator('app-download-link').getByRole('status');
  await preparing.filter({ hasText: 'Preparing the workbook…' }).waitFor();
  await expect(page.getByRole('progressbar', { name: 'Preparing the workbook…' }).count()).resolves.toBe(1);
  await animationsDone(page);
  await screenshot(page, 'progress-export-1280');
  expect(await seriousViolations(page)).toEqual([]);
  release();
  const file = await downloading;
  expect(file.suggestedFilename()).toMatch(new RegExp(`^${TENDER}-.*\\.xlsx$`));
  await page.getByText(`Downloaded ${file.suggestedFilename()}.`).waitFor();
  await page.unroute('**/export.xlsx');
});
