import { Bid, Tender, User, VendorOrganisation } from '../../server/entities';
import { seed } from '../../server/ops/seed';
import type { TabulatedBid } from '@shared/tenders';
import { digestOf } from '../../server/services/audit.service';
import { DEMO_ORGANISATIONS, DEMO_PASSWORD } from '../../seeds/demo-people';
import { DEMO_LOW_PRICE } from '../../seeds/demo-tenders';
import { Browser, startTestApp, type TestApp } from '../support/app';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ workers: false });
});
afterAll(() => t.close());

test('the demo data loads once: a second load adds nothing', async () => {
  expect(await seed(t.em(), 'demo')).toBe(true);
  const users = await t.em().count(User, {});
  // Ten people who sign in, and one invited who has not set a password yet (the administrator's worklist).
  expect(users).toBe(11);
  expect((await t.em().findOneOrFail(User, { email: 'h.voss@demo.tendara.test' }, { populate: ['passwordHash'] })).passwordHash).toBeNull();
  expect(await t.em().count(VendorOrganisation, {})).toBe(7);
  expect(await seed(t.em(), 'demo')).toBe(false);
  expect(await t.em().count(User, {})).toBe(users);
  expect(await t.em().count(Tender, {})).toBe(2);
});

test('the demo salt tender is closed with a submitted bid from each of the seven vendors; the second is open for two weeks', async () => {
  await seed(t.em(), 'demo'); // loads the data unless an earlier test has
  const salt = await t.em().findOneOrFail(Tender, { reference: 'NHP-2026-014' }, { populate: ['regions'] });
  expect(salt.status).toBe('closed');
  expect(salt.regions).toHaveLength(12);
  const forecasts = salt.regions.getItems().map((r) => r.forecast);
  expect(Math.min(...forecasts)).toBe(1500);
  expect(Math.max(...forecasts)).toBe(9000);
  expect(await t.em().count(Bid, { tender: salt, status: 'submitted' })).toBe(7);
  const bins = await t.em().findOneOrFail(Tender, { reference: 'NHP-2027-002' });
  expect(bins.status).toBe('open');
  expect(bins.closesAt.getTime() - Date.now()).toBeGreaterThan(13.9 * 86_400_000);
});

test.each(['admin', 'buyer', 'compliance', 'vendor1', 'vendor7'])('the demo sign-in %s works with the demo password', async (who) => {
  await seed(t.em(), 'demo'); // loads the data unless an earlier test has
  const res = await (await new Browser(t.app).init()).signIn(`${who}@demo.tendara.test`, DEMO_PASSWORD);
  expect(res.status).toBe(200);
});

test('every demo bid has a receipt keyed with a nonce of its own, and the closed tender\'s receipts verify at opening', async () => {
  const rows = await t.em().getConnection().execute<{ nonce: string | null; digest: string | null }[]>(`select nonce, digest from bid`);
  expect(rows).toHaveLength(9);
  for (const r of rows) {
    expect(r.nonce).toMatch(/^[0-9a-f]{64}$/);
    expect(r.digest).toMatch(/^[0-9a-f]{64}$/);
  }
  expect(new Set(rows.map((r) => r.nonce)).size).toBe(rows.length);
  const buyer = await new Browser(t.app).init();
  expect((await buyer.signIn('buyer@demo.tendara.test', DEMO_PASSWORD)).status).toBe(200);
  const salt = await t.em().findOneOrFail(Tender, { reference: 'NHP-2026-014' });
  const bids = (await buyer.get(`/api/tenders/${salt.id}/bids`)).body.bids as { nonce: string; receiptVerified: boolean }[];
  expect(bids).toHaveLength(7);
  for (const b of bids) expect(b).toMatchObject({ nonce: expect.stringMatching(/^[0-9a-f]{64}$/), receiptVerified: true });
});

test('the demo salt tender has an opening record whose digest is in its trail, every bid compliant, and one price flagged as abnormally low with the buyer\'s accepted explanation', async () => {
  await seed(t.em(), 'demo'); // loads the data unless an earlier test has
  const buyer = await new Browser(t.app).init();
  expect((await buyer.signIn('buyer@demo.tendara.test', DEMO_PASSWORD)).status).toBe(200);
  const salt = await t.em().findOneOrFail(Tender, { reference: 'NHP-2026-014' });
  const opening = await buyer.get(`/api/tenders/${salt.id}/opening-record`);
  expect(opening.status).toBe(200);
  expect(opening.body.record.bids).toHaveLength(7);
  expect(digestOf(opening.body.record)).toBe(opening.body.digest);
  const trail = (await buyer.get(`/api/tenders/${salt.id}/audit`)).body as { action: string; detail: Record<string, unknown> }[];
  expect(trail.find((e) => e.action === 'tender.closed')!.detail['openingRecordDigest']).toBe(opening.body.digest);
  expect((await buyer.get(`/api/tenders/${salt.id}/audit/verify`)).body.ok).toBe(true);
  const bids = (await buyer.get(`/api/tenders/${salt.id}/bids`)).body.bids as TabulatedBid[];
  expect(bids.map((b) => b.compliance.decision)).toEqual(Array(7).fill('compliant'));
  const flagged = bids.filter((b) => b.flags.prices.length > 0 || b.flags.total !== null);
  const v5 = DEMO_ORGANISATIONS.find((o) => o.key === DEMO_LOW_PRICE.vendor)!;
  // Garrow Moor: 53.9 → 46.9; bids there 46.9, 55.8, 60.5, 62.4, 63.8: median 60.5, threshold 48.4.
  expect(flagged.map((b) => [b.vendor.name, b.flags.prices, b.flags.total])).toEqual([
    [v5.name, [{ region: 'GRM', price: 46.9, median: 60.5, threshold: 48.4 }], null],
  ]);
  expect(flagged[0].abnormallyLow).toMatchObject({ accepted: true, note: DEMO_LOW_PRICE.note });
  expect(trail.filter((e) => e.action === 'bid.abnormally-low-accepted')).toHaveLength(1);
});

test('the demo salt tender shows two answered clarifications, without the asker to vendors, and amendment 1 that extended its closing', async () => {
  await seed(t.em(), 'demo'); // loads the data unless an earlier test has
  const salt = await t.em().findOneOrFail(Tender, { reference: 'NHP-2026-014' });
  const vendor = await new Browser(t.app).init();
  expect((await vendor.signIn('vendor1@demo.tendara.test', DEMO_PASSWORD)).status).toBe(200);
  const questions = (await vendor.get(`/api/tenders/${salt.id}/questions`)).body as { number: number; status: string; askedBy?: unknown }[];
  expect(questions.map((q) => [q.number, q.status, q.askedBy])).toEqual([[1, 'answered', undefined], [2, 'answered', undefined]]);
  const view = (await vendor.get(`/api/tenders/${salt.id}`)).body as { closesAt: string; amendments: { number: number; changes: { closesAt?: { from: string; to: string } } }[] };
  expect(view.amendments).toHaveLength(1);
  expect(view.amendments[0].changes.closesAt?.to).toBe(view.closesAt);
  expect(new Date(view.amendments[0].changes.closesAt!.from).getTime()).toBeLessThan(new Date(view.closesAt).getTime());
  expect((await vendor.get(`/api/tenders/${salt.id}/bid`)).body.bid).toMatchObject({ status: 'submitted', answersAmendment: 1 });
});
