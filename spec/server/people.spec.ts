import { AccountToken, User, VendorOrganisation } from '../../server/entities';
import { Browser, makeUser, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';

let t: TestApp;
let admin: Browser;
beforeAll(async () => {
  t = await startTestApp();
  admin = await signedIn(t, await makeUser(t, 'admin'));
});
afterAll(() => t.close());

function linkFrom(text: string): string {
  const m = text.match(/http:\/\/tendara\.test\/account-setup\/([A-Za-z0-9_-]+)/);
  if (!m) throw new Error(`no link in: ${text}`);
  return m[1];
}

test('inviting a person e-mails a one-time link; the person sets a password and signs in', async () => {
  const res = await admin.post('/api/users', { name: 'Hana Ruiz', email: 'hana.ruiz@council.test', role: 'buyer' });
  expect(res.status).toBe(201);
  expect(res.body).toMatchObject({ email: 'hana.ruiz@council.test', role: 'buyer', active: true, invitationPending: true });

  const mail = await waitForMail(t, 'hana.ruiz@council.test');
  expect(mail.subject).toBe('Your Tendara account: set your password');
  expect(mail.html).toContain('Set your password');
  const token = linkFrom(mail.text);
  // Only the hash is stored.
  const stored = await t.em().find(AccountToken, {});
  expect(stored.some((s) => s.tokenHash === token)).toBe(false);

  const anon = await new Browser(t.app).init();
  const info = await anon.get(`/api/account-setup/${token}`);
  expect(info.status).toBe(200);
  expect(info.body).toMatchObject({ email: 'hana.ruiz@council.test', name: 'Hana Ruiz' });

  const short = await anon.post(`/api/account-setup/${token}`, { password: 'too-short' });
  expect(short.status).toBe(400);
  expect(short.body.errors).toEqual([{ field: 'password', message: 'Password must be at least 12 characters.' }]);

  expect((await anon.post(`/api/account-setup/${token}`, { password: 'a-long-enough-secret' })).status).toBe(204);
  // Spent: a second use is refused.
  expect((await anon.post(`/api/account-setup/${token}`, { password: 'another-long-secret' })).status).toBe(404);
  expect((await anon.signIn('hana.ruiz@council.test', 'a-long-enough-secret')).status).toBe(200);
});

test('an expired link is refused', async () => {
  await admin.post('/api/users', { name: 'Late Comer', email: 'late@council.test', role: 'compliance' });
  const token = linkFrom((await waitForMail(t, 'late@council.test')).text);
  const em = t.em();
  const user = await em.findOneOrFail(User, { email: 'late@council.test' });
  await em.nativeUpdate(AccountToken, { user }, { expiresAt: new Date(Date.now() - 1000) });
  const anon = await new Browser(t.app).init();
  const res = await anon.get(`/api/account-setup/${token}`);
  expect(res.status).toBe(404);
  expect(res.body.detail).toMatch(/used, expired or unknown/);
});

test('an e-mail already in use, in any case, is refused with 409 naming the field, and nothing is stored', async () => {
  await admin.post('/api/users', { name: 'First', email: 'same@council.test', role: 'buyer' });
  const before = await t.em().count(User, {});
  const res = await admin.post('/api/users', { name: 'Second', email: 'SAME@Council.test', role: 'buyer' });
  expect(res.status).toBe(409);
  expect(res.body.errors).toEqual([{ field: 'email', message: 'This e-mail already has an account.' }]);
  expect(await t.em().count(User, {})).toBe(before);
});

test('bad invitations are refused with 400 naming each field, and nothing is stored', async () => {
  const before = await t.em().count(User, {});
  const res = await admin.post('/api/users', { name: 'x'.repeat(500), email: 'not-an-email', role: 'emperor' });
  expect(res.status).toBe(400);
  expect(res.body.errors.map((e: { field: string }) => e.field).sort()).toEqual(['email', 'name', 'role']);
  const vendor = await admin.post('/api/users', { name: 'V', email: 'v@firm.test', role: 'vendor' });
  expect(vendor.status).toBe(400);
  expect(vendor.body.errors).toEqual([{ field: 'vendorOrganisationId', message: 'A vendor must belong to a vendor organisation.' }]);
  expect(await t.em().count(User, {})).toBe(before);
});

test('a vendor is invited into an organisation registered by the admin', async () => {
  const org = await admin.post('/api/vendor-organisations', { name: 'Fenwick Grit', registrationNumber: 'FG-1', sme: true, contactEmail: 'office@fenwick.test' });
  expect(org.status).toBe(201);
  const dup = await admin.post('/api/vendor-organisations', { name: 'Other', registrationNumber: 'FG-1', sme: false, contactEmail: 'o@o.test' });
  expect(dup.status).toBe(409);
  expect(dup.body.errors[0].field).toBe('registrationNumber');
  const res = await admin.post('/api/users', { name: 'Vic', email: 'vic@fenwick.test', role: 'vendor', vendorOrganisationId: org.body.id });
  expect(res.status).toBe(201);
  expect(res.body.vendorOrganisation).toEqual({ id: org.body.id, name: 'Fenwick Grit' });
  expect(await t.em().count(VendorOrganisation, { name: 'Fenwick Grit' })).toBe(1);
});

test('deactivating a person ends their sessions at once; reactivating lets them sign in again', async () => {
  const user = await makeUser(t, 'buyer');
  const session = await signedIn(t, user);
  expect((await session.get('/api/session')).status).toBe(200);
  const res = await admin.post(`/api/users/${user.id}/deactivate`);
  expect(res.status).toBe(200);
  expect(res.body.active).toBe(false);
  expect((await session.get('/api/session')).status).toBe(401);
  expect((await (await new Browser(t.app).init()).signIn(user.email)).status).toBe(401);
  await admin.post(`/api/users/${user.id}/reactivate`);
  expect((await (await new Browser(t.app).init()).signIn(user.email)).status).toBe(200);
});

test('an admin cannot deactivate their own account', async () => {
  const me = (await admin.get('/api/session')).body.user;
  const res = await admin.post(`/api/users/${me.id}/deactivate`);
  expect(res.status).toBe(409);
});

test('a bad id in the path is a 400 naming the field', async () => {
  const res = await admin.post('/api/users/not-a-uuid/deactivate');
  expect(res.status).toBe(400);
  expect(res.body.errors).toEqual([{ field: 'id', message: 'Must be a valid id.' }]);
});

test('the people list shows everyone with role, organisation and status', async () => {
  const org = await admin.post('/api/vendor-organisations', { name: 'Listed Grit', registrationNumber: 'LG-1', sme: false, contactEmail: 'office@listed.test' });
  expect(org.status).toBe(201);
  expect((await admin.post('/api/users', { name: 'Lis', email: 'lis@listed.test', role: 'vendor', vendorOrganisationId: org.body.id })).status).toBe(201);
  const res = await admin.get('/api/users');
  expect(res.status).toBe(200);
  const listed = res.body.find((p: { email: string }) => p.email === 'lis@listed.test');
  expect(listed).toMatchObject({ role: 'vendor', active: true, invitationPending: true, vendorOrganisation: { name: 'Listed Grit' } });
});

test('the outbox lists caught mail newest first and shows one message with text and HTML', async () => {
  await admin.post('/api/users', { name: 'Outbox Reader', email: 'outbox@council.test', role: 'buyer' });
  const mail = await waitForMail(t, 'outbox@council.test');
  const list = await admin.get('/api/outbox');
  expect(list.status).toBe(200);
  // Newest first (other tests' mail may still be arriving, so look the message up rather than assume it is first).
  const dates = list.body.messages.map((m: { date: string }) => Date.parse(m.date));
  expect(dates).toEqual([...dates].sort((a, b) => b - a));
  expect(list.body.messages.find((m: { id: string }) => m.id === mail.id)).toMatchObject({ to: ['outbox@council.test'], hasHtml: true });
  const one = await admin.get(`/api/outbox/${mail.id}`);
  expect(one.body.text).toContain('Dear Outbox Reader');
  expect(one.body.html).toContain('<html');
});

test('the outbox searches subject and addresses (wildcards taken literally) and pages its results', async () => {
  for (const n of [1, 2, 3]) await admin.post('/api/users', { name: `Paged Reader ${n}`, email: `paged${n}@outbox-search.test`, role: 'buyer' });
  for (const n of [1, 2, 3]) await waitForMail(t, `paged${n}@outbox-search.test`);
  const first = await admin.get('/api/outbox?q=OUTBOX-SEARCH&pageSize=2');
  expect(first.status).toBe(200);
  expect(first.body).toMatchObject({ total: 3, page: 1, pageSize: 2 });
  expect(first.body.messages).toHaveLength(2);
  const second = await admin.get('/api/outbox?q=outbox-search&pageSize=2&page=2');
  expect(second.body.messages).toHaveLength(1);
  const seen = [...first.body.messages, ...second.body.messages].map((m: { to: string[] }) => m.to[0]).sort();
  expect(seen).toEqual(['paged1@outbox-search.test', 'paged2@outbox-search.test', 'paged3@outbox-search.test']);
  // "%" is a character to find, not "anything".
  expect((await admin.get('/api/outbox?q=%25')).body.total).toBe(0);
  const bad = await admin.get('/api/outbox?pageSize=500');
  expect(bad.status).toBe(400);
  expect(bad.body.errors[0].field).toBe('pageSize');
});

test('the API document lists every route with its roles', async () => {
  const res = await admin.get('/api/openapi.json');
  expect(res.body.openapi).toBe('3.1.0');
  expect(res.body.paths['/api/users'].post['x-roles']).toEqual(['admin']);
  expect(res.body.paths['/api/users'].post.requestBody.content['application/json'].schema.properties.email).toEqual({ type: 'string', maxLength: 254 });
  expect(res.body.paths['/api/users/{id}/deactivate'].post.responses['403']).toEqual({
    description: 'Role not allowed, or missing XSRF token',
    content: { 'application/problem+json': { schema: { $ref: '#/components/schemas/Problem' } } },
  });
});
