import type { Page } from 'playwright-core';
import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';

/**
 * The compliance check and the abnormally-low flags in the bid tabulation of the closed demo tender
 * NHP-2026-014 (every bid found compliant, Kestrelway's Garrow Moor price flagged and its
 * explanation accepted), and the vendor's validity extension. The checks recorded here leave the
 * demo's outcome as it was (compliant stays compliant), so other browser tests see the same award.
 */
jest.setTimeout(120_000);
const TENDER = 'NHP-2026-014';

let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

async function openTabulation(page: Page): Promise<void> {
  await page.goto(`${baseUrl()}/tenders`);
  await page.getByRole('link', { name: TENDER }).click();
  await page.getByRole('heading', { name: 'Bids', level: 2 }).waitFor();
  await page.getByRole('row', { name: /Kestrelway Road Services/ }).waitFor();
}

async function waitForDialogFocus(page: Page): Promise<void> {
  await page.waitForFunction(() => document.activeElement?.closest('mat-dialog-container') != null);
}

test('the buyer sees each bid\'s compliance check and the flagged price with its median and threshold, and records a check through the dialog by keyboard', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await openTabulation(page);
  await page.getByText('7 submitted bids · 0 not yet checked · 0 excluded · 1 flagged as abnormally low', { exact: false }).waitFor();
  const kestrel = page.getByRole('row', { name: /Kestrelway Road Services/ });
  // Garrow Moor: 46.9 against a median of 60.5 (threshold 48.4 at 20 %).
  await kestrel.getByText(/Garrow Moor depot: €46\.90 is more than 20 % below the median €60\.50 \(threshold €48\.40\)/).waitFor();
  await kestrel.getByText('Explanation accepted').waitFor();
  await expect(page.locator('td.check .state.compliant').count()).resolves.toBe(7);
  await animationsDone(page);
  await screenshot(page, 'bid-tabulation-compliance-1280');
  expect(await seriousViolations(page)).toEqual([]);
  // The flagged row itself, with the Garrow Moor price marked "low".
  const flaggedCell = kestrel.locator('td.flagged');
  await flaggedCell.getByText('€46.90').waitFor();
  await flaggedCell.scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'bid-tabulation-flagged-row-1280');

  // The check dialog, by keyboard: choosing "excluded" asks for a ground; back to compliant with a note.
  const button = page.getByRole('button', { name: 'Compliance check of Kestrelway Road Services' });
  await button.focus();
  await page.keyboard.press('Enter');
  await waitForDialogFocus(page);
  const dialog = page.getByRole('dialog');
  await dialog.getByRole('radio', { name: 'Excluded from the evaluation' }).check();
  await dialog.getByRole('combobox', { name: 'Ground for exclusion' }).waitFor();
  await dialog.getByRole('combobox', { name: 'Ground for exclusion' }).click();
  await page.getByRole('option', { name: 'Abnormally low and not justified' }).waitFor();
  await animationsDone(page);
  await screenshot(page, 'bid-check-dialog-grounds-1280');
  await page.keyboard.press('Escape');
  await dialog.getByRole('radio', { name: 'Compliant: evaluate this bid' }).check();
  await expect(dialog.getByRole('combobox', { name: 'Ground for exclusion' }).count()).resolves.toBe(0);
  await dialog.getByLabel('Note').fill('Re-checked after the explanation: insurance and haulage licence on file.');
  await animationsDone(page);
  await screenshot(page, 'bid-check-dialog-1280');
  expect(await seriousViolations(page)).toEqual([]);
  await dialog.getByRole('button', { name: 'Record the check' }).click();
  await page.getByRole('status').filter({ hasText: 'Kestrelway Road Services: found compliant.' }).waitFor({ state: 'attached' });
  await kestrel.getByText('Re-checked after the explanation: insurance and haulage licence on file.').waitFor();

  // The abnormally-low dialog shows the flag in words and the recorded decision.
  await page.getByRole('button', { name: 'Record the explanation of Kestrelway Road Services' }).click();
  await waitForDialogFocus(page);
  await page.getByRole('dialog').getByText(/Garrow Moor depot: €46\.90/).waitFor();
  await expect(page.getByRole('dialog').getByLabel('Note').inputValue()).resolves.toMatch(/own yard two kilometres/);
  await animationsDone(page);
  await screenshot(page, 'low-price-dialog-1280');
  expect(await seriousViolations(page)).toEqual([]);
  await page.getByRole('dialog').getByRole('button', { name: 'Cancel' }).click();
  await page.getByRole('dialog').waitFor({ state: 'detached' });
});

test('compliance sees the checks and grounds but no buttons to change them', async () => {
  const { page } = b;
  await signIn(page, 'compliance@demo.tendara.test');
  await openTabulation(page);
  await page.getByRole('row', { name: /Kestrelway Road Services/ }).getByText('Explanation accepted').waitFor();
  await expect(page.getByRole('button', { name: /^Compliance check of/ }).count()).resolves.toBe(0);
  expect(await seriousViolations(page)).toEqual([]);
});

test('a vendor of the closed tender sees until when its bid is valid and confirms an extension', async () => {
  const { page } = b;
  await signIn(page, 'vendor5@demo.tendara.test');
  await page.goto(`${baseUrl()}/tenders`);
  await page.getByRole('link', { name: TENDER }).click();
  await page.getByRole('heading', { name: 'Validity of your bid' }).waitFor();
  await page.getByText(/Your bid must stay valid until .* \(90 days after the closing time\)/).waitFor();
  await page.getByRole('button', { name: 'Confirm validity for 90 more days' }).click();
  await page.getByRole('status').filter({ hasText: /Recorded: your bid stays valid until/ }).waitFor({ state: 'attached' });
  await page.getByText(/You have confirmed that it stays valid until/).waitFor();
  await animationsDone(page);
  await screenshot(page, 'bid-validity-vendor-1280');
  expect(await seriousViolations(page)).toEqual([]);
});
