import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import XlsxPopulate from 'xlsx-populate';
import { animationsDone, baseUrl, openBrowser, openTender, screenshot, seriousViolations, signIn, waitForDialogFocus } from './support/browser';

/**
 * The tender and bid screens against the demo data: the closed salt tender NHP-2026-014 (seven bids)
 * and the open grit-bin tender NHP-2027-002 (two bids so far, vendor1…vendor7 invited).
 */
let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

test('a vendor bids by form: sees the live total, submits, and gets the receipt digest', async () => {
  const { page } = b;
  await signIn(page, 'vendor1@demo.tendara.test');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'My tenders' }).click();
  await page.getByRole('heading', { name: 'My tenders', level: 1 }).waitFor();
  await page.getByRole('row', { name: /NHP-2027-002/ }).getByText(/closes in 1[34] days/).waitFor();
  await screenshot(page, 'tender-list-vendor-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await page.getByRole('row', { name: /NHP-2027-002/ }).getByText(/Europe\/Dublin · closes in/).waitFor();
  await page.getByRole('link', { name: 'NHP-2027-002' }).click();
  await page.getByRole('heading', { name: 'Your bid' }).waitFor();
  // The published award basis in words, before bidding.
  await page.getByRole('heading', { name: 'How the contract will be awarded' }).waitFor();
  await page.getByText('At most 3 vendors will be awarded.').waitFor();
  await page.getByText(/Northvale Highways Partnership/).waitFor();
  await page.getByLabel(/^Fixed fee/).fill('1000');
  await page.getByLabel(/^Capacity cap/).fill('2000');
  await page.getByLabel('Unit price, North district').fill('80');
  await page.getByLabel('Unit price, Central district').fill('82.5');
  // 1000 + 80 × 420 + 82.5 × 610 = 84,925.00
  await expect(page.locator('output.total-value').textContent()).resolves.toMatch(/84,925\.00/);
  await page.getByRole('button', { name: 'Save draft' }).click();
  await page.getByRole('status').filter({ hasText: 'Draft saved' }).waitFor({ state: 'attached' });
  await expect(page.getByText('Draft saved', { exact: true }).count()).resolves.toBeGreaterThan(0);

  await page.getByRole('button', { name: 'Submit bid' }).click();
  // Submitting asks first, with the figures it commits to.
  const confirm = page.getByRole('dialog').filter({ hasText: 'Submit your bid?' });
  await confirm.getByText(/You offer 2 of 5 regions, €84,925\.00 at the forecast/).waitFor();
  await confirm.getByRole('button', { name: 'Submit bid' }).click();
  await page.getByRole('heading', { name: 'Receipt' }).waitFor();
  const digest = (await page.locator('.receipt code').textContent())?.trim() ?? '';
  expect(digest).toMatch(/^[0-9a-f]{64}$/);
  await expect(page.getByRole('status').filter({ hasText: digest }).count()).resolves.toBe(1);
  await expect(page.getByRole('button', { name: 'Submit revision' }).isVisible()).resolves.toBe(true);
  await page.locator('mat-sidenav-content').evaluate((el) => el.scrollTo(0, 0));
  await screenshot(page, 'bid-form-1280');
  expect(await seriousViolations(page)).toEqual([]);
});

test('a vendor downloads the bid workbook, fills it in, uploads it, reviews the figures and submits', async () => {
  const { page } = b;
  await signIn(page, 'vendor3@demo.tendara.test');
  await openTender(page, 'NHP-2027-002');
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download bid workbook' }).click()]);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tendara-bid-'));
  const file = path.join(dir, 'filled-bid.xlsx');
  const workbook = await XlsxPopulate.fromFileAsync((await download.path()));
  const sheet = workbook.sheet('Bid')!;
  sheet.cell('C4').value(2200);
  sheet.cell('C5').value(null);
  [91.5, 93, null, 89.25, 96].forEach((price, i) => sheet.cell(`E${8 + i}`).value(price));
  await workbook.toFileAsync(file);

  // First a workbook with a text price: every error names its cell, and nothing fills the form.
  const broken = path.join(dir, 'broken-bid.xlsx');
  sheet.cell('E9').value('ninety');
  await workbook.toFileAsync(broken);
  await page.locator('input[type=file]').setInputFiles(broken);
  await page.getByRole('alert').filter({ hasText: 'Bid!E9' }).waitFor();

  await page.locator('input[type=file]').setInputFiles(file);
  await page.getByText('review them, then save or submit').waitFor();
  await expect(page.getByLabel('Unit price, North district').inputValue()).resolves.toBe('91.50');
  await expect(page.getByLabel('Unit price, Central district').inputValue()).resolves.toBe('');
  await expect(page.getByRole('checkbox', { name: 'No cap' }).isChecked()).resolves.toBe(true);
  await expect(page.getByText('Not started').count()).resolves.toBe(1);
  // The figures from the workbook are not saved yet: leaving the page asks first.
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Tenders' }).click();
  const leave = page.getByRole('dialog').filter({ hasText: 'Leave without saving?' });
  await leave.waitFor();
  await leave.getByRole('button', { name: 'Cancel' }).click();
  await leave.waitFor({ state: 'detached' });
  await expect(page.getByLabel('Unit price, North district').inputValue()).resolves.toBe('91.50');

  await page.getByRole('button', { name: 'Submit bid' }).click();
  await page.getByRole('dialog').filter({ hasText: 'Submit your bid?' }).getByRole('button', { name: 'Submit bid' }).click();
  await page.getByRole('heading', { name: 'Receipt' }).waitFor();
  await expect(page.locator('.receipt code').textContent()).resolves.toMatch(/[0-9a-f]{64}/);
  fs.rmSync(dir, { recursive: true, force: true });
});

test('before closing the buyer sees only how many vendors have submitted, and that bids are sealed', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Tenders' }).click();
  // The first page, newest closing first (other files' tenders may come before the demo's).
  await page.getByRole('row', { name: /NHP-20/ }).first().waitFor();
  await page.getByRole('group', { name: 'Pages of tenders' }).waitFor();
  await screenshot(page, 'tender-list-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await openTender(page, 'NHP-2027-002');
  // The demo's two bids plus the two made above.
  await page.getByText(/4\s+vendors have submitted a bid so far/).waitFor();
  await page.getByText(/Bids are sealed until the closing time/).waitFor();
  await expect(page.getByRole('table', { name: /Bid tabulation/ }).count()).resolves.toBe(0);
  await expect(page.getByText('91.5').count()).resolves.toBe(0);
  await screenshot(page, 'tender-detail-open-1280');
  expect(await seriousViolations(page)).toEqual([]);
});

test("the buyer's bid tabulation of the closed tender marks each region's lowest price and exports", async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await openTender(page, 'NHP-2026-014');
  const table = page.getByRole('table', { name: /Bid tabulation/ });
  // Header, seven vendors, and the "Lowest price" footer.
  await table.getByRole('row').nth(8).waitFor();
  await expect(table.getByRole('row').count()).resolves.toBe(1 + 7 + 1);
  // Ashby Cross depot: the lowest of the seven is 54.90 (vendor 2); it is bold and says "lowest".
  const lowest = table.locator('strong.lowest');
  await expect(lowest.count()).resolves.toBeGreaterThanOrEqual(12);
  await expect(lowest.first().textContent()).resolves.toMatch(/lowest/);
  await expect(table.getByText(/€54\.90/).first().textContent()).resolves.toMatch(/lowest/);
  await screenshot(page, 'bid-tabulation-1280');
  expect(await seriousViolations(page)).toEqual([]);

  const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Export to .xlsx' }).click()]);
  expect(download.suggestedFilename()).toBe('NHP-2026-014-bid-tabulation.xlsx');
  const exported = await XlsxPopulate.fromFileAsync((await download.path()));
  expect(exported.sheets().length).toBeGreaterThan(0);
});

test('the buyer drafts a tender in the editor, with messages under the fields it refuses', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await page.goto(`${baseUrl()}/tenders`);
  await page.getByRole('link', { name: 'New tender' }).click();
  await page.getByRole('heading', { name: 'New tender', level: 1 }).waitFor();
  await page.getByRole('button', { name: 'Save draft' }).click();
  await page.getByText('Title is required.').waitFor();
  await page.getByText('Enter the closing date and time.').waitFor();

  await page.getByLabel('Reference').fill('NHP-2027-009');
  await page.getByLabel('Title').fill('Gully emptying, three districts');
  await page.getByLabel('Commodity').fill('Gully emptying visits');
  await page.getByLabel('Unit of measure').fill('visit');
  await page.getByLabel('Closing date').fill('2031-03-02');
  await page.getByLabel('Closing time of day').fill('12:00');
  await page.getByLabel('Code, region 1').fill('N01');
  await page.getByLabel('Name, region 1').fill('North district');
  await page.getByLabel('Forecast, region 1').fill('300');
  await page.getByRole('button', { name: 'Add region' }).click();
  await page.getByLabel('Code, region 2').fill('n01');
  await page.getByLabel('Name, region 2').fill('South district');
  await page.getByLabel('Forecast, region 2').fill('0');
  await page.getByRole('button', { name: 'Save draft' }).click();
  await page.getByText('Forecast must be a number above 0.').waitFor();
  await page.getByText(/Region code "n01" is used twice/).waitFor();
  await screenshot(page, 'tender-editor-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await page.getByLabel('Code, region 2').fill('S01');
  await page.getByLabel('Forecast, region 2').fill('250');
  await page.getByRole('button', { name: 'Save draft' }).click();
  await page.getByRole('heading', { name: 'Gully emptying, three districts', level: 1 }).waitFor();
  await page.getByText('Draft', { exact: true }).waitFor();

  // Publishing with nobody invited is refused with the reason.
  await page.getByRole('button', { name: 'Publish…' }).click();
  await waitForDialogFocus(page);
  await page.getByRole('dialog').getByRole('button', { name: 'Publish' }).click();
  await page.getByRole('alert').filter({ hasText: 'Invite at least one vendor.' }).waitFor();
  await screenshot(page, 'tender-detail-draft-1280');
  expect(await seriousViolations(page)).toEqual([]);

  // The Invite button: two registered vendors chosen from the list are then shown as invited, and
  // are no longer offered. The tender stays a draft (no vendor sees it yet).
  await page.keyboard.press('Escape');
  await page.getByRole('combobox', { name: 'Vendor organisations' }).click();
  await page.getByRole('option', { name: 'Quarnby Minerals Ltd' }).click();
  await page.getByRole('option', { name: 'Saltmere Supply Co. (SME)' }).click();
  await page.keyboard.press('Escape');
  await page.getByRole('button', { name: 'Invite', exact: true }).click();
  const invited = page.getByRole('list', { name: 'Invited organisations' });
  await invited.getByText('Quarnby Minerals Ltd').waitFor();
  await invited.getByText('Saltmere Supply Co.').waitFor();
  expect(await invited.getByRole('listitem').count()).toBe(2);
  await page.getByRole('combobox', { name: 'Vendor organisations' }).click();
  await page.getByRole('option', { name: 'Northfell Haulage & Salt (SME)' }).waitFor();
  expect(await page.getByRole('option', { name: 'Quarnby Minerals Ltd' }).count()).toBe(0);
  await page.keyboard.press('Escape');
  await page.getByText('Draft', { exact: true }).waitFor();
  await page.getByRole('heading', { name: 'Invite vendors' }).scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'tender-detail-invited-1280');
  expect(await seriousViolations(page)).toEqual([]);
});

test('the buyer sets the award basis, buying body and time zone; a refused forecast is marked; the tender page states the basis', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await page.goto(`${baseUrl()}/tenders/new`);
  await page.getByRole('heading', { name: 'New tender', level: 1 }).waitFor();
  await page.getByLabel('Reference').fill('NHP-2027-010');
  await page.getByLabel('Title').fill('Brine for the coastal depots');
  await page.getByLabel('Commodity').fill('Salt brine, 23 %, delivered');
  await page.getByLabel('Unit of measure').fill('t');
  await page.getByLabel('Time zone of the procedure').fill('Europe/Dublin');
  await page.keyboard.press('Escape');
  await page.getByLabel('Closing date').fill('2031-07-01');
  await page.getByLabel('Closing time of day').fill('12:00');
  // 12:00 in Dublin in July is Irish summer time, UTC+1.
  await page.getByText('Vendors will see: closes Tue, 1 Jul 2031, 12:00 GMT+1 (Europe/Dublin).').waitFor();
  await page.getByLabel('Code, region 1').fill('N01');
  await page.getByLabel('Name, region 1').fill('North harbour');
  await page.getByLabel('Forecast, region 1').fill('500');
  await page.getByRole('button', { name: 'Add region' }).click();
  await page.getByLabel('Code, region 2').fill('S01');
  await page.getByLabel('Name, region 2').fill('South harbour');
  await page.getByLabel('Forecast, region 2').fill('750');

  await page.getByLabel('Maximum number of vendors').fill('2');
  await page.getByLabel('Maximum vendor share (%)').fill('60');
  await page.getByLabel('Award increment').fill('100');
  const preview = page.getByRole('heading', { name: 'What vendors will read' }).locator('xpath=..');
  await preview.getByText('No vendor will be awarded more than 60 % of the total quantity.').waitFor();
  await preview.getByText('Quantities are awarded in whole multiples of 100 t.').waitFor();
  await page.getByLabel('Name', { exact: true }).fill('Northvale Highways Partnership');
  await page.getByLabel('Address').fill('Unit 4, Harbour Road, Northvale');
  await page.getByLabel('Contact e-mail').fill('procurement@northvale.tendara.test');
  await page.getByLabel('Country code').fill('ie');
  await page.getByLabel('Estimated contract value').fill('120000');

  // The server refuses 750 t in 100 t steps; its message lands under that forecast.
  await page.getByRole('button', { name: 'Save draft' }).click();
  await page.getByText('With an award increment of 100 t, the forecast must be a whole multiple of it.').waitFor();
  await page.getByRole('heading', { name: 'Award basis' }).scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'tender-editor-basis-1280');
  expect(await seriousViolations(page)).toEqual([]);
  await page.getByRole('heading', { name: 'Procedure' }).scrollIntoViewIfNeeded();
  await screenshot(page, 'tender-editor-procedure-1280');

  await page.getByLabel('Award increment').fill('250');
  await page.getByRole('button', { name: 'Save draft' }).click();
  await page.getByRole('heading', { name: 'Brine for the coastal depots', level: 1 }).waitFor();
  await page.getByRole('heading', { name: 'How the contract will be awarded' }).waitFor();
  await page.getByText('At most 2 vendors will be awarded.').waitFor();
  await page.getByText('Quantities are awarded in whole multiples of 250 t.').waitFor();
  await page.getByText(/Tue, 1 Jul 2031, 12:00 GMT\+1 \(Europe\/Dublin\)/).first().waitFor();
  await page.getByText('not shown to vendors').waitFor();
  await page.getByRole('heading', { name: 'How the contract will be awarded' }).scrollIntoViewIfNeeded();
  await animationsDone(page);
  await screenshot(page, 'tender-detail-basis-1280');
  expect(await seriousViolations(page)).toEqual([]);

  // Reopened, the editor shows what was saved: percentages as percentages, the time in the zone.
  await page.getByRole('link', { name: 'Edit' }).click();
  await page.getByRole('heading', { name: 'Edit tender', level: 1 }).waitFor();
  await page.waitForFunction(() => document.querySelector<HTMLInputElement>('input[formcontrolname="reference"]')?.value === 'NHP-2027-010');
  await expect(page.getByLabel('Maximum vendor share (%)').inputValue()).resolves.toBe('60');
  await expect(page.getByLabel('Time zone of the procedure').inputValue()).resolves.toBe('Europe/Dublin');
  await expect(page.getByLabel('Closing time of day').inputValue()).resolves.toBe('12:00');
  await expect(page.getByLabel('Country code').inputValue()).resolves.toBe('IE');
});

test('on a phone (390×844) the bid form fits the screen', async () => {
  const phone = await openBrowser({ width: 390, height: 844 });
  try {
    const { page } = phone;
    await signIn(page, 'vendor2@demo.tendara.test');
    await page.goto(`${baseUrl()}/tenders`);
    await page.getByRole('link', { name: 'NHP-2027-002' }).click();
    await page.getByRole('heading', { name: 'Receipt' }).waitFor();
    await page.getByLabel('Unit price, North district').scrollIntoViewIfNeeded();
    await screenshot(page, 'bid-form-390');
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    expect(await seriousViolations(page)).toEqual([]);
  } finally {
    await phone.close();
  }
});
