import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import AxeBuilder from '@axe-core/playwright';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

export const baseUrl = () => {
  const url = process.env['E2E_BASE_URL'];
  if (!url) throw new Error('E2E_BASE_URL is not set: run the browser tests through `npm test`.');
  return url;
};

/** Where screenshots go (looked at by people; not compared by the tests). */
export const SHOTS = path.join(__dirname, '..', '..', '..', '.test-results', 'screenshots');

/** Debian's Chromium, headless, with no network chatter (this machine has no internet). */
export async function openBrowser(viewport = { width: 1280, height: 800 }): Promise<{ context: BrowserContext; page: Page; close(): Promise<void> }> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tendara-chromium-'));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium',
    headless: true,
    viewport,
    locale: 'en-GB',
    timezoneId: 'Europe/London',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'],
  });
  context.setDefaultTimeout(15_000);
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    async close() {
      await context.close();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Signs in from a clean slate (any earlier session's cookies dropped). */
export async function signIn(page: Page, email: string, password = 'demo-pass-2026'): Promise<void> {
  // Leave the page first: a poll still in flight would answer with the old session's cookie
  // (sessions roll on every answer) after the cookies were cleared.
  await page.goto('about:blank');
  await page.context().clearCookies();
  await page.goto(`${baseUrl()}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'));
}

export async function screenshot(page: Page, name: string): Promise<void> {
  fs.mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: true });
}

/** axe-core on the current page (WCAG 2.0/2.1 A and AA); returns the serious and critical violations. */
export async function seriousViolations(page: Page): Promise<{ id: string; impact: string | null | undefined; help: string; targets: string[] }[]> {
  // Frames are left out: the only ones are sandboxed e-mail previews (no scripts may run there,
  // so axe cannot enter them, and their content is the message, not our screen).
  const results = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).options({ iframes: false }).setLegacyMode(true).analyze();
  return results.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => ({ id: v.id, impact: v.impact, help: v.help, targets: v.nodes.map((n) => n.target.join(' ')) }));
}

/**
 * Waits until no CSS animation or transition is running (a menu sliding in, a dialog opening; the
 * endless ones of progress indicators aside), then for one more frame: before a picture, instead
 * of a fixed pause.
 */
export async function animationsDone(page: Page): Promise<void> {
  await page.waitForFunction(() => document.getAnimations().every((a) => a.playState !== 'running' || a.effect?.getComputedTiming().iterations === Infinity));
  await page.evaluate(() => new Promise<void>((resolve) => requestAnimationFrame(() => resolve())));
}

/**
 * Opens a tender from the tender list by its reference and waits for its page. The list comes a
 * page at a time, so it is searched for the reference first, as a person would.
 */
export async function openTender(page: Page, reference: string): Promise<void> {
  await page.goto(`${baseUrl()}/tenders?q=${encodeURIComponent(reference)}`);
  // In the list's own table: the home page's worklist links also begin with a tender's reference.
  await page.getByRole('table', { name: 'Tenders' }).getByRole('link', { name: reference, exact: true }).click();
  await page.getByRole('heading', { level: 1 }).waitFor();
}

/** Waits until the focus is inside the open dialog (Material moves it there once the dialog is shown). */
export async function waitForDialogFocus(page: Page): Promise<void> {
  await page.waitForFunction(() => document.activeElement?.closest('mat-dialog-container') != null);
}
