import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Page } from 'playwright-core';
import XlsxPopulate from 'xlsx-populate';
import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn, waitForDialogFocus } from './support/browser';
import { ApiSession, awardAndNotify, closedTender, publishedTender, runScenario } from './support/closed-tender';

/**
 * The vendor's whole path on a phone (390 × 844, the size of a common phone held upright): tender
 * list, tender, bid form, workbook upload, submission and the letter, on tenders of this file's
 * own. On every step the page itself never scrolls sideways (neither the document nor the shell's
 * content pane); a table wider than the screen scrolls inside its own frame, which is a labelled
 * region a keyboard can focus and scroll.
 */
jest.setTimeout(180_000);
const OPEN = 'PHN-2027-001';
const NOTIFIED = 'PHN-2027-002';
const VENDOR = 'vendor5@demo.tendara.test';
const REGIONS = [
  { code: 'P1', name: 'Ballymore upper depot', forecast: 240 },
  { code: 'P2', name: 'Carrowkeel harbour yard', forecast: 360 },
  { code: 'P3', name: 'Drumlish crossroads store', forecast: 180 },
];

let notifiedId: string;
let openId: string;
let splitRunId: string;
let basisRunId: string;
beforeAll(async () => {
  await publishedTender({ reference: OPEN, title: 'De-icing brine for the western depots, phone path', regions: REGIONS, vendors: [VENDOR, 'vendor6@demo.tendara.test'] });
  const closed = await closedTender({
    reference: NOTIFIED, title: 'Grit for the lakeside depots, phone letter',
    regions: [{ code: 'L1', name: 'Lakeside north', forecast: 100 }, { code: 'L2', name: 'Lakeside south', forecast: 200 }],
    bids: [
      { vendor: VENDOR, fixedFee: 0, capacity: null, prices: { L1: 40, L2: 41 } },
      { vendor: 'vendor6@demo.tendara.test', fixedFee: 0, capacity: null, prices: { L1: 44, L2: 45 } },
    ],
  });
  notifiedId = closed;
  splitRunId = await runScenario(await ApiSession.signIn('buyer@demo.tendara.test'), closed, 'split');
  basisRunId = await awardAndNotify(closed);
  openId = (await (await ApiSession.signIn(VENDOR)).call<{ items: { id: string; reference: string }[] }>('GET', `/tenders?q=${OPEN}`)).items.find((t) => t.reference === OPEN)!.id;
});

let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser({ width: 390, height: 844 });
});
afterAll(() => b.close());

/**
 * How far the page scrolls sideways: the document and the shell's content pane (the part of the
 * page that scrolls under the app bar); 0 when nothing does.
 */
async function sidewaysScroll(page: Page): Promise<{ document: number; content: number }> {
  return page.evaluate(() => {
    const pane = document.querySelector('mat-sidenav-content');
    return {
      document: Math.max(0, document.documentElement.scrollWidth - window.innerWidth),
      content: pane ? Math.max(0, pane.scrollWidth - pane.clientWidth) : 0,
    };
  });
}

/** One step of the path: no sideways scroll, a picture to look at, and axe finds nothing serious. */
async function expectStepFits(page: Page, name: string): Promise<void> {
  await animationsDone(page);
  expect(await sidewaysScroll(page)).toEqual({ document: 0, content: 0 });
  await screenshot(page, name);
  expect(await seriousViolations(page)).toEqual([]);
}

async function openMenuItem(page: Page, label: string): Promise<void> {
  await page.getByRole('button', { name: 'Navigation' }).click();
  const nav = page.getByRole('navigation', { name: 'Main' });
  await nav.getByRole('link', { name: label }).click();
  // The menu slides away after the choice, so the page is not hidden behind it.
  await page.waitForFunction(() => document.querySelector('mat-sidenav')?.classList.contains('mat-drawer-opened') === false);
}

test('at 390 px the vendor signs in and finds the tender in its list; the table scrolls in its own labelled, focusable frame', async () => {
  const { page } = b;
  await page.goto(`${baseUrl()}/sign-in`);
  await page.getByRole('heading', { name: 'Sign in', level: 1 }).waitFor();
  await expectStepFits(page, 'phone-sign-in-390');
  await signIn(page, VENDOR);
  await page.getByRole('heading', { level: 1 }).first().waitFor();
  await openMenuItem(page, 'My tenders');
  await page.getByRole('heading', { name: 'My tenders', level: 1 }).waitFor();
  await page.getByRole('row', { name: new RegExp(OPEN) }).waitFor();
  const frame = page.getByRole('region', { name: 'Tenders, scrolls sideways' });
  // Seven columns do not fit a phone: the frame scrolls, the page does not.
  await expect(frame.evaluate((el) => el.scrollWidth > el.clientWidth)).resolves.toBe(true);
  await expect(frame.getAttribute('tabindex')).resolves.toBe('0');
  await expectStepFits(page, 'phone-tender-list-390');
  // A keyboard scrolls the focused frame with the arrow keys.
  await frame.focus();
  await page.keyboard.press('ArrowRight');
  await page.keyboard.press('ArrowRight');
  await page.waitForFunction(() => (document.activeElement?.scrollLeft ?? 0) > 0);
});

test('at 390 px the vendor reads the tender, enters prices, saves, uploads the workbook and submits after confirming', async () => {
  const { page } = b;
  await signIn(page, VENDOR);
  await page.goto(`${baseUrl()}/tenders`);
  await page.getByRole('link', { name: OPEN }).click();
  await page.getByRole('heading', { name: 'Your bid' }).waitFor();
  await page.getByRole('heading', { name: 'How the contract will be awarded' }).waitFor();
  await expectStepFits(page, 'phone-tender-390');
  await page.getByText('Regions and forecast quantities').click();
  await page.getByRole('table', { name: 'Regions and forecast quantities' }).getByRole('row').nth(REGIONS.length).waitFor();
  await page.getByRole('table', { name: 'Regions and forecast quantities' }).scrollIntoViewIfNeeded();
  await expectStepFits(page, 'phone-tender-regions-390');

  await page.getByLabel(/^Fixed fee/).fill('750');
  await page.getByLabel(/^Capacity cap/).fill('900');
  await page.getByLabel('Unit price, Ballymore upper depot').fill('61.4');
  await page.getByLabel('Unit price, Carrowkeel harbour yard').fill('63');
  // 750 + 61.40 × 240 + 63 × 360 = 38,166.00
  await page.locator('output.total-value').filter({ hasText: '38,166.00' }).waitFor();
  await page.getByRole('button', { name: 'Save draft' }).click();
  await page.getByRole('status').filter({ hasText: 'Draft saved' }).waitFor({ state: 'attached' });
  await page.getByLabel('Unit price, Ballymore upper depot').scrollIntoViewIfNeeded();
  // On a phone each region is a block of its own: the price table needs no sideways scroll at all.
  const prices = page.getByRole('region', { name: 'Unit price per region, scrolls sideways' });
  await expect(prices.evaluate((el) => el.scrollWidth - el.clientWidth)).resolves.toBeLessThanOrEqual(0);
  await expectStepFits(page, 'phone-bid-form-390');

  // The workbook, filled in outside the browser and uploaded: its figures fill the form for review.
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download bid workbook' }).click()]);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tendara-phone-'));
  try {
    const file = path.join(dir, 'phone-bid.xlsx');
    const workbook = await XlsxPopulate.fromFileAsync(await download.path());
    const sheet = workbook.sheet('Bid')!;
    sheet.cell('C4').value(800);
    sheet.cell('C5').value(1000);
    [60.1, 62.5, 64].forEach((price, i) => sheet.cell(`E${8 + i}`).value(price));
    await workbook.toFileAsync(file);
    await page.locator('input[type=file]').setInputFiles(file);
    await page.getByText('review them, then save or submit').waitFor();
    await expect(page.getByLabel('Unit price, Drumlish crossroads store').inputValue()).resolves.toBe('64.00');
    // 800 + 60.10 × 240 + 62.50 × 360 + 64 × 180 = 49,244.00
    await page.locator('output.total-value').filter({ hasText: '49,244.00' }).waitFor();
    await page.getByText('review them, then save or submit').scrollIntoViewIfNeeded();
    await expectStepFits(page, 'phone-bid-upload-390');
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }

  await page.getByRole('button', { name: 'Submit bid' }).click();
  const confirm = page.getByRole('dialog').filter({ hasText: 'Submit your bid?' });
  await waitForDialogFocus(page);
  await confirm.getByText(/You offer 3 of 3 regions, €49,244\.00 at the forecast/).waitFor();
  await expectStepFits(page, 'phone-bid-confirm-390');
  await confirm.getByRole('button', { name: 'Submit bid' }).click();
  await page.getByRole('heading', { name: 'Receipt' }).waitFor();
  await expect(page.locator('.receipt code').first().textContent()).resolves.toMatch(/^[0-9a-f]{64}$/);
  await page.getByRole('heading', { name: 'Receipt' }).scrollIntoViewIfNeeded();
  // The 64-character commitment wraps instead of widening the page.
  await expectStepFits(page, 'phone-bid-receipt-390');
});

test('at 390 px the vendor finds its letter under Notices and reads it', async () => {
  const { page } = b;
  await signIn(page, VENDOR);
  await openMenuItem(page, 'Notices');
  await page.getByRole('heading', { name: 'Notices', level: 1 }).waitFor();
  const row = page.getByRole('table', { name: 'Notices' }).getByRole('row').filter({ hasText: NOTIFIED });
  await row.waitFor();
  await expect(row.count()).resolves.toBe(1);
  await expectStepFits(page, 'phone-notices-390');
  await row.getByRole('link').click();
  await page.getByRole('button', { name: 'Print' }).waitFor();
  await page.frameLocator('iframe').getByText(NOTIFIED).first().waitFor();
  await expectStepFits(page, 'phone-letter-390');
});

/**
 * Every main screen of every role, at desktop (1366 × 768) and phone (390 × 844) width: axe-core
 * finds no serious or critical WCAG 2.1 A/AA violation. Each screen waits for its heading and for
 * its loading bar to go before axe looks. Pictures at 390 px, to look at.
 */
describe('every main screen passes axe at 1366 and at 390 px', () => {
  const VENDOR_SCREENS: [string, () => string][] = [
    ['home', () => '/'], ['tender list', () => '/tenders'], ['tender and bid', () => `/tenders/${openId}`],
    ['notices', () => '/notices'], ['organisation', () => '/organisation'],
  ];
  const BUYER_SCREENS: [string, () => string][] = [
    ['home', () => '/'], ['tender list', () => '/tenders'], ['tender editor', () => '/tenders/new'],
    ['tender', () => `/tenders/${notifiedId}`], ['scenarios', () => `/tenders/${notifiedId}/evaluation`],
    ['run result', () => `/tenders/${notifiedId}/evaluation/runs/${basisRunId}`],
    ['compare', () => `/tenders/${notifiedId}/evaluation/compare?runs=${splitRunId},${basisRunId}`],
    ['recommendation', () => `/tenders/${notifiedId}/evaluation/recommendation`],
    ['audit trail', () => `/tenders/${notifiedId}/evaluation/audit`], ['award notices', () => `/tenders/${notifiedId}/notices`],
    ['notices', () => '/notices'],
  ];
  const COMPLIANCE_SCREENS: [string, () => string][] = [
    ['home', () => '/'], ['tender list', () => '/tenders'], ['recommendation', () => `/tenders/${notifiedId}/evaluation/recommendation`],
  ];
  const ADMIN_SCREENS: [string, () => string][] = [
    ['home', () => '/'], ['people', () => '/people'], ['outbox', () => '/outbox'], ['tender list', () => '/tenders'], ['notices', () => '/notices'],
  ];
  const screens = [
    ...VENDOR_SCREENS.map(([name, path]) => ({ role: 'vendor', email: VENDOR, name, path })),
    ...BUYER_SCREENS.map(([name, path]) => ({ role: 'buyer', email: 'buyer@demo.tendara.test', name, path })),
    ...COMPLIANCE_SCREENS.map(([name, path]) => ({ role: 'compliance', email: 'compliance@demo.tendara.test', name, path })),
    ...ADMIN_SCREENS.map(([name, path]) => ({ role: 'admin', email: 'admin@demo.tendara.test', name, path })),
  ];

  // Signed in once per role, not per screen (each test still signs in when it runs alone).
  let signedInAs: string | null = null;
  test.each(screens)("the $role's $name screen passes axe at 1366 and 390 px", async ({ role, email, name, path: pathOf }) => {
    const { page } = b;
    if (signedInAs !== email) {
      signedInAs = null;
      await signIn(page, email);
      signedInAs = email;
    }
    const found: Record<number, unknown[]> = {};
    for (const width of [1366, 390]) {
      await page.setViewportSize(width === 390 ? { width: 390, height: 844 } : { width: 1366, height: 768 });
      await page.goto(`${baseUrl()}${pathOf()}`);
      await page.getByRole('heading', { level: 1 }).first().waitFor();
      await page.waitForFunction(() => document.querySelector('mat-progress-bar[mode="indeterminate"]') === null);
      await animationsDone(page);
      if (width === 390) await screenshot(page, `phone-${role}-${name.replaceAll(' ', '-')}-390`);
      const violations = await seriousViolations(page);
      if (violations.length) found[width] = violations;
    }
    expect(found).toEqual({});
  });
});
