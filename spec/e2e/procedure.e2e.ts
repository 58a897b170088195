import type { Page } from 'playwright-core';
import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';

/**
 * Clarifications and amendments on the demo data: the closed salt tender NHP-2026-014 has two
 * published clarifications and amendment 1 (closing extended); on the open grit-bin tender
 * NHP-2027-002 a vendor asks, the buyer answers, and the buyer's amendment and cancellation dialogs
 * open and close without changing anything.
 */
let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

async function openTender(page: Page, reference: string): Promise<void> {
  await page.goto(`${baseUrl()}/tenders`);
  await page.getByRole('link', { name: reference }).click();
  await page.getByRole('heading', { level: 1 }).waitFor();
}

async function waitForDialogFocus(page: Page): Promise<void> {
  await page.waitForFunction(() => document.activeElement?.closest('mat-dialog-container') != null);
}

test('a vendor reads the amendment notice and the numbered clarifications of the salt tender, without who asked', async () => {
  const { page } = b;
  await signIn(page, 'vendor2@demo.tendara.test');
  await openTender(page, 'NHP-2026-014');
  const amendments = page.getByRole('region', { name: 'Amendments' });
  await amendments.getByRole('heading', { name: /^Amendment 1/ }).waitFor();
  await expect(amendments.getByText(/^Closing time extended from/).count()).resolves.toBe(1);
  const clarifications = page.getByRole('list', { name: 'Published clarifications' });
  await clarifications.getByRole('heading', { name: /^Clarification 2/ }).waitFor();
  await expect(clarifications.getByRole('heading', { name: /^Clarification \d/ }).count()).resolves.toBe(2);
  await expect(page.getByText(/Asked by/).count()).resolves.toBe(0);
  // The receipt names the amendment the bid answered.
  await expect(page.locator('.receipt').getByText('Amendment 1', { exact: true }).count()).resolves.toBe(1);
  await screenshot(page, 'procedure-vendor-closed-1280');
  expect(await seriousViolations(page)).toEqual([]);
});

test('a vendor asks a question; the buyer sees who asked and publishes the answer; the vendor reads clarification 1', async () => {
  const { page } = b;
  const question = 'Are the grit bins of the West district reachable by a 7.5 t lorry?';
  await signIn(page, 'vendor6@demo.tendara.test');
  await openTender(page, 'NHP-2027-002');
  await page.getByLabel('Your question').fill(question);
  await page.getByRole('button', { name: 'Send question' }).click();
  // The question listed as awaiting its answer, or a refusal in the panel's alert.
  await page.locator('app-questions-panel').locator('.waiting-title, .form-error span').first().waitFor();
  await expect(page.locator('app-questions-panel .form-error').textContent()).resolves.toBe('');
  await page.getByRole('heading', { name: 'Your questions awaiting an answer' }).waitFor();
  await page.getByText(question).waitFor();
  await page.locator('app-questions-panel').scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'procedure-vendor-ask-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await signIn(page, 'buyer@demo.tendara.test');
  await openTender(page, 'NHP-2027-002');
  await page.getByRole('heading', { name: 'Questions awaiting an answer' }).waitFor();
  const waiting = page.getByRole('listitem').filter({ hasText: question });
  // The buyer sees who asked.
  await waiting.getByText(/by Mei Tanaka, Lowmoor Halite plc/).waitFor();
  await waiting.getByLabel('Answer').fill('Yes: every bin in the West district is on a road open to 7.5 t lorries.');
  await animationsDone(page);
  await screenshot(page, 'procedure-buyer-answer-1280');
  expect(await seriousViolations(page)).toEqual([]);
  await waiting.getByRole('button', { name: 'Publish answer' }).click();
  await page.getByRole('list', { name: 'Published clarifications' }).getByRole('heading', { name: /^Clarification 1/ }).waitFor();

  // The buyer's amendment and cancellation dialogs: looked at, then left without a change.
  await page.getByRole('button', { name: 'Issue amendment…' }).click();
  await page.getByRole('dialog', { name: 'Issue amendment 1' }).waitFor();
  await waitForDialogFocus(page);
  await animationsDone(page);
  await screenshot(page, 'procedure-amendment-dialog-1280');
  expect(await seriousViolations(page)).toEqual([]);
  // The regions, further down the dialog: one row per region, each removable.
  await page.locator('mat-dialog-content').evaluate((el) => el.scrollTo(0, el.scrollHeight));
  await expect(page.getByRole('button', { name: /^Remove region / }).count()).resolves.toBe(5);
  await screenshot(page, 'procedure-amendment-dialog-regions-1280');
  await page.getByRole('button', { name: 'Back' }).click();
  await page.getByRole('dialog').waitFor({ state: 'detached' });
  await page.getByRole('button', { name: 'Cancel tender…' }).click();
  await page.getByRole('dialog', { name: 'Cancel NHP-2027-002?' }).waitFor();
  await waitForDialogFocus(page);
  await animationsDone(page);
  await screenshot(page, 'procedure-cancel-dialog-1280');
  expect(await seriousViolations(page)).toEqual([]);
  await page.getByRole('button', { name: 'Keep the tender' }).click();
  await page.getByRole('dialog').waitFor({ state: 'detached' });

  await signIn(page, 'vendor6@demo.tendara.test');
  await openTender(page, 'NHP-2027-002');
  const published = page.getByRole('list', { name: 'Published clarifications' });
  await published.getByRole('heading', { name: /^Clarification 1/ }).waitFor();
  await published.getByText('Yes: every bin in the West district is on a road open to 7.5 t lorries.').waitFor();
  await expect(page.getByText(/Asked by/).count()).resolves.toBe(0);
  await page.locator('app-questions-panel').scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'procedure-vendor-published-1280');
  expect(await seriousViolations(page)).toEqual([]);
});
