import { animationsDone, baseUrl, openBrowser, openTender, screenshot, seriousViolations, signIn, waitForDialogFocus } from './support/browser';

/**
 * Clarifications and amendments on the demo data: the closed salt tender NHP-2026-014 has two
 * published clarifications and amendment 1 (closing extended); on the open grit-bin tender
 * NHP-2027-002 a vendor asks, the buyer answers and issues amendment 1 (the description only, so that
 * the other browser tests find the tender as they expect it), and looks at the cancellation dialog
 * without cancelling.
 */
let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

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

test('a vendor asks a question; the buyer sees who asked, publishes the answer and issues an amendment; the vendor reads clarification 1 and the amendment notice', async () => {
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
  // Issued: only the description changes (closing time, regions and forecasts stay as other tests expect them).
  const dialog = page.getByRole('dialog', { name: 'Issue amendment 1' });
  await dialog.getByLabel('Reason').fill('Vendors asked how the bins are filled.');
  await dialog.getByLabel('Description').fill('Refilling of roadside grit bins across five districts of the fictional Northvale area. Bins are filled by hand from 25 kg bags.');
  await dialog.getByRole('button', { name: 'Issue amendment' }).click();
  await page.getByRole('dialog').waitFor({ state: 'detached' });
  const notices = page.getByRole('region', { name: 'Amendments' });
  await notices.getByRole('heading', { name: /^Amendment 1/ }).waitFor();
  await notices.getByText('Description changed.').waitFor();
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
  // The amendment notice, with its reason, on the vendor's page.
  const amendments = page.getByRole('region', { name: 'Amendments' });
  await amendments.getByText('Vendors asked how the bins are filled.').waitFor();
  await expect(page.getByText(/Bins are filled by hand from 25 kg bags\./).count()).resolves.toBe(1);
  await amendments.scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'procedure-vendor-amendment-notice-1280');
});

test('a buyer cancels a draft with a reason: the page names it cancelled with the reason, and the list filters it under Cancelled', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  // A draft of its own (through the API, as the editor would save it), so the demo's tenders stay as they are.
  const xsrf = (await page.context().cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
  const created = await page.request.post(`${baseUrl()}/api/tenders`, {
    headers: { 'X-XSRF-TOKEN': xsrf },
    data: {
      reference: 'NHP-2027-019', title: 'Footway grit, spring top-up', commodity: 'Grit', unit: 't', currency: 'EUR',
      closesAt: new Date(Date.now() + 20 * 86_400_000).toISOString(), standstillDays: 10,
      regions: [{ code: 'N01', name: 'North district', forecast: 120 }],
    },
  });
  expect(created.status()).toBe(201);
  await openTender(page, 'NHP-2027-019');
  await page.getByRole('button', { name: 'Cancel tender…' }).click();
  const dialog = page.getByRole('dialog', { name: 'Cancel NHP-2027-019?' });
  await dialog.waitFor();
  // The reason is required: nothing is sent without it.
  await dialog.getByRole('button', { name: 'Cancel tender' }).click();
  await dialog.getByText('Reason is required.').waitFor();
  await dialog.getByLabel('Reason for cancelling').fill('Drafted twice; the spring top-up is part of NHP-2027-002.');
  await dialog.getByRole('button', { name: 'Cancel tender' }).click();
  await page.getByRole('dialog').waitFor({ state: 'detached' });
  await page.getByRole('note').filter({ hasText: 'Drafted twice; the spring top-up is part of NHP-2027-002.' }).waitFor();
  await expect(page.locator('.eyebrow .badge').textContent()).resolves.toBe('Cancelled');
  await expect(page.getByRole('button', { name: 'Cancel tender…' }).count()).resolves.toBe(0);
  await page.getByText('The tender was cancelled before its closing time: its bids stay sealed and are never opened.').waitFor();
  await expect(page.getByText(/closes in/).count()).resolves.toBe(0);
  await animationsDone(page);
  await screenshot(page, 'procedure-buyer-cancelled-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await page.goto(`${baseUrl()}/tenders`);
  await page.getByRole('listbox', { name: 'Filter by status' }).getByRole('option', { name: 'Cancelled' }).click();
  await page.getByRole('row', { name: /NHP-2027-019/ }).getByText('cancelled before closing').waitFor();
  // NHP-2027-019 is in the unfiltered list too: wait for the filtered page to replace it.
  await page.getByRole('row', { name: /NHP-2027-002/ }).waitFor({ state: 'detached' });
  await expect(page.getByRole('row', { name: /NHP-2027-002/ }).count()).resolves.toBe(0);
  await screenshot(page, 'procedure-tender-list-cancelled-1280');
  expect(await seriousViolations(page)).toEqual([]);
});
