import { isCommonPassword } from '../../server/auth/common-passwords';
import { AccountToken, User, VendorOrganisation } from '../../server/entities';
import { HIDDEN_LINK, readOutboxMessage } from '../../server/services/outbox.service';
import { Browser, makeUser, signedIn, startTestApp, TEST_PASSWORD, waitForMail, type TestApp } from '../support/app';
import { openTender, tenderBody } from '../support/tenders';

/**
 * Issue 12, point 3 (no way into a vendor's account or firm), the password reset of point 5 and
 * the refused new-vendor invitation of point 6.
 */
jest.setTimeout(30_000);

let t: TestApp;
let admin: Browser;
let adminUser: User;
beforeAll(async () => {
  t = await startTestApp();
  adminUser = await makeUser(t, 'admin');
  admin = await signedIn(t, adminUser);
});
afterAll(() => t.close());

function linkFrom(text: string): string {
  const m = text.match(/http:\/\/tendara\.test\/account-setup\/([A-Za-z0-9_-]+)/);
  if (!m) throw new Error(`no link in: ${text}`);
  return m[1];
}

/** Set-password mails queued but not yet sent, plus those sent (pg-boss keeps both in its job table). */
async function mailJobs(): Promise<number> {
  const rows = await t.em().execute<{ n: string }[]>(`select count(*) as n from pgboss.job where name = 'mail-send'`);
  return Number(rows[0].n);
}

/** Mail jobs queued (or sent) to `to` whose subject starts with `subject`; read as the queue holds them, no waiting. */
async function mailJobsTo(to: string, subject = ''): Promise<number> {
  const rows = await t.em().execute<{ n: string }[]>(
    `select count(*) as n from pgboss.job where name = 'mail-send' and data->>'to' = ? and starts_with(data->>'subject', ?)`, [to, subject],
  );
  return Number(rows[0].n);
}

describe('a vendor organisation decides who joins it', () => {
  test('an admin cannot put a person into a vendor organisation that has people: the account is pending, has no link and cannot sign in until the contact approves', async () => {
    const contactUser = await makeUser(t, 'vendor');
    const org = contactUser.vendorOrganisation!;
    const buyer = await signedIn(t, await makeUser(t, 'buyer'));
    const tenderId = await openTender(buyer, [org.id]);

    const res = await admin.post('/api/users', { name: 'Mallory Inside', email: 'mallory@intruder.test', role: 'vendor', vendorOrganisationId: org.id });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ membership: 'pending', vendorOrganisation: { id: org.id } });
    // No link exists for the pending account, so neither the admin nor the Outbox has one.
    const mallory = await t.em().findOneOrFail(User, { email: 'mallory@intruder.test' });
    expect(await t.em().count(AccountToken, { user: mallory })).toBe(0);
    expect((await admin.post(`/api/users/${mallory.id}/invitation`)).status).toBe(409);
    expect((await admin.post(`/api/users/${mallory.id}/password-reset`)).status).toBe(409);
    // Even with a password set behind the app's back, the pending account cannot sign in.
    const hash = (await t.em().findOneOrFail(User, { id: contactUser.id }, { populate: ['passwordHash'] })).passwordHash;
    await t.em().nativeUpdate(User, { id: mallory.id }, { passwordHash: hash });
    expect((await (await new Browser(t.app).init()).signIn('mallory@intruder.test')).status).toBe(401);
    await t.em().nativeUpdate(User, { id: mallory.id }, { passwordHash: null });

    // A tender published to the firm meanwhile is e-mailed to its contact, not to the pending person.
    await openTender(buyer, [org.id]);
    expect(await mailJobsTo(contactUser.email, 'Invitation to tender')).toBeGreaterThan(0);
    expect(await mailJobsTo('mallory@intruder.test')).toBe(0);

    // The contact is asked, and approves in the app; only then does the person get a link.
    const ask = await waitForMail(t, contactUser.email, 'Approve a new person');
    expect(ask.text).toContain('mallory@intruder.test');
    const contact = await signedIn(t, contactUser);
    const members = await contact.get('/api/organisation/members');
    expect(members.status).toBe(200);
    expect(members.body.youAreContact).toBe(true);
    expect(members.body.people.find((p: { id: string }) => p.id === mallory.id)).toMatchObject({ membership: 'pending' });
    const approved = await contact.post(`/api/organisation/members/${mallory.id}/approve`);
    expect(approved.status).toBe(200);
    expect((await contact.post(`/api/organisation/members/${mallory.id}/refuse`)).status).toBe(409);
    const token = linkFrom((await waitForMail(t, 'mallory@intruder.test', 'Your Tendara account')).text);
    const anon = await new Browser(t.app).init();
    expect((await anon.post(`/api/account-setup/${token}`, { password: 'approved-by-the-firm' })).status).toBe(204);
    const member = await new Browser(t.app).init();
    expect((await member.signIn('mallory@intruder.test', 'approved-by-the-firm')).status).toBe(200);
    expect((await member.get(`/api/tenders/${tenderId}`)).status).toBe(200);
  });

  test('only the organisation\'s contact decides: another member gets 403, a vendor of another firm 404; a refused person stays unusable', async () => {
    const contactUser = await makeUser(t, 'vendor');
    const org = contactUser.vendorOrganisation!;
    const first = await admin.post('/api/users', { name: 'Second Member', email: 'second@firm-a.test', role: 'vendor', vendorOrganisationId: org.id });
    const contact = await signedIn(t, contactUser);
    await contact.post(`/api/organisation/members/${first.body.id}/approve`);
    const secondToken = linkFrom((await waitForMail(t, 'second@firm-a.test', 'Your Tendara account')).text);
    await (await new Browser(t.app).init()).post(`/api/account-setup/${secondToken}`, { password: 'second-member-secret' });
    const second = await new Browser(t.app).init();
    expect((await second.signIn('second@firm-a.test', 'second-member-secret')).status).toBe(200);

    const pending = await admin.post('/api/users', { name: 'Third Person', email: 'third@firm-a.test', role: 'vendor', vendorOrganisationId: org.id });
    expect(pending.body.membership).toBe('pending');
    const notContact = await second.post(`/api/organisation/members/${pending.body.id}/approve`);
    expect(notContact.status).toBe(403);
    const outsider = await signedIn(t, await makeUser(t, 'vendor'));
    expect((await outsider.post(`/api/organisation/members/${pending.body.id}/approve`)).status).toBe(404);

    const refused = await contact.post(`/api/organisation/members/${pending.body.id}/refuse`);
    expect(refused.status).toBe(200);
    const third = await t.em().findOneOrFail(User, { id: pending.body.id });
    expect(third).toMatchObject({ membership: 'refused', active: false });
    expect(await t.em().count(AccountToken, { user: third })).toBe(0);
    expect((await admin.post(`/api/users/${third.id}/reactivate`)).status).toBe(409);
  });

  test('the first account of a new organisation is its contact and gets its link at once', async () => {
    const org = await admin.post('/api/vendor-organisations', { name: 'Empty Firm', registrationNumber: 'EF-1', sme: true, contactEmail: 'office@empty-firm.test' });
    const res = await admin.post('/api/users', { name: 'Office', email: 'office@empty-firm.test', role: 'vendor', vendorOrganisationId: org.body.id });
    expect(res.body.membership).toBe('approved');
    await waitForMail(t, 'office@empty-firm.test', 'Your Tendara account');
  });
});

describe('links and resets', () => {
  test('a fresh set-password link is only for an account that never set a password: an active account gets 409 and keeps its password', async () => {
    const user = await makeUser(t, 'buyer');
    const res = await admin.post(`/api/users/${user.id}/invitation`);
    expect(res.status).toBe(409);
    expect(res.body.detail).toMatch(/password reset/);
    expect(await t.em().count(AccountToken, { user })).toBe(0);
    expect((await (await new Browser(t.app).init()).signIn(user.email)).status).toBe(200);
  });

  test('a password reset goes to the person\'s own address, and using it ends every session of theirs', async () => {
    const user = await makeUser(t, 'compliance');
    const phone = await signedIn(t, user);
    const laptop = await signedIn(t, user);
    const res = await admin.post(`/api/users/${user.id}/password-reset`);
    expect(res.status).toBe(202);
    const mail = await waitForMail(t, user.email, 'Your Tendara account: choose a new password');
    expect(mail.toAddresses).toEqual([user.email]);
    const token = linkFrom(mail.text);
    const anon = await new Browser(t.app).init();
    expect((await anon.get(`/api/account-setup/${token}`)).body.purpose).toBe('reset');
    // Until the link is used, the present password and sessions still work.
    expect((await phone.get('/api/session')).status).toBe(200);
    expect((await anon.post(`/api/account-setup/${token}`, { password: 'a-brand-new-secret' })).status).toBe(204);
    expect((await phone.get('/api/session')).status).toBe(401);
    expect((await laptop.get('/api/session')).status).toBe(401);
    expect((await (await new Browser(t.app).init()).signIn(user.email)).status).toBe(401);
    expect((await (await new Browser(t.app).init()).signIn(user.email, 'a-brand-new-secret')).status).toBe(200);
  });

  test('a password of only spaces or a common one is refused with 400 naming password; the link stays usable', async () => {
    await admin.post('/api/users', { name: 'Weak Choice', email: 'weak@council.test', role: 'buyer' });
    const token = linkFrom((await waitForMail(t, 'weak@council.test')).text);
    const anon = await new Browser(t.app).init();
    const blank = await anon.post(`/api/account-setup/${token}`, { password: ' '.repeat(14) });
    expect(blank.status).toBe(400);
    expect(blank.body.errors).toEqual([{ field: 'password', message: 'Password must contain more than spaces.' }]);
    for (const common of ['passwordpassword', '123456789012', 'Qwertyuiop12']) {
      const res = await anon.post(`/api/account-setup/${token}`, { password: common });
      expect(res.status).toBe(400);
      expect(res.body.errors).toEqual([{ field: 'password', message: 'This password is one of the most common ones. Choose another.' }]);
    }
    expect((await anon.post(`/api/account-setup/${token}`, { password: 'weak-no-longer-2026' })).status).toBe(204);
  });
});

test('every admin action on people is in the admin audit trail, whose chain verifies', async () => {
  const org = await admin.post('/api/vendor-organisations', { name: 'Audit Firm', registrationNumber: 'AF-1', sme: false, contactEmail: 'boss@audit-firm.test' });
  const invited = await admin.post('/api/users', { name: 'Boss', email: 'boss@audit-firm.test', role: 'vendor', vendorOrganisationId: org.body.id });
  await admin.post(`/api/users/${invited.body.id}/invitation`);
  const user = await makeUser(t, 'buyer');
  await admin.post(`/api/users/${user.id}/password-reset`);
  await admin.post(`/api/users/${user.id}/deactivate`);
  await admin.post(`/api/users/${user.id}/reactivate`);
  const res = await admin.get('/api/admin/audit');
  expect(res.status).toBe(200);
  const mine = res.body.filter((e: { actor: { id: string } | null }) => e.actor?.id === adminUser.id);
  const about = (person: string) => mine.filter((e: { detail: { person?: string } }) => e.detail.person === person).map((e: { action: string }) => e.action);
  expect(about(invited.body.id)).toEqual(['person.invited', 'invitation.resent']);
  expect(about(user.id)).toEqual(['password.reset-sent', 'person.deactivated', 'person.reactivated']);
  expect(mine.some((e: { action: string; detail: { organisation?: string } }) => e.action === 'organisation.registered' && e.detail.organisation === org.body.id)).toBe(true);
  expect(res.body.every((e: { detail: object }) => !JSON.stringify(e.detail).includes('account-setup'))).toBe(true);
  expect((await admin.get('/api/admin/audit/verify')).body).toMatchObject({ ok: true });
});

test('with OUTBOX_SHOW_LINKS off (the default), the token of a set-password link appears nowhere in the outbox API', async () => {
  expect(t.config.outboxShowLinks).toBe(false);
  await admin.post('/api/users', { name: 'Link Owner', email: 'link.owner@council.test', role: 'buyer' });
  const mail = await waitForMail(t, 'link.owner@council.test');
  const token = linkFrom(mail.text);
  expect(mail.html).toContain(token);
  const list = await admin.get('/api/outbox');
  const one = await admin.get(`/api/outbox/${mail.id}`);
  expect(one.status).toBe(200);
  expect(JSON.stringify(list.body)).not.toContain(token);
  expect(JSON.stringify(one.body)).not.toContain(token);
  expect(one.body.text).toContain(`/account-setup/${HIDDEN_LINK}`);
  expect(one.body.html).toContain('Set your password');
  // A demo installation (OUTBOX_SHOW_LINKS=1) shows it.
  expect((await readOutboxMessage(t.em(), mail.id, { showLinks: true })).text).toContain(token);
});

describe('a refused new-vendor invitation leaves nothing', () => {
  async function counts() {
    const em = t.em();
    return { orgs: await em.count(VendorOrganisation, {}), users: await em.count(User, {}), tokens: await em.count(AccountToken, {}), mails: await mailJobs() };
  }
  let buyer: Browser;
  let tenderId: string;
  beforeAll(async () => {
    buyer = await signedIn(t, await makeUser(t, 'buyer'));
    tenderId = (await buyer.post('/api/tenders', tenderBody())).body.id;
  });
  const newVendor = (over: object = {}) => ({
    organisationName: 'Refused Firm', registrationNumber: 'RF-1', sme: true, contactName: 'Rita Refused', contactEmail: 'rita@refused.test', ...over,
  });

  test.each([
    ['an unknown organisation beside it', () => ({ vendorOrganisationIds: ['00000000-0000-4000-8000-000000000000'], newVendor: newVendor() }), 400, 'vendorOrganisationIds[0]'],
    ['a contact e-mail that has an account', () => ({ newVendor: newVendor({ contactEmail: 'link.owner@council.test' }) }), 409, 'email'],
    ['a registration number already registered', () => ({ newVendor: newVendor({ registrationNumber: 'AF-1' }) }), 409, 'registrationNumber'],
  ])('%s: no organisation, no account, no e-mail', async (_what, body, status, field) => {
    const before = await counts();
    const res = await buyer.post(`/api/tenders/${tenderId}/invitations`, body());
    expect(res.status).toBe(status);
    expect(res.body.errors.map((e: { field: string }) => e.field)).toContain(field);
    expect(await counts()).toEqual(before);
  });

  test('an accepted one creates the organisation, its contact and exactly one e-mail', async () => {
    const before = await counts();
    const res = await buyer.post(`/api/tenders/${tenderId}/invitations`, { newVendor: newVendor({ contactEmail: ' Rita@REFUSED.test' }) });
    expect(res.status).toBe(200);
    expect(await counts()).toEqual({ orgs: before.orgs + 1, users: before.users + 1, tokens: before.tokens + 1, mails: before.mails + 1 });
    expect(await t.em().count(User, { email: 'rita@refused.test' })).toBe(1);
  });
});

test('the common-password list knows common passwords (whatever their case and spaces) but not the test or demo ones', () => {
  expect(isCommonPassword(TEST_PASSWORD)).toBe(false);
  expect(isCommonPassword('demo-pass-2026')).toBe(false);
  expect(isCommonPassword('Password Password')).toBe(true);
});
