import { AuditEntry, Bid, BidLine, OpeningRecord, Tender } from '../../server/entities';
import { CLOSING_GRACE_MS, closeIfDue } from '../../server/services/tender-access';
import { makeUser, signedIn, startTestApp, type Browser, type TestApp } from '../support/app';
import { openTender, tenderBody } from '../support/tenders';

/**
 * Many vendors save their bids in the last moments before the closing time, some after it. The
 * closing time is moved under their feet while their requests are in flight, so some arrive before
 * it and some after: the rule is that every accepted bid arrived before the closing time (its
 * receipt time says so) and is stored whole, and every refused one is refused as "Bidding closed"
 * with nothing stored — no other answer; closing then counts exactly the accepted bids. Nothing
 * here depends on how fast the machine is.
 */
const VENDORS = 40;
const REGIONS = 12;

let t: TestApp;
let tenderId: string;
/** The tender's owner: a buyer evaluates only its own tenders. */
let buyer: Browser;
const vendors: { b: Browser; org: string }[] = [];

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  for (let i = 0; i < VENDORS; i++) {
    const u = await makeUser(t, 'vendor');
    vendors.push({ b: await signedIn(t, u), org: u.vendorOrganisation!.id });
  }
  tenderId = await openTender(buyer, vendors.map((v) => v.org), tenderBody(REGIONS, 60));
}, 120_000);
afterAll(() => t.close());

const prices = Object.fromEntries(Array.from({ length: REGIONS }, (_, i) => [`R${String(i + 1).padStart(2, '0')}`, 50 + i]));

function submit(v: { b: Browser }, k: number) {
  return v.b.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 10_000 + k, capacity: null, prices, submit: true, version: null });
}

test('bids saved across the closing time are either stored whole or refused as closed, never anything else', async () => {
  // A few finish well before the closing time; half are in flight when it arrives (set to "now" by
  // this process's clock, the server's); the rest are sent after it.
  const early = await Promise.all(vendors.slice(0, 5).map((v, k) => submit(v, k).then((res) => ({ v, res }))));
  expect(early.map((a) => a.res.status)).toEqual([200, 200, 200, 200, 200]);
  const first = vendors.slice(5, VENDORS / 2);
  const second = vendors.slice(VENDORS / 2);
  const inFlight = first.map((v, k) => submit(v, 5 + k).then((res) => ({ v, res })));
  const closesAt = new Date();
  await t.em().nativeUpdate(Tender, { id: tenderId }, { closesAt });
  const late = second.map((v, k) => submit(v, VENDORS / 2 + k).then((res) => ({ v, res })));
  const answers = [...early, ...(await Promise.all([...inFlight, ...late]))];

  const storedBids = await t.em().find(Bid, { tender: tenderId });
  const stored = new Map(storedBids.map((b) => [b.vendorOrganisation.id, b]));
  let accepted = 0;
  let refused = 0;
  for (const { v, res } of answers) {
    if (res.status === 200) {
      accepted += 1;
      expect(res.body).toMatchObject({ status: 'submitted', revision: 1, prices });
      expect(new Date(res.body.submittedAt).getTime()).toBeLessThan(closesAt.getTime());
      const bid = stored.get(v.org);
      expect(bid?.status).toBe('submitted');
      expect(bid?.submittedAt?.toISOString()).toBe(res.body.submittedAt);
      expect(await t.em().count(BidLine, { bid: bid!.id })).toBe(REGIONS);
    } else {
      refused += 1;
      expect(res.status).toBe(409);
      expect(res.body.title).toBe('Conflict');
      expect(res.body.detail).toMatch(/^Bidding closed at .+ UTC\. Bids can no longer be saved, revised or withdrawn\.$/);
      expect(stored.has(v.org)).toBe(false);
    }
  }
  // Every request sent after the closing time was refused.
  for (const { res } of answers.slice(VENDORS / 2)) expect(res.status).toBe(409);
  expect(storedBids).toHaveLength(accepted);
  expect(accepted + refused).toBe(VENDORS);
  expect(refused).toBeGreaterThanOrEqual(VENDORS / 2);
  // Closing, once the grace has passed, counts exactly the accepted bids.
  expect(await closeIfDue(t.em(), tenderId, new Date(closesAt.getTime() + CLOSING_GRACE_MS + 1000))).toBe(true);
  expect((await t.em().findOneOrFail(Tender, { id: tenderId })).status).toBe('closed');
  const record = await t.em().findOneOrFail(OpeningRecord, { tender: tenderId });
  expect(record.content.bids).toHaveLength(accepted);
  expect((await t.em().findOneOrFail(AuditEntry, { tender: tenderId, action: 'tender.closed' })).detail).toEqual({
    submittedBids: accepted, openingRecordDigest: record.digest, abnormallyLow: [], // every vendor bids the same prices
  });
}, 120_000);

test('after the rush, the buyer sees exactly the accepted bids in the tabulation, each with every region priced', async () => {
  const stored = await t.em().count(Bid, { tender: tenderId, status: 'submitted' });
  const res = await buyer.get(`/api/tenders/${tenderId}/bids`);
  expect(res.status).toBe(200);
  expect(res.body.submitted).toBe(stored);
  expect(res.body.bids).toHaveLength(stored);
  for (const bid of res.body.bids as { prices: Record<string, number> }[]) expect(bid.prices).toEqual(prices);
});

test("every accepted bid of the rush has exactly one audit entry with its revision and receipt time, and the tender's trail verifies", async () => {
  const bids = await t.em().find(Bid, { tender: tenderId, status: 'submitted' });
  const entries = await t.em().find(AuditEntry, { tender: tenderId, action: 'bid.submitted' });
  expect(entries.map((e) => e.subject).sort()).toEqual(bids.map((b) => `bid ${b.id}`).sort());
  const bySubject = new Map(entries.map((e) => [e.subject, e.detail]));
  for (const b of bids) expect(bySubject.get(`bid ${b.id}`)).toEqual({ revision: 1, receivedAt: b.submittedAt!.toISOString() });
  const verified = await buyer.get(`/api/tenders/${tenderId}/audit/verify`);
  expect(verified.status).toBe(200);
  expect(verified.body).toMatchObject({ ok: true, brokenAt: null });
});
