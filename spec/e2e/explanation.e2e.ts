import { animationsDone, openBrowser, openTender, screenshot, seriousViolations, signIn } from './support/browser';
import { closedTender } from './support/closed-tender';

/**
 * "Why this award" and the debrief on the run page, on a closed tender of this file's own (three
 * demo vendors, split award), so what other browser tests do to the demo's tenders changes nothing.
 *   Depot E1 100 t, Depot E2 200 t. Shorefield (vendor1): fee 0, 10 and 10. Kestrel (vendor2): fee
 *   500, 7 and 12. Third (vendor3): fee 0, cap 100 t, 9 and 9.50.
 *   Award: vendor3 100 t of E1 at 9 (900), vendor1 200 t of E2 at 10 (2,000): 2,900.
 *   E1: vendor2 at 7 got none: all of E1 at 7 costs its fee 500 + 700, and vendor3 moves to E2
 *   (950 + 1,000 from vendor1): 3,150, 250 more — its fee is not recovered.
 */
jest.setTimeout(240_000);
const TENDER = 'NHP-2026-061';

let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  await closedTender({
    reference: TENDER, title: 'Brine for the estuary depots, explained award',
    regions: [{ code: 'E1', name: 'Depot E1', forecast: 100 }, { code: 'E2', name: 'Depot E2', forecast: 200 }],
    bids: [
      { vendor: 'vendor1@demo.tendara.test', fixedFee: 0, capacity: null, prices: { E1: 10, E2: 10 } },
      { vendor: 'vendor2@demo.tendara.test', fixedFee: 500, capacity: null, prices: { E1: 7, E2: 12 } },
      { vendor: 'vendor3@demo.tendara.test', fixedFee: 0, capacity: 100, prices: { E1: 9, E2: 9.5 } },
    ],
  });
  b = await openBrowser();
});
afterAll(() => b.close());

test('the buyer asks why, sees progress, then each depot with the cheapest bid not awarded and its reason, then asks for the losing vendor\'s debrief; axe-clean', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await openTender(page, TENDER);
  await page.getByRole('link', { name: 'Evaluation', exact: true }).click();
  await page.getByRole('heading', { name: 'Award scenarios', level: 1 }).waitFor();
  await page.getByRole('button', { name: 'Run Published award basis', exact: true }).click();
  await page.waitForURL(/\/evaluation\/runs\/[0-9a-f-]+$/);
  await page.getByRole('heading', { name: 'Totals' }).waitFor({ timeout: 150_000 });

  const why = page.getByRole('region', { name: 'Why this award' });
  await why.getByRole('button', { name: 'Explain this award' }).click();
  const table = why.getByRole('table', { name: 'Why this award' });
  await table.waitFor({ timeout: 150_000 });
  const e1 = table.getByRole('row', { name: /Depot E1/ });
  await e1.getByText(/bid €7\.00 per t but was not awarded it: its fixed fee would not be recovered by its lower unit price; it would have cost €250\.00 more\./).waitFor();
  await page.getByRole('heading', { name: 'Debrief: what each vendor would have needed', level: 2 }).waitFor();
  await page.getByText('For the buyer and compliance only', { exact: false }).waitFor();
  await why.scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'run-explanation-1280');
  expect(await seriousViolations(page)).toEqual([]);
  // The vendor with no award: its debrief is worked out when asked for — its uniform cut, and the
  // debrief price for E1 (7 − 250 / 100 = 4.50 for all of it).
  const saltmere = page.getByRole('region', { name: /no award/ });
  await saltmere.getByRole('button', { name: 'Work out what it would have needed' }).click();
  await saltmere.getByText(/A cut of [\d.]+ % to all its prices, fixed fee included, would have won it an award\./).waitFor({ timeout: 150_000 });
  await saltmere.scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'run-explanation-debrief-1280');
  expect(await seriousViolations(page)).toEqual([]);
  // Nothing on the page speaks the solver's language.
  const text = (await why.textContent()) ?? '';
  for (const word of [' LP', 'bound', 'solver']) expect(text).not.toContain(word);
});
