import { AuditEntry, Bid, MailMessage, Tender } from '../../server/entities';
import { QUEUES, WAITED_MAIL_PRIORITY } from '../../server/jobs/queue';
import { makeUser, sessionIdOf, signedIn, startTestApp, waitForMail, type Browser, type TestApp } from '../support/app';
import { sessionForReadWith } from '../../server/auth/session.queries';
import { saveDraftWithSession } from '../../server/services/queries/bids.queries';
import { bidSaveSchema } from '@shared/tenders';
import { openTender, tenderBody } from '../support/tenders';
import { whileDecisionHoldsTender } from '../support/race';
import { drainQueue } from '../support/wait';

/**
 * The bid save is SQL of its own (services/queries/bids.queries.ts): the bid row and all its lines
 * in one statement, the receipt queued in the same transaction, the audit entry just after its
 * commit (audit.service.ts `auditOnPool`). These tests prove
 * what it stores — every line whole, at the price sent — and that a refused save stores nothing:
 * no line, no new version, no receipt, no audit entry. A draft without a workbook named is one call
 * of the PL/pgSQL function `bid_save_draft` (`saveDraftInOneCall`): the same guarantees, proven
 * here for it too — an amendment committed while it waits for the tender's lock is seen.
 */
let t: TestApp;
let buyer: Browser;

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
});
afterEach(() => {
  t.deps.bidHooks = undefined;
});
afterAll(() => t.close());

const code = (i: number) => `R${String(i + 1).padStart(2, '0')}`;
/** Distinct prices with four decimals, the most numeric(16,4) keeps. */
const pricesFor = (n: number, base: number) => Object.fromEntries(Array.from({ length: n }, (_, i) => [code(i), base + i + 0.0001 * ((i % 9) + 1)]));

async function vendorOn(regions: number): Promise<{ v: Browser; email: string; tenderId: string }> {
  const u = await makeUser(t, 'vendor');
  const tenderId = await openTender(buyer, [u.vendorOrganisation!.id], tenderBody(regions, 60));
  return { v: await signedIn(t, u), email: u.email, tenderId };
}

/** The stored lines of the tender's one bid: region code → unit price, as PostgreSQL has them. */
async function storedLines(tenderId: string): Promise<Record<string, string>> {
  const rows = await t.em().getConnection().execute<{ code: string; unit_price: string }[]>(
    `select r.code, l.unit_price::text as unit_price from bid b join bid_line l on l.bid_id = b.id join region r on r.id = l.region_id where b.tender_id = ?`,
    [tenderId],
  );
  return Object.fromEntries(rows.map((r) => [r.code, r.unit_price]));
}

/** The prices as numeric(16,4) writes them. */
const asStored = (prices: Record<string, number>) => Object.fromEntries(Object.entries(prices).map(([c, p]) => [c, p.toFixed(4)]));

async function bidEntries(tenderId: string): Promise<string[]> {
  return (await t.em().find(AuditEntry, { tender: tenderId, action: { $like: 'bid.%' } }, { orderBy: { seq: 'asc' } })).map((e) => e.action);
}

async function receipts(email: string): Promise<number> {
  await drainQueue(t, QUEUES.mail);
  return t.em().count(MailMessage, { toAddresses: { $contains: [email] }, subject: { $like: 'Receipt:%' } });
}

test('a 400-region submission stores every line whole at the price sent, with its receipt (queued ahead of notifications) and its audit entry', async () => {
  const { v, email, tenderId } = await vendorOn(400);
  const prices = pricesFor(400, 40);
  const res = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 120000, capacity: 90000, prices, submit: true, version: null });
  expect(res.status).toBe(200);
  expect(res.body).toMatchObject({ status: 'submitted', revision: 1, version: 1, fixedFee: 120000, capacity: 90000, prices });
  const lines = await storedLines(tenderId);
  expect(Object.keys(lines)).toHaveLength(400);
  expect(lines).toEqual(asStored(prices));
  const receipt = await waitForMail(t, email, 'Receipt:');
  expect(receipt.text).toContain(res.body.digest);
  // Queued ahead of reminders and updates (notifyOnce sends at pg-boss's default priority 0; pg-boss
  // fetches by priority, then age): a deadline rush's receipts do not wait behind closing reminders.
  const [job] = await t.em().execute<{ priority: number }[]>(
    `select priority from pgboss.job where name = ? and data->>'subject' like ? and data->>'to' = ?`, [QUEUES.mail, 'Receipt:%', email],
  );
  expect(job.priority).toBe(WAITED_MAIL_PRIORITY);
  expect(await bidEntries(tenderId)).toEqual(['bid.submitted']);
  // The receipt's commitment verifies against the stored figures once the bids are opened.
  await t.em().nativeUpdate(Tender, { id: tenderId }, { status: 'closed', closedAt: new Date() });
  const tab = await buyer.get(`/api/tenders/${tenderId}/bids`);
  expect(tab.body.bids).toHaveLength(1);
  expect(tab.body.bids[0]).toMatchObject({ digest: res.body.digest, receiptVerified: true });
});

test('a revision that prices fewer regions replaces every line: the regions left out lose theirs, the others take the new prices', async () => {
  const { v, tenderId } = await vendorOn(400);
  const first = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 1000, capacity: null, prices: pricesFor(400, 40), submit: true, version: null });
  expect(first.status).toBe(200);
  const fewer = pricesFor(150, 70);
  const revised = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 900, capacity: 500, prices: fewer, submit: true, version: first.body.version });
  expect(revised.status).toBe(200);
  expect(revised.body).toMatchObject({ status: 'revised', revision: 2, version: first.body.version + 1, fixedFee: 900, capacity: 500 });
  expect(await storedLines(tenderId)).toEqual(asStored(fewer));
  const stored = await t.em().findOneOrFail(Bid, { tender: tenderId });
  expect(stored).toMatchObject({ status: 'revised', revision: 2, fixedFee: 900, capacity: 500, digest: revised.body.digest });
  expect(await bidEntries(tenderId)).toEqual(['bid.submitted', 'bid.revised']);
});

test('a revision refused after the closing time leaves the earlier version untouched: figures, lines, version, one receipt, one audit entry', async () => {
  const { v, email, tenderId } = await vendorOn(200);
  const prices = pricesFor(200, 50);
  const first = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 5000, capacity: 800, prices, submit: true, version: null });
  expect(first.status).toBe(200);
  // Closed a second ago: within the grace, so the tender is still open but this save is late.
  await t.em().nativeUpdate(Tender, { id: tenderId }, { closesAt: new Date(Date.now() - 1000) });
  const late = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 1, capacity: null, prices: pricesFor(200, 1), submit: true, version: first.body.version });
  expect(late.status).toBe(409);
  expect(late.body.detail).toMatch(/^Bidding closed at /);
  const stored = await t.em().findOneOrFail(Bid, { tender: tenderId });
  expect(stored).toMatchObject({ status: 'submitted', revision: 1, version: first.body.version, fixedFee: 5000, capacity: 800, digest: first.body.digest });
  expect(await storedLines(tenderId)).toEqual(asStored(prices));
  expect(await receipts(email)).toBe(1);
  expect(await bidEntries(tenderId)).toEqual(['bid.submitted']);
});

test('a submission refused for a stale version or an unknown region stores nothing: no line, no receipt, no audit entry', async () => {
  const { v, email, tenderId } = await vendorOn(3);
  const draft = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 10, capacity: null, prices: { R01: 1.5 }, submit: false, version: null });
  expect(draft.status).toBe(200);
  const tabA = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 11, capacity: null, prices: { R01: 2.5, R02: 3 }, submit: false, version: draft.body.version });
  expect(tabA.status).toBe(200);
  const stale = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 12, capacity: null, prices: { R03: 9 }, submit: true, version: draft.body.version });
  expect(stale.status).toBe(409);
  const unknown = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 12, capacity: null, prices: { R01: 4, NULL: 9 }, submit: true, version: tabA.body.version });
  expect(unknown.status).toBe(400);
  expect(unknown.body.errors).toEqual([{ field: 'prices.NULL', message: 'Region NULL is not part of this tender.' }]);
  expect(await t.em().findOneOrFail(Bid, { tender: tenderId })).toMatchObject({ status: 'draft', revision: 0, version: tabA.body.version, fixedFee: 11, digest: null });
  expect(await storedLines(tenderId)).toEqual({ R01: '2.5000', R02: '3.0000' });
  expect(await receipts(email)).toBe(0);
  expect(await bidEntries(tenderId)).toEqual([]);
});

test('a submission that fails just before its commit stores nothing: the receipt is queued in the same transaction, so no receipt, no bid, no audit entry', async () => {
  const { v, email, tenderId } = await vendorOn(3);
  t.deps.bidHooks = {
    beforeBidCommit: () => Promise.reject(new Error('the connection broke just before the commit')),
  };
  const failed = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 700, capacity: 90, prices: pricesFor(3, 20), submit: true, version: null });
  expect(failed.status).toBe(500);
  t.deps.bidHooks = undefined;
  expect(await t.em().count(Bid, { tender: tenderId })).toBe(0);
  expect(await storedLines(tenderId)).toEqual({});
  expect(await receipts(email)).toBe(0);
  expect(await bidEntries(tenderId)).toEqual([]);
  // The same submission sent again is stored, receipted and audited once.
  const again = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 700, capacity: 90, prices: pricesFor(3, 20), submit: true, version: null });
  expect(again.status).toBe(200);
  expect(await receipts(email)).toBe(1);
  expect(await bidEntries(tenderId)).toEqual(['bid.submitted']);
});

test('a withdrawal is stored with its receipt and audit entry, and a stale one stores nothing', async () => {
  const { v, email, tenderId } = await vendorOn(2);
  const submitted = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 900, capacity: null, prices: pricesFor(2, 30), submit: true, version: null });
  expect(submitted.status).toBe(200);
  const stale = await v.send('post', `/api/tenders/${tenderId}/bid/withdraw`, { version: submitted.body.version + 5 });
  expect(stale.status).toBe(409);
  expect(await t.em().findOneOrFail(Bid, { tender: tenderId })).toMatchObject({ status: 'submitted', version: submitted.body.version });
  const withdrawn = await v.send('post', `/api/tenders/${tenderId}/bid/withdraw`, { version: submitted.body.version });
  expect(withdrawn.status).toBe(200);
  expect(withdrawn.body).toMatchObject({ status: 'withdrawn', version: submitted.body.version + 1, digest: null, revision: 1 });
  expect(await t.em().findOneOrFail(Bid, { tender: tenderId })).toMatchObject({ status: 'withdrawn', digest: null, nonce: null });
  expect(await receipts(email)).toBe(2);
  expect(await bidEntries(tenderId)).toEqual(['bid.submitted', 'bid.withdrawn']);
  const again = await v.send('post', `/api/tenders/${tenderId}/bid/withdraw`, { version: withdrawn.body.version });
  expect(again.status).toBe(409);
  expect(again.body.detail).toBe('This bid is already withdrawn.');
  expect(await receipts(email)).toBe(2);
});

test('a draft saved in one call stores every line at the price sent, replaces them on the next save, and sends no receipt and no audit entry', async () => {
  const { v, email, tenderId } = await vendorOn(40);
  const first = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 30000, capacity: 5000, prices: pricesFor(40, 55), submit: false, version: null });
  expect(first.status).toBe(200);
  expect(first.body).toMatchObject({ status: 'draft', revision: 0, version: 1, fixedFee: 30000, capacity: 5000, digest: null, submittedAt: null, answersAmendment: 0, document: null });
  const fewer = pricesFor(25, 60);
  const second = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 30001, capacity: null, prices: fewer, submit: false, version: first.body.version });
  expect(second.status).toBe(200);
  expect(second.body).toMatchObject({ id: first.body.id, status: 'draft', revision: 0, version: 2, fixedFee: 30001, capacity: null, prices: fewer });
  expect(await storedLines(tenderId)).toEqual(asStored(fewer));
  expect(await t.em().findOneOrFail(Bid, { tender: tenderId })).toMatchObject({ status: 'draft', version: 2, fixedFee: 30001, capacity: null });
  expect(await receipts(email)).toBe(0);
  expect(await bidEntries(tenderId)).toEqual([]);
});

// The bid's lines are written by two pieces of SQL (the function bid_save_draft and writeBid): a
// submission over lines the one-call draft wrote must leave exactly the submitted prices.
test('a submission over a draft saved in one call keeps the prices it repeats, takes the new ones and drops the regions it leaves out', async () => {
  const { v, tenderId } = await vendorOn(40);
  const draft = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 500, capacity: null, prices: pricesFor(40, 55), submit: false, version: null });
  expect(draft.status).toBe(200);
  expect(await storedLines(tenderId)).toEqual(asStored(pricesFor(40, 55)));
  // Regions 1–10 at the draft's prices, 11–30 at new ones, 31–40 left out.
  const submitted = { ...pricesFor(30, 80), ...pricesFor(10, 55) };
  const res = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 500, capacity: null, prices: submitted, submit: true, version: draft.body.version });
  expect(res.status).toBe(200);
  expect(res.body).toMatchObject({ status: 'submitted', revision: 1, prices: submitted });
  expect(await storedLines(tenderId)).toEqual(asStored(submitted));
});

test('a draft refused after the closing time, or over a submitted bid, leaves the earlier version untouched', async () => {
  const { v, tenderId } = await vendorOn(3);
  const draft = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 10, capacity: 20, prices: pricesFor(3, 5), submit: false, version: null });
  expect(draft.status).toBe(200);
  const submitted = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 11, capacity: 20, prices: pricesFor(3, 6), submit: true, version: draft.body.version });
  expect(submitted.status).toBe(200);
  const overSubmitted = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 1, capacity: null, prices: pricesFor(1, 1), submit: false, version: submitted.body.version });
  expect(overSubmitted.status).toBe(409);
  expect(overSubmitted.body.detail).toBe('This bid is submitted. Submit your changes as a revision, or withdraw the bid.');
  // Closed a second ago: within the grace, so the tender is still open but this save is late.
  await t.em().nativeUpdate(Tender, { id: tenderId }, { closesAt: new Date(Date.now() - 1000) });
  const late = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 1, capacity: null, prices: pricesFor(1, 1), submit: false, version: submitted.body.version });
  expect(late.status).toBe(409);
  expect(late.body.detail).toMatch(/^Bidding closed at .+ UTC\. Bids can no longer be saved, revised or withdrawn\.$/);
  expect(await t.em().findOneOrFail(Bid, { tender: tenderId })).toMatchObject({ status: 'submitted', revision: 1, version: submitted.body.version, fixedFee: 11, digest: submitted.body.digest });
  expect(await storedLines(tenderId)).toEqual(asStored(pricesFor(3, 6)));
});

test('a draft of a vendor not invited, or on a cancelled tender, is refused as not found or cancelled, and stores nothing', async () => {
  const { tenderId } = await vendorOn(2);
  const stranger = await signedIn(t, await makeUser(t, 'vendor'));
  const notInvited = await stranger.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 1, capacity: null, prices: pricesFor(2, 1), submit: false, version: null });
  expect(notInvited.status).toBe(404);
  const { v, tenderId: cancelledId } = await vendorOn(2);
  await t.em().nativeUpdate(Tender, { id: cancelledId }, { status: 'cancelled' });
  const cancelled = await v.send('put', `/api/tenders/${cancelledId}/bid`, { fixedFee: 1, capacity: null, prices: pricesFor(2, 1), submit: false, version: null });
  expect(cancelled.status).toBe(409);
  expect(cancelled.body.detail).toBe('The buyer cancelled this tender. Bids can no longer be saved, revised or withdrawn; they stay sealed.');
  expect(await t.em().count(Bid, { tender: { $in: [tenderId, cancelledId] } })).toBe(0);
});

// A draft without a workbook is saved in the statement that reads the session
// (`saveDraftWithSession`, the route's `writesWithSession`): one round trip. Its guard is the
// statement's, ahead of the role and XSRF checks, so these prove it writes only what the checks
// after it let through.
test('a draft is saved in the statement that reads the session: one statement, the same answers, a stale version refused', async () => {
  const { v, tenderId } = await vendorOn(3);
  const url = `/api/tenders/${tenderId}/bid`;
  const statements = async (run: () => Promise<{ status: number }>) => {
    const sent = jest.spyOn(t.deps.sessionPool, 'query');
    const answer = await run();
    const names = sent.mock.calls.map(([q]) => (q as { name?: string }).name);
    sent.mockRestore();
    return { answer, names };
  };
  // The body is validated once: the route takes what the plan's layer validated.
  const validations = jest.spyOn(bidSaveSchema, 'safeParse');
  const first = await statements(() => v.send('put', url, { fixedFee: 10, capacity: null, prices: pricesFor(3, 5), submit: false, version: null }));
  expect(validations).toHaveBeenCalledTimes(1);
  validations.mockRestore();
  expect(first.answer.status).toBe(200);
  expect(first.names).toEqual(['tendara-session-with-bid-save-draft']);
  const again = await statements(() => v.send('put', url, { fixedFee: 11, capacity: 7, prices: pricesFor(2, 6), submit: false, version: 1 }));
  expect(again.answer).toMatchObject({ status: 200, body: { status: 'draft', version: 2, fixedFee: 11, capacity: 7, prices: pricesFor(2, 6) } });
  expect(again.names).toEqual(['tendara-session-with-bid-save-draft']);
  const stale = await statements(() => v.send('put', url, { fixedFee: 12, capacity: null, prices: pricesFor(3, 5), submit: false, version: 1 }));
  expect(stale.answer.status).toBe(409);
  expect(stale.names).toEqual(['tendara-session-with-bid-save-draft']);
  expect(await storedLines(tenderId)).toEqual(asStored(pricesFor(2, 6)));
  // A submission is not saved with the session: the session's statement, then its transaction.
  const submit = await statements(() => v.send('put', url, { fixedFee: 12, capacity: null, prices: pricesFor(3, 5), submit: true, version: 2 }));
  expect(submit.answer.status).toBe(200);
  expect(submit.names[0]).toBe('tendara-session-read');
});

test('a draft saved with the session writes nothing for a request refused after it: a buyer, a deactivated vendor, a token not bound to the session, invalid input', async () => {
  const { v, email, tenderId } = await vendorOn(3);
  const url = `/api/tenders/${tenderId}/bid`;
  expect((await v.send('put', url, { fixedFee: 10, capacity: null, prices: pricesFor(3, 5), submit: false, version: null })).status).toBe(200);
  const db = t.em().getConnection();
  /** The bid as stored, and the tender row's xmax (a FOR SHARE lock would set it). */
  const state = async () => ({
    bid: await db.execute<{ version: number; fixed_fee: string }[]>(`select version, fixed_fee::text from bid where tender_id = ?`, [tenderId]),
    lines: await storedLines(tenderId),
    xmax: (await db.execute<{ xmax: string }[]>(`select xmax::text from tender where id = ?`, [tenderId]))[0].xmax,
  });
  const before = await state();
  const attempt = (who: typeof v, fee: number) => who.send('put', url, { fixedFee: fee, capacity: null, prices: pricesFor(3, 9), submit: false, version: 1 });
  // The buyer who owns the tender: 403.
  expect((await attempt(buyer, 99)).status).toBe(403);
  expect(await state()).toEqual(before);
  // Straight through the statement: the guard refuses the buyer's session, and the function then
  // finds no tender — nothing locked, nothing written.
  const buyerSid = await sessionIdOf(t, (await buyer.get('/api/session')).body.user.email);
  const asBuyer = await sessionForReadWith(t.deps.sessionPool, buyerSid, saveDraftWithSession(buyerSid, {
    tenderId, arrivedAt: new Date(), loadedVersion: 1, fixedFee: 98, capacity: null, codes: ['R01'], prices: [1],
  }, buyer.token));
  expect(asBuyer?.row).toMatchObject({ draft_allowed: false, outcome: 'not-found' });
  expect(await state()).toEqual(before);
  // Invalid input (a negative fee): 400, and no statement wrote.
  const invalid = await v.send('put', url, { fixedFee: -1, capacity: null, prices: pricesFor(3, 9), submit: false, version: 1 });
  expect(invalid.status).toBe(400);
  expect(await state()).toEqual(before);
  // The XSRF token the browser sends is not the one bound to its session (the session's changed): 403.
  const sid = await sessionIdOf(t, email);
  await db.execute(`update http_session set sess = jsonb_set(sess::jsonb, '{xsrf}', to_jsonb(?::text))::json where sid = ?`, ['B'.repeat(43), sid]);
  expect((await attempt(v, 97)).status).toBe(403);
  expect(await state()).toEqual(before);
  await db.execute(`update http_session set sess = jsonb_set(sess::jsonb, '{xsrf}', to_jsonb(?::text))::json where sid = ?`, [v.token, sid]);
  // The vendor deactivated: 401.
  await db.execute(`update app_user set active = false where email = ?`, [email]);
  expect((await attempt(v, 96)).status).toBe(401);
  expect(await state()).toEqual(before);
  // (That session no longer names the person, as after any deactivation.) Active again and signed
  // in again, the same request is saved, once.
  await db.execute(`update app_user set active = true where email = ?`, [email]);
  expect((await v.signIn(email)).status).toBe(200);
  expect((await attempt(v, 95)).body).toMatchObject({ version: 2, fixedFee: 95 });
});

test('a draft saved with a session due to slide is saved once, and the session slides', async () => {
  const { v, email, tenderId } = await vendorOn(2);
  const sid = await sessionIdOf(t, email);
  const db = t.em().getConnection();
  // The stored expiry two minutes behind the cookie's: due to slide (TOUCH_EVERY_MS is a minute).
  await db.execute(`update http_session set expire = expire - interval '2 minutes' where sid = ?`, [sid]);
  const expireOf = async () => (await db.execute<{ ms: number }[]>(`select (extract(epoch from expire) * 1000)::float8 as ms from http_session where sid = ?`, [sid]))[0].ms;
  const behind = await expireOf();
  const saved = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 5, capacity: null, prices: pricesFor(2, 3), submit: false, version: null });
  expect(saved.status).toBe(200);
  expect(saved.body).toMatchObject({ version: 1, fixedFee: 5 });
  expect(await t.em().findOneOrFail(Bid, { tender: tenderId })).toMatchObject({ version: 1, fixedFee: 5 });
  expect(await expireOf()).toBeGreaterThan(behind + 60_000);
});

test('a draft that waits for the tender lock sees the region an amendment removed meanwhile: refused naming the price, nothing stored', async () => {
  const { v, tenderId } = await vendorOn(3);
  const draft = await v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 10, capacity: null, prices: { R01: 1, R02: 2 }, submit: false, version: null });
  expect(draft.status).toBe(200);
  const res = await whileDecisionHoldsTender(
    t, tenderId,
    (tx) => tx.query(`delete from region where tender_id = $1 and code = 'R03'`, [tenderId]),
    () => v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 11, capacity: null, prices: { R01: 3, R03: 4 }, submit: false, version: draft.body.version }),
  );
  expect(res.status).toBe(400);
  expect(res.body.errors).toEqual([{ field: 'prices.R03', message: 'Region R03 is not part of this tender.' }]);
  expect(await t.em().findOneOrFail(Bid, { tender: tenderId })).toMatchObject({ version: draft.body.version, fixedFee: 10 });
  expect(await storedLines(tenderId)).toEqual({ R01: '1.0000', R02: '2.0000' });
});

test('a first draft that waits for the tender lock answers the amendment committed meanwhile', async () => {
  const { v, tenderId } = await vendorOn(2);
  const res = await whileDecisionHoldsTender(
    t, tenderId,
    (tx) => tx.query(
      `insert into amendment (id, tender_id, number, reason, changes, issued_by_id)
       select gen_random_uuid(), t.id, 1, 'Delivery window corrected', '{}'::jsonb, t.created_by_id from tender t where t.id = $1`, [tenderId],
    ),
    () => v.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 12, capacity: null, prices: pricesFor(2, 7), submit: false, version: null }),
  );
  expect(res.status).toBe(200);
  expect(res.body).toMatchObject({ status: 'draft', version: 1, answersAmendment: 1 });
  expect(await t.em().findOneOrFail(Bid, { tender: tenderId })).toMatchObject({ answersAmendment: 1 });
});
