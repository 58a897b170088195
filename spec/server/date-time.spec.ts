import { renderMail } from '../../server/mail/templates';
import { DEFAULT_TIME_ZONE, formatInZone } from '../../shared/time-zone';
import { makeUser, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';
import { openTender, tenderBody } from '../support/tenders';

/**
 * The one date-time format (shared/time-zone.ts) on the daylight-saving edges. From memory of the
 * EU rule (common practice since 1996): summer time starts on the last Sunday of March at 01:00 UTC
 * and ends on the last Sunday of October at 01:00 UTC; in 2026 those are 29 March and 25 October.
 */
const BERLIN = 'Europe/Berlin';

describe('formatInZone, the one date-time format', () => {
  test.each([
    ['the last minute of winter time, 29 March 2026', '2026-03-29T00:59:00Z', 'Sun, 29 Mar 2026, 01:59 CET (Europe/Berlin)'],
    ['the first minute of summer time: 02:00 to 02:59 never happens', '2026-03-29T01:00:00Z', 'Sun, 29 Mar 2026, 03:00 CEST (Europe/Berlin)'],
    ['02:30 the first time on 25 October 2026, still summer time', '2026-10-25T00:30:00Z', 'Sun, 25 Oct 2026, 02:30 CEST (Europe/Berlin)'],
    ['02:30 the second time, an hour later, in winter time', '2026-10-25T01:30:00Z', 'Sun, 25 Oct 2026, 02:30 CET (Europe/Berlin)'],
    ['an ordinary winter afternoon', '2026-12-03T14:32:00Z', 'Thu, 3 Dec 2026, 15:32 CET (Europe/Berlin)'],
  ])('Berlin: %s', (_what, iso, expected) => {
    expect(formatInZone(iso, BERLIN)).toBe(expected);
  });

  test('a zone without daylight saving (Asia/Kolkata, UTC+5:30 all year) keeps its offset on the European change dates', () => {
    expect([formatInZone('2026-03-29T01:00:00Z', 'Asia/Kolkata'), formatInZone('2026-10-25T01:30:00Z', 'Asia/Kolkata')]).toEqual([
      'Sun, 29 Mar 2026, 06:30 GMT+5:30 (Asia/Kolkata)',
      'Sun, 25 Oct 2026, 07:00 GMT+5:30 (Asia/Kolkata)',
    ]);
  });

  test('UTC is not named twice; seconds where asked; the zone name left out for a column that names it', () => {
    expect(formatInZone('2026-07-03T14:32:07.500Z', DEFAULT_TIME_ZONE)).toBe('Fri, 3 Jul 2026, 14:32 UTC');
    expect(formatInZone(new Date('2026-07-03T14:32:07.500Z'), BERLIN, { seconds: true })).toBe('Fri, 3 Jul 2026, 16:32:07 CEST (Europe/Berlin)');
    expect(formatInZone('2026-07-03T14:32:07.500Z', BERLIN, { named: false })).toBe('Fri, 3 Jul 2026, 16:32 CEST');
  });
});

describe('the dateTime Handlebars helper', () => {
  test('an e-mail shows the closing time in the one format, in the tender zone, never as ISO', () => {
    const mail = renderMail('invitation', 'Invitation', {
      name: 'Ana Example', organisation: 'Fictional Freight', reference: 'TST-1', title: 'Test', commodity: 'gravel',
      closesAt: '2026-10-25T01:30:00.000Z', timeZone: BERLIN, basis: [], link: 'http://localhost/t', regions: 1, unit: 't',
    });
    expect(mail.text).toContain('Closing time: Sun, 25 Oct 2026, 02:30 CET (Europe/Berlin).');
    expect(mail.text).not.toMatch(/\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/);
  });
});

/** "2026-12-03T14:32", "2026-12-03 14:32", with or without seconds and zone: a machine's time, not a person's. */
const ISO_TIME = /\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/;

describe('real e-mails through the catcher', () => {
  // Four e-mails through the real queue and catcher on a shared 2-core machine: more than the default minute.
  jest.setTimeout(240_000);
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.close());

  test('invitation, bid receipt, amendment and password reset show their times in the one format, in the tender zone (Europe/Berlin), none as ISO', async () => {
    const buyer = await signedIn(t, await makeUser(t, 'buyer'));
    const vendorUser = await makeUser(t, 'vendor');
    const vendor = await signedIn(t, vendorUser);
    // Closing 15:00 Berlin winter time (CET, UTC+1) = 14:00 UTC, about ten days ahead.
    const day = new Date(Date.now() + 10 * 86_400_000).toISOString().slice(0, 10);
    const closesAt = `${day}T14:00:00.000Z`;
    const id = await openTender(buyer, [vendorUser.vendorOrganisation!.id], tenderBody(2, 0, { closesAt, timeZone: BERLIN }));
    const invitation = await waitForMail(t, vendorUser.email, 'Invitation to tender');
    const closing = formatInZone(closesAt, BERLIN);
    expect(invitation.text).toContain(`Closing time: ${closing}.`);

    expect((await vendor.send('put', `/api/tenders/${id}/bid`, { fixedFee: 10, capacity: null, prices: { R01: 5, R02: 6 }, submit: true, version: null })).status).toBe(200);
    const receipt = await waitForMail(t, vendorUser.email, 'Receipt: your bid');
    expect(receipt.text).toContain(`closing time (${closing})`);
    expect(receipt.text).toMatch(/at [A-Z][a-z]{2}, \d{1,2} [A-Z][a-z]{2} \d{4}, \d{2}:\d{2}:\d{2} (CET|CEST) \(Europe\/Berlin\)\./);

    const later = new Date(new Date(closesAt).getTime() + 86_400_000).toISOString();
    expect((await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'More time.', closesAt: later })).status).toBe(201);
    const amendment = await waitForMail(t, vendorUser.email, 'Amendment 1');
    expect(amendment.text).toContain(`Closing time extended from ${closing} to ${formatInZone(later, BERLIN)}.`);

    const admin = await signedIn(t, await makeUser(t, 'admin'));
    const person = await makeUser(t, 'compliance');
    expect((await admin.post(`/api/users/${person.id}/password-reset`)).status).toBe(202);
    const reset = await waitForMail(t, person.email, 'Your Tendara account');
    expect(reset.text).toMatch(/expires on [A-Z][a-z]{2}, \d{1,2} [A-Z][a-z]{2} \d{4}, \d{2}:\d{2} UTC:/);

    const mails = [invitation, receipt, amendment, reset];
    expect(mails.filter((m) => ISO_TIME.test(m.text) || ISO_TIME.test(m.html ?? '')).map((m) => m.subject)).toEqual([]);
  });
});
