import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';

/**
 * The notification settings page: reached from the account area of the shell, reminders turned off
 * and on with the keyboard alone, legal notices listed as always sent. Each test puts the setting
 * back as it found it (the demo database is shared by every browser test file).
 */
let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

test('a vendor turns closing reminders off with the keyboard, saves, finds the choice kept after a reload, and turns them on again', async () => {
  const { page } = b;
  await signIn(page, 'vendor5@demo.tendara.test');
  await page.getByRole('link', { name: 'Notification settings' }).click();
  await page.getByRole('heading', { name: 'Notification settings', level: 1 }).waitFor();
  const toggle = page.getByRole('switch', { name: 'Closing reminders' });
  await toggle.waitFor();
  await expect(toggle.getAttribute('aria-checked')).resolves.toBe('true');
  // A vendor is not offered the buyer's and compliance's updates.
  await expect(page.getByRole('switch', { name: /Updates on recommendations/ }).count()).resolves.toBe(0);
  await expect(page.getByRole('heading', { name: 'Legal notices, always sent' }).isVisible()).resolves.toBe(true);
  await expect(page.getByRole('listitem').filter({ hasText: 'Award and regret letters' }).isVisible()).resolves.toBe(true);
  await animationsDone(page);
  await screenshot(page, 'settings-vendor-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await toggle.focus();
  await page.keyboard.press('Space');
  // The switch's state is rendered after the key press: wait for it rather than read it at once.
  await page.getByRole('switch', { name: 'Closing reminders', checked: false }).waitFor();
  await page.keyboard.press('Tab');
  await expect(page.evaluate(() => document.activeElement?.textContent?.trim())).resolves.toBe('Save settings');
  await page.keyboard.press('Enter');
  await page.getByRole('status').filter({ hasText: 'Your notification settings are saved.' }).waitFor();

  await page.reload();
  await page.getByRole('switch', { name: 'Closing reminders' }).waitFor();
  await page.getByRole('switch', { name: 'Closing reminders', checked: false }).waitFor();
  await page.getByRole('switch', { name: 'Closing reminders' }).focus();
  await page.keyboard.press('Space');
  await page.getByRole('button', { name: 'Save settings' }).press('Enter');
  await page.getByRole('status').filter({ hasText: 'Your notification settings are saved.' }).waitFor();
  await page.getByRole('switch', { name: 'Closing reminders', checked: true }).waitFor();
});

test('at phone width the buyer opens the settings from the account menu and is offered updates on recommendations and the standstill', async () => {
  const phone = await openBrowser({ width: 390, height: 844 });
  try {
    const { page } = phone;
    await signIn(page, 'buyer@demo.tendara.test');
    await page.getByRole('button', { name: /^Account: / }).click();
    await page.getByRole('menuitem', { name: 'Notification settings' }).click();
    await page.waitForURL(`${baseUrl()}/settings`);
    await page.getByRole('switch', { name: 'Updates on recommendations and the standstill' }).waitFor();
    await expect(page.getByRole('switch', { name: 'Closing reminders' }).count()).resolves.toBe(0);
    await expect(page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).resolves.toBe(true);
    await animationsDone(page);
    await screenshot(page, 'settings-buyer-390');
    expect(await seriousViolations(page)).toEqual([]);
  } finally {
    await phone.close();
  }
});
