import XlsxPopulate from 'xlsx-populate';
import { AuditEntry, Bid, OpeningRecord, Tender } from '../../server/entities';
import { CLOSING_GRACE_MS, closeIfDue } from '../../server/services/tender-access';
import { makeUser, signedIn, startTestApp, waitForMail, type Browser, type TestApp } from '../support/app';
import { openTender } from '../support/tenders';
import { waitFor } from '../support/wait';
import { formatInZone } from '@shared/time-zone';

/**
 * A bid is on time when its request arrived in full before the closing time (stamped by the server
 * at its edge), however long the server then takes to store it. The bid's transaction is held by
 * the bid service's test hooks — before it starts, or with the tender row locked and the bid
 * written — while the closing time passes and closing is tried; nothing here waits a fixed time.
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

const figures = { fixedFee: 31000, capacity: 5000, prices: { R01: 58.25, R02: 59.5, R03: 61 } };

async function vendorOnNewTender(): Promise<{ v: Browser; email: string; org: string; tenderId: string }> {
  const u = await makeUser(t, 'vendor');
  const v = await signedIn(t, u);
  const tenderId = await openTender(buyer, [u.vendorOrganisation!.id]);
  return { v, email: u.email, org: u.vendorOrganisation!.id, tenderId };
}

/** A promise the test resolves when it chooses. */
function gate<T = void>() {
  let open!: (value: T) => void;
  const opened = new Promise<T>((resolve) => (open = resolve));
  return { open, opened };
}

/** Sets the closing time just after the request's arrival stamp, and waits until that time has passed. */
async function closeJustAfter(tenderId: string, arrivedAt: Date): Promise<Date> {
  const closesAt = new Date(arrivedAt.getTime() + 1);
  await t.em().nativeUpdate(Tender, { id: tenderId }, { closesAt });
  while (Date.now() <= closesAt.getTime()) await new Promise((r) => setImmediate(r));
  return closesAt;
}

/** Waits until some backend of the test database waits for a lock. */
async function someoneWaitsForALock(): Promise<void> {
  await waitFor('a backend of the test database to wait for a lock', async () => {
    const [row] = await t.em().getConnection().execute<{ n: string }[]>(
      `select count(*) as n from pg_stat_activity where datname = current_database() and wait_event_type = 'Lock'`,
    );
    return Number(row.n) > 0;
  }, { everyMs: 20 });
}

test('a bid whose request arrived before the closing time is accepted and stamped with its arrival, though its transaction starts after it', async () => {
  const { v, email, tenderId } = await vendorOnNewTender();
  const arrived = gate<Date>();
  const release = gate();
  t.deps.bidHooks = {
    beforeBidTransaction: async ({ arrivedAt }) => {
      arrived.open(arrivedAt);
      await release.opened;
    },
  };
  const saving = v.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, submit: true, version: null }).then((r) => r);
  const arrivedAt = await arrived.opened;
  const closesAt = await closeJustAfter(tenderId, arrivedAt);
  // Within the grace, closing leaves the tender open for the bids received in time.
  expect(await closeIfDue(t.em(), tenderId)).toBe(false);
  release.open();
  const res = await saving;
  expect(res.status).toBe(200);
  expect(res.body).toMatchObject({ status: 'submitted', revision: 1, submittedAt: arrivedAt.toISOString() });
  expect(new Date(res.body.submittedAt).getTime()).toBeLessThan(closesAt.getTime());
  const stored = await t.em().findOneOrFail(Bid, { tender: tenderId });
  expect(stored.submittedAt!.toISOString()).toBe(arrivedAt.toISOString());
  const receipt = await waitForMail(t, email, 'Receipt:');
  // The receipt time in the one date-time format, to the second, in the tender's zone (UTC here).
  expect(receipt.text).toContain(`at ${formatInZone(arrivedAt, 'UTC', { seconds: true })}.`);
});

test('closing waits for a bid received in time that is still being stored, and counts it at opening', async () => {
  const { v, tenderId } = await vendorOnNewTender();
  let closesAt = new Date(0);
  const written = gate();
  const release = gate();
  t.deps.bidHooks = {
    beforeBidTransaction: async ({ arrivedAt }) => {
      closesAt = await closeJustAfter(tenderId, arrivedAt);
    },
    beforeBidCommit: async () => {
      written.open();
      await release.opened;
    },
  };
  const saving = v.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, submit: true, version: null }).then((r) => r);
  await written.opened;
  // The closing job runs as if the grace had passed, while the bid's transaction holds the tender row.
  const closing = closeIfDue(t.em(), tenderId, new Date(closesAt.getTime() + CLOSING_GRACE_MS + 1000));
  await someoneWaitsForALock();
  release.open();
  expect((await saving).status).toBe(200);
  expect(await closing).toBe(true);
  const closed = await t.em().findOneOrFail(AuditEntry, { tender: tenderId, action: 'tender.closed' });
  // The count, and the opening record written in the same transaction (one bid: nothing to flag).
  const record = await t.em().findOneOrFail(OpeningRecord, { tender: tenderId });
  expect(closed.detail).toEqual({ submittedBids: 1, openingRecordDigest: record.digest, abnormallyLow: [] });
  expect(record.content.bids.map((b) => b.revision)).toEqual([1]);
  const tab = await buyer.get(`/api/tenders/${tenderId}/bids`);
  expect(tab.body.submitted).toBe(1);
  expect(tab.body.bids).toHaveLength(1);
  expect(tab.body.bids[0]).toMatchObject({ fixedFee: figures.fixedFee, prices: figures.prices, receiptVerified: true });
});

test('a bid received in time but not stored before the bids were opened is refused, and nothing is stored', async () => {
  const { v, tenderId } = await vendorOnNewTender();
  const arrived = gate<Date>();
  const release = gate();
  t.deps.bidHooks = {
    beforeBidTransaction: async ({ arrivedAt }) => {
      arrived.open(arrivedAt);
      await release.opened;
    },
  };
  const saving = v.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, submit: true, version: null }).then((r) => r);
  const closesAt = await closeJustAfter(tenderId, await arrived.opened);
  expect(await closeIfDue(t.em(), tenderId, new Date(closesAt.getTime() + CLOSING_GRACE_MS + 1000))).toBe(true);
  release.open();
  const res = await saving;
  expect(res.status).toBe(409);
  expect(res.body.detail).toMatch(/^Bidding closed at .+ UTC\. Bids can no longer be saved, revised or withdrawn\.$/);
  expect(await t.em().count(Bid, { tender: tenderId })).toBe(0);
  expect((await buyer.get(`/api/tenders/${tenderId}/bids`)).body).toEqual({ submitted: 0, bids: [] });
});

test('a bid, a withdrawal or a workbook received after the closing time is refused while bids received before it are still being stored', async () => {
  const { v, tenderId } = await vendorOnNewTender();
  const first = await v.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, submit: true, version: null });
  expect(first.status).toBe(200);
  const wb = await v.get(`/api/tenders/${tenderId}/bid-workbook`).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  const workbook = (await (await XlsxPopulate.fromDataAsync(wb.body as Buffer)).outputAsync());
  // Closed a second ago: still within the grace, so the tender is not yet closed and opened.
  await t.em().nativeUpdate(Tender, { id: tenderId }, { closesAt: new Date(Date.now() - 1000) });
  const revision = await v.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, fixedFee: 1, submit: true, version: first.body.version });
  expect(revision.status).toBe(409);
  expect(revision.body).toMatchObject({ title: 'Conflict' });
  expect(revision.body.detail).toMatch(/^Bidding closed at .+ UTC\. Bids can no longer be saved, revised or withdrawn\.$/);
  const withdrawal = await v.post(`/api/tenders/${tenderId}/bid/withdraw`, { version: first.body.version });
  expect(withdrawal.status).toBe(409);
  const upload = await v.agent.post(`/api/tenders/${tenderId}/bid-workbook`).set('X-XSRF-TOKEN', v.token).attach('file', workbook, 'late.xlsx');
  expect(upload.status).toBe(409);
  expect(upload.body.detail).toMatch(/^Bidding closed at /);
  expect((await t.em().findOneOrFail(Tender, { id: tenderId })).status).toBe('open');
  const stored = await t.em().findOneOrFail(Bid, { tender: tenderId });
  expect(stored).toMatchObject({ status: 'submitted', revision: 1, fixedFee: figures.fixedFee });
});
