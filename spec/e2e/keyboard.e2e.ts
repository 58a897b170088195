import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Locator, Page } from 'playwright-core';
import XlsxPopulate from 'xlsx-populate';
import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';
import { closedTender, publishedTender } from './support/closed-tender';

/**
 * Every flow with the keyboard alone (Tab, Shift+Tab, Enter, Space, arrow keys, Escape), at desktop
 * width (1366 × 768): sign-in and the skip link, the bid form with its confirmation, the workbook
 * upload (the file chooser Enter opens is answered with a file, as a person picks one), the
 * scenario editor, compare, recommend, approve and send notices. Each step asserts where the
 * focus lands and that its ring is drawn; dialogs take the focus and give it back to their opener.
 * The tenders are this file's own: an open one to bid on and a closed one to evaluate.
 */
jest.setTimeout(240_000);
const OPEN = 'KBD-2027-001';
const CLOSED = 'KBD-2027-002';
const BIDDER = 'vendor4@demo.tendara.test';
const UPLOADER = 'vendor7@demo.tendara.test';
const OPEN_REGIONS = [
  { code: 'K1', name: 'Kilbride depot', forecast: 300 },
  { code: 'K2', name: 'Knocklong depot', forecast: 200 },
];

let closedId: string;
beforeAll(async () => {
  await publishedTender({ reference: OPEN, title: 'Brine by keyboard, two depots', regions: OPEN_REGIONS, vendors: [BIDDER, UPLOADER] });
  closedId = await closedTender({
    reference: CLOSED, title: 'Grit by keyboard, evaluated',
    regions: [{ code: 'M1', name: 'Moyvalley depot', forecast: 100 }, { code: 'M2', name: 'Mullagh depot', forecast: 200 }],
    bids: [
      { vendor: 'vendor1@demo.tendara.test', fixedFee: 0, capacity: null, prices: { M1: 30, M2: 33 } },
      { vendor: 'vendor2@demo.tendara.test', fixedFee: 0, capacity: null, prices: { M1: 32, M2: 31 } },
      { vendor: 'vendor3@demo.tendara.test', fixedFee: 0, capacity: null, prices: { M1: 35, M2: 35 } },
    ],
  });
});

let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser({ width: 1366, height: 768 });
});
afterAll(() => b.close());

/** Whether `target` (or a control inside it) has the focus. */
function focused(target: Locator): Promise<boolean> {
  return target.evaluate((el) => el === document.activeElement || el.contains(document.activeElement));
}

/**
 * Whether the focused element shows a focus ring: 'shown' when it matches :focus-visible and draws
 * an outline, or Material's focus indicator (a ::before with a border, on it or on its control) is
 * drawn, or it is the input of a focused Material form field (whose outline thickens and takes the
 * primary colour); otherwise what was found, for the failure message.
 */
function ringShown(page: Page): Promise<string> {
  return page.evaluate(() => {
    const el = document.activeElement;
    if (!(el instanceof HTMLElement)) return 'nothing focused';
    const what = `${el.tagName.toLowerCase()}.${Array.from(el.classList).join('.')} "${(el.textContent ?? '').trim().slice(0, 40)}"`;
    if (!el.matches(':focus-visible')) return `${what}: not :focus-visible`;
    const own = getComputedStyle(el);
    if (own.outlineStyle !== 'none' && parseFloat(own.outlineWidth) > 0) return 'shown';
    const field = el.closest('.mat-mdc-form-field');
    if (field?.classList.contains('mat-focused')) {
      const outline = field.querySelector('.mdc-notched-outline__leading');
      if (outline && parseFloat(getComputedStyle(outline).borderTopWidth) >= 2) return 'shown';
    }
    const control = el.closest('.mat-mdc-checkbox, .mat-mdc-radio-button, .mat-mdc-select, .mat-mdc-chip, .mat-mdc-list-item') ?? el;
    const candidates = [control, ...Array.from(control.querySelectorAll('.mat-focus-indicator, .mat-mdc-focus-indicator'))];
    const drawn = candidates.map((c) => {
      const before = getComputedStyle(c, '::before');
      return { content: before.content, display: before.display, border: before.borderTopWidth, cls: c.className };
    });
    if (drawn.some((d) => d.content !== 'none' && d.display !== 'none' && parseFloat(d.border) > 0)) return 'shown';
    return `${what}: outline ${own.outlineStyle} ${own.outlineWidth}; indicators ${JSON.stringify(drawn)}`;
  });
}

/**
 * Presses Tab (or Shift+Tab) until `target` has the focus, as a person would, and checks that its
 * focus ring shows; fails when it is not reached within `max` presses (not on the Tab path).
 */
async function tabTo(page: Page, target: Locator, { back = false, max = 60 } = {}): Promise<number> {
  await target.waitFor();
  for (let presses = 1; presses <= max; presses++) {
    await page.keyboard.press(back ? 'Shift+Tab' : 'Tab');
    if (await focused(target)) {
      expect(await ringShown(page)).toBe('shown');
      return presses;
    }
  }
  const at = await page.evaluate(() => document.activeElement?.outerHTML.slice(0, 160));
  throw new Error(`not reached by ${back ? 'Shift+Tab' : 'Tab'} within ${max} presses (focus is on ${at})`);
}

/** Tabs to a field and types into it (the field's old value selected first, as Ctrl+A would). */
async function typeInto(page: Page, field: Locator, text: string): Promise<void> {
  await tabTo(page, field);
  await page.keyboard.press('ControlOrMeta+A');
  await page.keyboard.type(text);
}

/** Waits until the open dialog holds the focus and returns the focused element's accessible text. */
async function dialogFocus(page: Page): Promise<string> {
  await page.waitForFunction(() => document.activeElement?.closest('mat-dialog-container') != null);
  return page.evaluate(() => (document.activeElement?.textContent ?? '').trim() || (document.activeElement?.getAttribute('aria-label') ?? ''));
}

/** Starts the keyboard path from the top of the page, as after loading it. */
async function fromTop(page: Page): Promise<void> {
  await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
}

async function check(page: Page, name: string): Promise<void> {
  await animationsDone(page);
  await screenshot(page, name);
  expect(await seriousViolations(page)).toEqual([]);
}

test('sign-in by keyboard: Tab to the fields, type, Enter; then the skip link is the first stop and moves the focus to the main content', async () => {
  const { page } = b;
  await page.goto('about:blank');
  await page.context().clearCookies();
  await page.goto(`${baseUrl()}/sign-in`);
  await page.getByRole('heading', { name: 'Sign in', level: 1 }).waitFor();
  await typeInto(page, page.getByLabel('E-mail'), BIDDER);
  await typeInto(page, page.getByLabel('Password', { exact: true }), 'demo-pass-2026');
  // The next stop is the show-password switch, then the button.
  await page.keyboard.press('Tab');
  await expect(focused(page.getByRole('button', { name: 'Show password' }))).resolves.toBe(true);
  await page.keyboard.press('Space');
  // The field's type changes after the key press is handled: wait for it rather than read it at once.
  await page.locator('input[type="text"]').and(page.getByLabel('Password', { exact: true })).waitFor();
  await tabTo(page, page.getByRole('button', { name: 'Sign in' }));
  await check(page, 'keyboard-sign-in-1366');
  await page.keyboard.press('Enter');
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
  await page.getByRole('heading', { level: 1 }).first().waitFor();

  // The skip link, on a page with controls both in the navigation and in the main content.
  await page.goto(`${baseUrl()}/tenders`);
  await page.getByRole('heading', { name: 'My tenders', level: 1 }).waitFor();
  await fromTop(page);
  await page.keyboard.press('Tab');
  const skip = page.getByRole('link', { name: 'Skip to main content' });
  await expect(focused(skip)).resolves.toBe(true);
  await expect(ringShown(page)).resolves.toBe('shown');
  await expect(skip.isVisible()).resolves.toBe(true);
  await screenshot(page, 'keyboard-skip-link-1366');
  await page.keyboard.press('Enter');
  await page.waitForFunction(() => document.activeElement?.id === 'main');
  // From there the next Tab lands on the main content's first control, past the navigation.
  await page.keyboard.press('Tab');
  await page.waitForFunction(() => document.activeElement?.closest('main')?.id === 'main');
  await expect(page.evaluate(() => document.activeElement?.closest('nav') == null)).resolves.toBe(true);
});

test('bid form by keyboard: open the tender from the list, enter prices, save, cancel and then confirm the submission; the dialog takes and returns the focus', async () => {
  const { page } = b;
  await signIn(page, BIDDER);
  await fromTop(page);
  await tabTo(page, page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'My tenders' }));
  await page.keyboard.press('Enter');
  await page.getByRole('heading', { name: 'My tenders', level: 1 }).waitFor();
  await tabTo(page, page.getByRole('link', { name: OPEN }));
  await check(page, 'keyboard-tender-list-1366');
  await page.keyboard.press('Enter');
  await page.getByRole('heading', { name: 'Your bid' }).waitFor();

  await fromTop(page);
  await typeInto(page, page.getByLabel(/^Fixed fee/), '400');
  await typeInto(page, page.getByLabel(/^Capacity cap/), '600');
  // The cap's "No cap" box is toggled with Space, and back.
  await page.keyboard.press('Tab');
  const noCap = page.getByRole('checkbox', { name: 'No cap' });
  await expect(focused(noCap)).resolves.toBe(true);
  await expect(ringShown(page)).resolves.toBe('shown');
  // Each state is rendered after the key press: wait for it rather than read it at once.
  await page.keyboard.press('Space');
  await page.getByRole('checkbox', { name: 'No cap', checked: true }).waitFor();
  await page.keyboard.press('Space');
  await page.getByRole('checkbox', { name: 'No cap', checked: false }).waitFor();
  // "No cap" cleared the cap: Shift+Tab back to it and enter it again.
  await tabTo(page, page.getByLabel(/^Capacity cap/), { back: true });
  await page.keyboard.type('600');
  await typeInto(page, page.getByLabel('Unit price, Kilbride depot'), '52.4');
  await typeInto(page, page.getByLabel('Unit price, Knocklong depot'), '55');
  // 400 + 52.40 × 300 + 55 × 200 = 27,120.00
  await page.locator('output.total-value').filter({ hasText: '27,120.00' }).waitFor();
  await tabTo(page, page.getByRole('button', { name: 'Save draft' }));
  await page.keyboard.press('Enter');
  await page.getByRole('status').filter({ hasText: 'Draft saved' }).waitFor({ state: 'attached' });
  // Leaving a field shows the price as money again, trailing zero kept.
  await expect(page.getByLabel('Unit price, Kilbride depot').inputValue()).resolves.toBe('52.40');

  const submit = page.getByRole('button', { name: 'Submit bid' });
  await tabTo(page, submit);
  await page.keyboard.press('Enter');
  const confirm = page.getByRole('dialog').filter({ hasText: 'Submit your bid?' });
  await confirm.waitFor();
  await expect(dialogFocus(page)).resolves.toBe('Submit bid');
  await expect(ringShown(page)).resolves.toBe('shown');
  await check(page, 'keyboard-bid-confirm-1366');
  // Escape cancels and gives the focus back to the button that opened the dialog.
  await page.keyboard.press('Escape');
  await confirm.waitFor({ state: 'detached' });
  await page.waitForFunction(() => document.activeElement?.textContent?.includes('Submit bid') === true);
  await expect(focused(submit)).resolves.toBe(true);

  await page.keyboard.press('Enter');
  await confirm.waitFor();
  await dialogFocus(page);
  // Shift+Tab reaches Cancel, Tab comes back to the confirming button: the focus stays in the dialog.
  await page.keyboard.press('Shift+Tab');
  await expect(focused(confirm.getByRole('button', { name: 'Cancel' }))).resolves.toBe(true);
  await page.keyboard.press('Tab');
  await expect(focused(confirm.getByRole('button', { name: 'Submit bid' }))).resolves.toBe(true);
  await page.keyboard.press('Enter');
  await page.getByRole('heading', { name: 'Receipt' }).waitFor();
  await expect(page.locator('.receipt code').first().textContent()).resolves.toMatch(/^[0-9a-f]{64}$/);
  await check(page, 'keyboard-bid-receipt-1366');
});

test('workbook upload by keyboard: Enter on "Upload filled workbook" opens the file chooser; the figures fill the form; submitted by keyboard', async () => {
  const { page } = b;
  await signIn(page, UPLOADER);
  await page.goto(`${baseUrl()}/tenders`);
  await page.getByRole('link', { name: OPEN }).click();
  await page.getByRole('heading', { name: 'Your bid' }).waitFor();
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download bid workbook' }).click()]);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tendara-keyboard-'));
  try {
    const file = path.join(dir, 'keyboard-bid.xlsx');
    const workbook = await XlsxPopulate.fromFileAsync(await download.path());
    const sheet = workbook.sheet('Bid')!;
    sheet.cell('C4').value(300);
    sheet.cell('C5').value(800);
    [50.5, 54].forEach((price, i) => sheet.cell(`E${8 + i}`).value(price));
    await workbook.toFileAsync(file);

    // Listening for the chooser from the start, so it is caught however soon Enter opens it.
    const chooser = page.waitForEvent('filechooser', { timeout: 30_000 });
    await fromTop(page);
    await tabTo(page, page.getByRole('button', { name: 'Upload filled workbook' }));
    await page.keyboard.press('Enter');
    await (await chooser).setFiles(file);
    await page.getByText('review them, then save or submit').waitFor();
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
  await expect(page.getByLabel('Unit price, Kilbride depot').inputValue()).resolves.toBe('50.50');
  // 300 + 50.50 × 300 + 54 × 200 = 26,250.00
  await page.locator('output.total-value').filter({ hasText: '26,250.00' }).waitFor();
  await check(page, 'keyboard-bid-upload-1366');

  await tabTo(page, page.getByRole('button', { name: 'Submit bid' }));
  await page.keyboard.press('Enter');
  await expect(dialogFocus(page)).resolves.toBe('Submit bid');
  await page.keyboard.press('Enter');
  await page.getByRole('heading', { name: 'Receipt' }).waitFor();
});

test('scenario editor, runs and compare by keyboard: the dialog opens on its first field, saves with Enter and gives the focus back', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await page.goto(`${baseUrl()}/tenders/${closedId}/evaluation`);
  await page.getByRole('heading', { name: 'Award scenarios', level: 1 }).waitFor();
  await page.getByRole('row', { name: /All regions split/ }).first().waitFor();
  await check(page, 'keyboard-scenarios-1366');

  const opener = page.getByRole('button', { name: 'New scenario' });
  await fromTop(page);
  await tabTo(page, opener);
  await page.keyboard.press('Enter');
  const dialog = page.getByRole('dialog');
  await dialog.getByRole('heading', { name: 'New scenario' }).waitFor();
  await dialogFocus(page);
  await expect(focused(dialog.getByLabel('Scenario name'))).resolves.toBe(true);
  await page.keyboard.type('Sole award, by keyboard');
  // The sourcing radios: Tab into the group, the arrow key picks the next choice.
  await tabTo(page, dialog.getByRole('radio', { name: /^Split award/ }));
  await page.keyboard.press('ArrowDown');
  await dialog.getByRole('radio', { name: /^Sole award/, checked: true }).waitFor();
  await typeInto(page, dialog.getByLabel('Maximum number of vendors'), '2');
  await check(page, 'keyboard-scenario-editor-1366');
  await page.keyboard.press('Enter');
  await dialog.waitFor({ state: 'detached' });
  await page.getByRole('row', { name: /Sole award, by keyboard/ }).getByText(/at most 2 vendors/i).waitFor();
  await page.waitForFunction(() => document.activeElement?.textContent?.includes('New scenario') === true);

  // Run the split and the new scenario, each from its Run button by keyboard; back with the breadcrumb.
  for (const scenario of ['All regions split', 'Sole award, by keyboard']) {
    await fromTop(page);
    await tabTo(page, page.getByRole('button', { name: `Run ${scenario}`, exact: true }));
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/evaluation\/runs\/[0-9a-f-]+$/);
    await page.getByRole('heading', { name: 'Totals' }).waitFor({ timeout: 150_000 });
    await fromTop(page);
    await tabTo(page, page.getByRole('link', { name: '← Award scenarios' }));
    await page.keyboard.press('Enter');
    await page.getByRole('heading', { name: 'Award scenarios', level: 1 }).waitFor();
  }

  for (const scenario of ['All regions split', 'Sole award, by keyboard']) {
    const box = page.getByRole('checkbox', { name: new RegExp(`^Compare ${scenario}`) }).first();
    await fromTop(page);
    await tabTo(page, box);
    await page.keyboard.press('Space');
    await page.getByRole('checkbox', { name: new RegExp(`^Compare ${scenario}`), checked: true }).first().waitFor();
  }
  await tabTo(page, page.getByRole('button', { name: 'Compare selected (2)' }));
  await page.keyboard.press('Enter');
  await page.getByRole('heading', { name: 'Compare runs', level: 1 }).waitFor();
  await page.getByRole('table', { name: /Compared runs/ }).waitFor();
  // The comparison's frame is on the Tab path (it may scroll sideways) and is named.
  await fromTop(page);
  await tabTo(page, page.getByRole('region', { name: 'Compared runs (scrolls sideways)' }));
  await check(page, 'keyboard-compare-1366');
});

test('recommend, approve and send notices by keyboard, each confirmation dialog focused and answered with Enter', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await page.goto(`${baseUrl()}/tenders/${closedId}/evaluation`);
  await page.getByRole('row', { name: /Published award basis/ }).first().waitFor();
  await fromTop(page);
  await tabTo(page, page.getByRole('button', { name: 'Run Published award basis', exact: true }));
  await page.keyboard.press('Enter');
  await page.waitForURL(/\/evaluation\/runs\/[0-9a-f-]+$/);
  await page.getByRole('heading', { name: 'Totals' }).waitFor({ timeout: 150_000 });
  await check(page, 'keyboard-run-result-1366');
  await fromTop(page);
  await tabTo(page, page.getByRole('button', { name: 'Recommend this award' }));
  await page.keyboard.press('Enter');
  const dialog = page.getByRole('dialog');
  await dialogFocus(page);
  await expect(focused(dialog.getByLabel('Justification'))).resolves.toBe(true);
  await page.keyboard.type('Least total cost under the published basis; both depots covered.');
  await tabTo(page, dialog.getByRole('button', { name: 'Recommend', exact: true }));
  await page.keyboard.press('Enter');
  await page.getByRole('heading', { name: 'Award recommendation', level: 1 }).waitFor();
  await page.getByText('Awaiting compliance decision').waitFor();

  await signIn(page, 'compliance@demo.tendara.test');
  await page.goto(`${baseUrl()}/tenders/${closedId}/evaluation/recommendation`);
  await page.getByText('Awaiting compliance decision').waitFor();
  await fromTop(page);
  await typeInto(page, page.getByLabel('Comment'), 'Checked by keyboard; approved.');
  const approve = page.getByRole('button', { name: 'Approve award' });
  await tabTo(page, approve);
  await check(page, 'keyboard-recommendation-1366');
  await page.keyboard.press('Enter');
  const confirm = page.getByRole('dialog');
  await expect(dialogFocus(page)).resolves.toBe('Approve award');
  await page.keyboard.press('Enter');
  await page.locator('.badge[data-status="approved"]').waitFor();

  await signIn(page, 'buyer@demo.tendara.test');
  await page.goto(`${baseUrl()}/tenders/${closedId}/notices`);
  await page.getByRole('heading', { name: 'Award notices', level: 1 }).waitFor();
  await fromTop(page);
  const send = page.getByRole('button', { name: 'Send notices' });
  await tabTo(page, send);
  await check(page, 'keyboard-notice-sender-1366');
  await page.keyboard.press('Enter');
  await confirm.getByText('3 letters will go out by e-mail').waitFor();
  await expect(dialogFocus(page)).resolves.toBe('Send notices');
  await page.keyboard.press('Enter');
  await confirm.waitFor({ state: 'detached' });
  await page.locator('.delivery-summary').filter({ hasText: '3 of 3 sent.' }).waitFor({ timeout: 90_000 });
  await check(page, 'keyboard-notices-sent-1366');
});
