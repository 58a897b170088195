import { baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';

/** A new user's first minutes: sign in as each role, see that role's navigation, sign out. */
const ROLES = [
  { email: 'admin@demo.tendara.test', role: 'Administrator', nav: ['Overview', 'Tenders', 'Notices', 'People', 'Outbox'] },
  { email: 'buyer@demo.tendara.test', role: 'Buyer', nav: ['Overview', 'Tenders', 'Notices'] },
  { email: 'compliance@demo.tendara.test', role: 'Compliance officer', nav: ['Overview', 'Tenders', 'Notices'] },
  { email: 'vendor1@demo.tendara.test', role: 'Vendor', nav: ['Overview', 'My tenders', 'Notices', 'My organisation'] },
];

let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

test('the sign-in page has no serious accessibility violations', async () => {
  await b.page.goto(`${baseUrl()}/sign-in`);
  await b.page.getByRole('heading', { name: /sign in/i }).waitFor();
  await screenshot(b.page, 'sign-in-1280');
  expect(await seriousViolations(b.page)).toEqual([]);
});

test('a wrong password shows the server message and keeps the person on the sign-in page', async () => {
  await b.page.goto(`${baseUrl()}/sign-in`);
  await b.page.getByLabel('E-mail').fill('buyer@demo.tendara.test');
  await b.page.getByLabel('Password', { exact: true }).fill('not-the-password');
  await b.page.getByRole('button', { name: 'Sign in' }).click();
  await b.page.getByText('E-mail or password is not correct.').waitFor();
  expect(new URL(b.page.url()).pathname).toBe('/sign-in');
});

test.each(ROLES)('$role signs in, sees their navigation, and signs out', async ({ email, role, nav }) => {
  await signIn(b.page, email);
  const navigation = b.page.getByRole('navigation', { name: 'Main' });
  await navigation.waitFor();
  const links = await navigation.getByRole('link').allInnerTexts();
  // The icon's ligature first; after Overview, the count of worklist items, if any.
  expect(links.map((l) => l.replace(/^\S+\s+/, '').replace(/\s+\d+$/, '').trim())).toEqual(nav);
  await b.page.getByText(role, { exact: true }).first().waitFor();
  await screenshot(b.page, `home-${role.toLowerCase().replace(/\s+/g, '-')}`);
  expect(await seriousViolations(b.page)).toEqual([]);
  await b.page.getByRole('button', { name: /sign out/i }).click();
  await b.page.waitForURL((url) => url.pathname.startsWith('/sign-in'));
});

test('a vendor who opens an admin page lands on the no-access page', async () => {
  await signIn(b.page, 'vendor2@demo.tendara.test');
  await b.page.goto(`${baseUrl()}/people`);
  await b.page.getByRole('heading', { name: /no access/i }).waitFor();
  expect(await seriousViolations(b.page)).toEqual([]);
  await b.page.getByRole('button', { name: /sign out/i }).click();
});
