import { MikroORM } from '@mikro-orm/postgresql';
import { MailMessage } from '../../server/entities';
import { ormConfig } from '../../server/mikro-orm.config';
import { waitFor } from '../support/wait';
import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';

/** The administrator's pages, and a new person's path from invitation e-mail to first sign-in. */
let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

async function latestLinkTo(email: string): Promise<string> {
  const orm = await MikroORM.init(ormConfig(process.env['E2E_DATABASE_URL']!));
  try {
    const link = await waitFor(`a set-password e-mail to ${email}`, async () => {
      const mail = await orm.em.fork().findOne(MailMessage, { toAddresses: { $contains: [email] } }, { orderBy: { createdAt: 'desc' } });
      return mail?.text.match(/https?:\/\/\S+\/account-setup\/[A-Za-z0-9_-]+/)?.[0];
    }, { timeoutMs: 15_000, everyMs: 200 });
    return new URL(link).pathname;
  } finally {
    await orm.close();
  }
}

test('the admin invites a person from the People page; the e-mail shows in the Outbox; the person sets a password and signs in', async () => {
  const { page } = b;
  await signIn(page, 'admin@demo.tendara.test');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'People' }).click();
  await page.getByRole('heading', { name: 'People', level: 1 }).waitFor();
  await page.getByRole('table', { name: 'People' }).getByRole('row', { name: /Owen Marsh/ }).waitFor();
  await screenshot(page, 'people-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await page.getByRole('button', { name: 'Invite person' }).click();
  const dialog = page.getByRole('dialog');
  // The dialog moves focus to its first field once open; typing before that would land there.
  await page.waitForFunction(() => document.activeElement?.closest('mat-dialog-container') != null && document.activeElement?.tagName === 'INPUT');
  await dialog.getByLabel('Name').fill('Lena Hartley');
  await dialog.getByLabel('E-mail').fill('lena.hartley@northvale.test');
  await dialog.getByRole('combobox', { name: 'Role' }).click();
  await page.getByRole('option', { name: 'Compliance officer' }).click();
  expect(await seriousViolations(page)).toEqual([]);
  await dialog.getByRole('button', { name: 'Send invitation' }).click();
  await page.getByRole('row', { name: /Lena Hartley/ }).getByText('Invitation pending').waitFor();

  const path = await latestLinkTo('lena.hartley@northvale.test');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Outbox' }).click();
  await page.getByRole('heading', { name: 'Outbox', level: 1 }).waitFor();
  // The search is kept in the address, so a reload or a shared link shows the same messages.
  await page.getByLabel('Search subject or address').fill('lena.hartley');
  await page.getByRole('button', { name: 'Search' }).click();
  await page.waitForURL((u) => u.searchParams.get('q') === 'lena.hartley');
  await page.reload();
  await expect(page.getByLabel('Search subject or address').inputValue()).resolves.toBe('lena.hartley');
  await page.getByRole('row', { name: /lena\.hartley@northvale\.test/ }).first().waitFor();
  await expect(page.getByRole('row', { name: /vendor1@demo/ }).count()).resolves.toBe(0);
  await screenshot(page, 'outbox-search-1280');
  expect(await seriousViolations(page)).toEqual([]);
  await page.getByText('Your Tendara account: set your password').first().click();
  await page.frameLocator('iframe').getByText('Set your password').waitFor();
  await screenshot(page, 'outbox-message-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await page.getByRole('button', { name: /sign out/i }).click();
  await page.waitForURL((u) => u.pathname.startsWith('/sign-in'));
  await page.goto(`${baseUrl()}${path}`);
  await page.getByLabel('New password').fill('a-long-enough-secret');
  await page.getByLabel('Repeat the password').fill('a-long-enough-secret');
  expect(await seriousViolations(page)).toEqual([]);
  await screenshot(page, 'account-setup-1280');
  await page.getByRole('button', { name: 'Set password' }).click();
  await page.getByText(/password is set|sign in/i).first().waitFor();
  await signIn(page, 'lena.hartley@northvale.test', 'a-long-enough-secret');
  await page.getByText('Compliance officer', { exact: true }).first().waitFor();
  // Many steps, each waiting on a busy shared machine at times: more than the default minute.
}, 120_000);

test('an admin adds a person to a vendor firm; the firm\'s contact approves them on My organisation before they get a link', async () => {
  const { page } = b;
  await signIn(page, 'admin@demo.tendara.test');
  await page.goto(`${baseUrl()}/people`);
  await page.getByRole('button', { name: 'Invite person' }).click();
  const dialog = page.getByRole('dialog');
  await page.waitForFunction(() => document.activeElement?.closest('mat-dialog-container') != null && document.activeElement?.tagName === 'INPUT');
  await dialog.getByLabel('Name').fill('Nadia Quarry');
  await dialog.getByLabel('E-mail').fill('nadia@quarnby.test');
  await dialog.getByRole('combobox', { name: 'Role' }).click();
  await page.getByRole('option', { name: 'Vendor' }).click();
  await dialog.getByRole('combobox', { name: /organisation/i }).click();
  await page.getByRole('option', { name: /Quarnby Minerals/ }).click();
  await dialog.getByRole('button', { name: 'Send invitation' }).click();
  await page.getByRole('row', { name: /Nadia Quarry/ }).getByText('Awaiting firm’s approval').waitFor();
  await page.getByRole('heading', { name: 'Admin audit trail' }).scrollIntoViewIfNeeded();
  await page.getByRole('cell', { name: /^Asked the firm to accept Nadia Quarry/ }).first().waitFor();
  await screenshot(page, 'people-audit-1280');
  expect(await seriousViolations(page)).toEqual([]);

  await signIn(page, 'vendor1@demo.tendara.test');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'My organisation' }).click();
  await page.getByRole('heading', { name: 'My organisation', level: 1 }).waitFor();
  await page.getByText('nadia@quarnby.test').first().waitFor();
  await screenshot(page, 'organisation-1280');
  expect(await seriousViolations(page)).toEqual([]);
  await page.getByRole('button', { name: 'Approve Nadia Quarry' }).click();
  await page.getByRole('dialog').getByRole('button', { name: 'Approve' }).click();
  await page.getByRole('status').getByText(/approved and has been sent a link/).waitFor();
  await latestLinkTo('nadia@quarnby.test');
}, 120_000);

test('on a phone (390×844) the sign-in page, the menu and the People page fit the screen', async () => {
  const phone = await openBrowser({ width: 390, height: 844 });
  try {
    const { page } = phone;
    await page.goto(`${baseUrl()}/sign-in`);
    await page.getByRole('button', { name: 'Sign in' }).waitFor();
    await screenshot(page, 'sign-in-390');
    await signIn(page, 'admin@demo.tendara.test');
    await page.goto(`${baseUrl()}/people`);
    await page.getByRole('table', { name: 'People' }).getByRole('row', { name: /Owen Marsh/ }).waitFor();
    await screenshot(page, 'people-390');
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await page.getByRole('button', { name: 'Navigation' }).click();
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Outbox' }).waitFor();
    await animationsDone(page); // the menu has finished sliding in before the picture
    await screenshot(page, 'menu-390');
    expect(await seriousViolations(page)).toEqual([]);
  } finally {
    await phone.close();
  }
});
