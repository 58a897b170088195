import { formatInZone } from '@shared/time-zone';
import { Amendment, AuditEntry, Bid, BidRemovedLine, MailMessage, Question, Region, Tender } from '../../server/entities';
import { QUEUES } from '../../server/jobs/queue';
import { CLOSING_GRACE_MS, closeIfDue } from '../../server/services/tender-access';
import { Browser, makeUser, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { drainQueue, waitFor } from '../support/wait';

/**
 * The procedure between publication and closing: clarifications (asked by a vendor, answered and
 * published by the buyer without the asker), numbered amendments (extension, regions, description)
 * with what they do to submitted bids and receipts, and cancellation before closing.
 */
let t: TestApp;
let buyer: Browser;
let buyerEmail: string;
let otherBuyer: Browser;
let compliance: Browser;
interface Vendor { b: Browser; org: string; orgName: string; email: string }
const vendors: Vendor[] = [];

beforeAll(async () => {
  t = await startTestApp();
  const buyerUser = await makeUser(t, 'buyer');
  buyerEmail = buyerUser.email;
  buyer = await signedIn(t, buyerUser);
  otherBuyer = await signedIn(t, await makeUser(t, 'buyer'));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
  for (let i = 0; i < 3; i++) {
    const u = await makeUser(t, 'vendor');
    vendors.push({ b: await signedIn(t, u), org: u.vendorOrganisation!.id, orgName: u.vendorOrganisation!.name, email: u.email });
  }
});
afterAll(() => t.close());

/** Ten days to closing: the clarification deadline (5 days before closing by default) is ahead. */
const TEN_DAYS = 10 * 24 * 60;

const auditActions = async (tenderId: string) =>
  (await t.em().find(AuditEntry, { tender: tenderId }, { orderBy: { seq: 'asc' } })).map((e) => e.action);

function put(v: Browser, tender: string, body: object) {
  return v.send('put', `/api/tenders/${tender}/bid`, body);
}

describe('clarifications', () => {
  test('a vendor asks; only buyer and compliance see who; the answer is published numbered to every invited vendor without the asker, and e-mailed', async () => {
    const [asker, other] = vendors;
    const id = await openTender(buyer, [asker.org, other.org], tenderBody(3, TEN_DAYS));
    const asked = await asker.b.post(`/api/tenders/${id}/questions`, { text: 'Is delivery to Depot 2 by articulated lorry possible?' });
    expect(asked.status).toBe(201);
    expect(asked.body).toMatchObject({ status: 'asked', number: null, answer: null, mine: true });
    expect(asked.body.askedBy).toBeUndefined();
    const toBuyer = await waitForMail(t, buyerEmail, 'New clarification question on tender');
    expect(toBuyer.text).toContain('Is delivery to Depot 2 by articulated lorry possible?');
    expect(toBuyer.text).toContain(asker.orgName);

    // Before the answer: the other vendor sees nothing, the asker its own question awaiting an answer.
    expect((await other.b.get(`/api/tenders/${id}/questions`)).body).toEqual([]);
    expect((await asker.b.get(`/api/tenders/${id}/questions`)).body.map((q: { status: string }) => q.status)).toEqual(['asked']);
    const forBuyer = await buyer.get(`/api/tenders/${id}/questions`);
    expect(forBuyer.body).toHaveLength(1);
    expect(forBuyer.body[0].askedBy.organisation).toBe(asker.orgName);
    expect((await compliance.get(`/api/tenders/${id}/questions`)).body[0].askedBy.organisation).toBe(asker.orgName);

    const answered = await buyer.post(`/api/questions/${asked.body.id}/answer`, { text: 'Yes: every depot takes 44 t articulated lorries.' });
    expect(answered.status).toBe(200);
    expect(answered.body).toMatchObject({ status: 'answered', number: 1, answer: 'Yes: every depot takes 44 t articulated lorries.' });
    const second = await asker.b.post(`/api/tenders/${id}/questions`, { text: 'May the unit price include the delivery charge?' });
    expect((await buyer.post(`/api/questions/${second.body.id}/answer`, { text: 'Yes, delivered prices only.' })).body.number).toBe(2);

    const seenByOther = await other.b.get(`/api/tenders/${id}/questions`);
    expect(seenByOther.body.map((q: { number: number; question: string; mine: boolean }) => [q.number, q.question, q.mine])).toEqual([
      [1, 'Is delivery to Depot 2 by articulated lorry possible?', false],
      [2, 'May the unit price include the delivery charge?', false],
    ]);
    expect(JSON.stringify(seenByOther.body)).not.toContain(asker.orgName);

    for (const v of [asker, other]) {
      const mail = await waitForMail(t, v.email, `Clarification 1 on tender`);
      expect(mail.text).toContain('Yes: every depot takes 44 t articulated lorries.');
      expect(mail.text).toContain('Is delivery to Depot 2 by articulated lorry possible?');
      expect(mail.text).not.toContain(asker.orgName);
    }
    expect(await auditActions(id)).toEqual(expect.arrayContaining(['question.asked', 'question.answered']));
  });

  test('a question is answered once: the second answer is 409 and changes nothing', async () => {
    const [v] = vendors;
    const id = await openTender(buyer, [v.org], tenderBody(3, TEN_DAYS));
    const q = await v.b.post(`/api/tenders/${id}/questions`, { text: 'Which salt grade?' });
    expect((await buyer.post(`/api/questions/${q.body.id}/answer`, { text: 'Grade 6 mm.' })).status).toBe(200);
    const again = await buyer.post(`/api/questions/${q.body.id}/answer`, { text: 'Grade 10 mm.' });
    expect(again.status).toBe(409);
    expect(again.type).toBe('application/problem+json');
    expect((await t.em().findOneOrFail(Question, { id: q.body.id })).answer).toBe('Grade 6 mm.');
    expect((await auditActions(id)).filter((a) => a === 'question.answered')).toHaveLength(1);
  });

  test('after the clarification deadline a question is refused with 409 naming the deadline, and nothing is stored', async () => {
    const [v] = vendors;
    const id = await openTender(buyer, [v.org]);
    const deadline = new Date(Date.now() - 60_000);
    await t.em().nativeUpdate(Tender, { id }, { clarificationsCloseAt: deadline });
    const res = await v.b.post(`/api/tenders/${id}/questions`, { text: 'Too late?' });
    expect(res.status).toBe(409);
    // In the one date-time format, in the tender's zone (UTC here).
    expect(res.body.detail).toContain(`The clarification deadline was ${formatInZone(deadline, 'UTC')}:`);
    expect(await t.em().count(Question, { tender: id })).toBe(0);
  });

  test('bad or foreign input: an empty question is 400 naming text; another buyer, or a vendor not invited, gets 404; nothing is stored', async () => {
    const [v, notInvited] = vendors;
    const id = await openTender(buyer, [v.org], tenderBody(3, TEN_DAYS));
    const empty = await v.b.post(`/api/tenders/${id}/questions`, { text: '   ' });
    expect(empty.status).toBe(400);
    expect(empty.body.errors).toEqual([{ field: 'text', message: 'Question is required.' }]);
    expect((await notInvited.b.post(`/api/tenders/${id}/questions`, { text: 'Hello?' })).status).toBe(404);
    const q = await v.b.post(`/api/tenders/${id}/questions`, { text: 'Pallets or bulk?' });
    expect((await otherBuyer.post(`/api/questions/${q.body.id}/answer`, { text: 'Intruder' })).status).toBe(404);
    expect((await otherBuyer.get(`/api/tenders/${id}/questions`)).status).toBe(404);
    const blank = await buyer.post(`/api/questions/${q.body.id}/answer`, { text: '' });
    expect(blank.body.errors).toEqual([{ field: 'text', message: 'Answer is required.' }]);
    expect(await t.em().count(Question, { tender: id })).toBe(1);
    expect((await t.em().findOneOrFail(Question, { id: q.body.id })).status).toBe('asked');
  });
});

describe('amendments', () => {
  test('an extension keeps the tender open past its old closing time: the old close job leaves it open and a bid is accepted', async () => {
    const [v] = vendors;
    const id = await openTender(buyer, [v.org]);
    // The original closing time a few seconds from now, its close job due at that time plus the grace.
    const oldCloses = new Date(Date.now() + 4000);
    await t.em().nativeUpdate(Tender, { id }, { closesAt: oldCloses });
    const newCloses = new Date(Date.now() + 3_600_000);
    const res = await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'More time to price the new depot.', closesAt: newCloses.toISOString() });
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ number: 1 });

    await waitFor('the old closing time to pass', () => Date.now() > oldCloses.getTime() + 500);
    // The job queued at publication runs now, as if its time had come: it finds nothing due.
    const conn = t.em().getConnection();
    await conn.execute(`update pgboss.job set start_after = now() where name = ? and singleton_key = ?`, [QUEUES.tenderClose, `close-${id}`]);
    await waitFor('the original close job to have run', async () => {
      const [row] = await conn.execute<{ state: string }[]>(`select state from pgboss.job where name = ? and singleton_key = ?`, [QUEUES.tenderClose, `close-${id}`]);
      return row?.state === 'completed';
    });
    expect(await closeIfDue(t.em(), id, new Date(oldCloses.getTime() + CLOSING_GRACE_MS + 1000))).toBe(false);
    expect((await t.em().findOneOrFail(Tender, { id })).status).toBe('open');
    const bid = await put(v.b, id, { fixedFee: 100, capacity: null, prices: { R01: 10 }, submit: true, version: null });
    expect(bid.status).toBe(200);
    expect(bid.body).toMatchObject({ status: 'submitted', answersAmendment: 1 });
    // A close job waits for the new time.
    const [job] = await t.em().getConnection().execute<{ start_after: Date }[]>(
      `select start_after from pgboss.job where name = ? and singleton_key = ?`, [QUEUES.tenderClose, `close-${id}-amendment-1`],
    );
    expect(new Date(job.start_after).getTime()).toBe(newCloses.getTime() + CLOSING_GRACE_MS);
    const { reference } = (await buyer.get(`/api/tenders/${id}`)).body as { reference: string };
    const receipt = await waitForMail(t, v.email, `Receipt: your bid on ${reference}`);
    expect(receipt.text).toContain('amendment 1');
  });

  test('shortening the closing time is 400 naming closesAt, an empty amendment is 400, and nothing is stored', async () => {
    const [v] = vendors;
    const body = tenderBody(2, 120);
    const id = await openTender(buyer, [v.org], body);
    const shorter = await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'Faster', closesAt: new Date(Date.now() + 3_600_000).toISOString() });
    expect(shorter.status).toBe(400);
    expect(shorter.body.errors.map((e: { field: string }) => e.field)).toEqual(['closesAt']);
    const nothing = await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'Nothing', description: '' });
    expect(nothing.status).toBe(400);
    expect(nothing.body.errors.map((e: { field: string }) => e.field)).toEqual(['changes']);
    const noReason = await buyer.post(`/api/tenders/${id}/amendments`, { closesAt: new Date(Date.now() + 9_000_000).toISOString() });
    expect(noReason.body.errors.map((e: { field: string }) => e.field)).toEqual(['reason']);
    expect(await t.em().count(Amendment, { tender: id })).toBe(0);
    expect((await t.em().findOneOrFail(Tender, { id })).closesAt.toISOString()).toBe(new Date(body.closesAt).toISOString());
    // With a published award increment of 250 t, a forecast of 1100 t is refused, naming the region's field.
    await t.em().nativeUpdate(Tender, { id }, { awardBasis: { sourcing: 'split', soleRegions: [], awardIncrement: 250 } });
    const offStep = await buyer.post(`/api/tenders/${id}/amendments`, {
      reason: 'New forecasts', regions: [{ code: 'R01', name: 'Depot 1', forecast: 1000 }, { code: 'R02', name: 'Depot 2', forecast: 1100 }],
    });
    expect(offStep.status).toBe(400);
    expect(offStep.body.errors).toEqual([{ field: 'regions[1].forecast', message: 'Forecast must be a whole multiple of the award increment (250 t).' }]);
    expect((await otherBuyer.post(`/api/tenders/${id}/amendments`, { reason: 'Intruder', description: 'x' })).status).toBe(404);
    expect(await auditActions(id)).not.toContain('tender.amended');
  });

  test('a region added returns submitted bids to draft with a note, e-mails the vendor to resubmit, and everyone sees the amendment', async () => {
    const [a, b] = vendors;
    const id = await openTender(buyer, [a.org, b.org], tenderBody(2, 120));
    const sub = await put(a.b, id, { fixedFee: 500, capacity: null, prices: { R01: 20, R02: 21 }, submit: true, version: null });
    expect(sub.body.status).toBe('submitted');
    const regions = [{ code: 'R01', name: 'Depot 1', forecast: 1500 }, { code: 'R02', name: 'Depot 2', forecast: 2000 }, { code: 'R03', name: 'Hillcrest depot', forecast: 700 }];
    const res = await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'A third depot joins the partnership.', regions, description: 'Now three depots.' });
    expect(res.body).toEqual({ number: 1 });

    const own = (await a.b.get(`/api/tenders/${id}/bid`)).body.bid;
    expect(own).toMatchObject({ status: 'draft', digest: null, answersAmendment: 0, prices: { R01: 20, R02: 21 } });
    expect(own.amendmentNote).toBe('Amendment 1 added region R03 (Hillcrest depot): add your price (or leave it unpriced to decline) and submit again. Until you do, your bid is a draft and will not be opened.');
    const resubmit = await waitForMail(t, a.email, `Submit your bid on`);
    expect(resubmit.text).toContain('R03 (Hillcrest depot)');
    const notice = await waitForMail(t, b.email, 'Amendment 1 to tender');
    expect(notice.text).toContain('A third depot joins the partnership.');
    expect(notice.text).toContain('Region R03 (Hillcrest depot) added, forecast 700 t.');
    expect(notice.text).toContain('Region R01 (Depot 1): forecast changed from 1000 t to 1500 t.');

    for (const reader of [a.b, buyer, compliance]) {
      const view = (await reader.get(`/api/tenders/${id}`)).body;
      expect(view.amendments).toHaveLength(1);
      expect(view.amendments[0]).toMatchObject({ number: 1, reason: 'A third depot joins the partnership.' });
      expect(view.regions.map((r: { code: string; forecast: number }) => [r.code, r.forecast])).toEqual([['R01', 1500], ['R02', 2000], ['R03', 700]]);
      expect(view.description).toBe('Now three depots.');
    }
    expect((await buyer.get(`/api/tenders/${id}`)).body.submittedBids).toBe(0);

    const again = await put(a.b, id, { fixedFee: 500, capacity: null, prices: { R01: 20, R02: 21, R03: 30 }, submit: true, version: own.version });
    expect(again.body).toMatchObject({ status: 'revised', revision: 2, answersAmendment: 1, amendmentNote: null });
    const entry = await t.em().findOneOrFail(AuditEntry, { tender: id, action: 'tender.amended' });
    expect(entry.detail).toMatchObject({ number: 1, reason: 'A third depot joins the partnership.', bidsReturnedToDraft: 1 });
    const returned = await t.em().findOneOrFail(AuditEntry, { tender: id, action: 'bid.returned-to-draft' });
    expect(returned.detail).toEqual({ revision: 1, amendment: 1 });
  });

  test('a region removed keeps the bid submitted and its price with the receipt: after closing the receipt still verifies and the price is shown apart', async () => {
    const [a] = vendors;
    const id = await openTender(buyer, [a.org], tenderBody(3, 120));
    const sub = await put(a.b, id, { fixedFee: 800, capacity: 9000, prices: { R01: 31.5, R02: 32.25, R03: 33 }, submit: true, version: null });
    expect(sub.status).toBe(200);
    const regions = [{ code: 'R01', name: 'Depot 1', forecast: 1000 }, { code: 'R03', name: 'Depot 3', forecast: 3000 }];
    expect((await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'Depot 2 closes for rebuilding.', regions })).status).toBe(201);
    const own = (await a.b.get(`/api/tenders/${id}/bid`)).body.bid;
    expect(own).toMatchObject({ status: 'submitted', digest: sub.body.digest, prices: { R01: 31.5, R03: 33 }, removedPrices: { R02: 32.25 } });
    expect(own.amendmentNote).toContain('Amendment 1 removed region R02 (Depot 2)');
    expect(await t.em().count(Region, { tender: id })).toBe(2);

    await passClosingTime(t, id);
    const bids = (await buyer.get(`/api/tenders/${id}/bids`)).body.bids;
    expect(bids).toHaveLength(1);
    expect(bids[0]).toMatchObject({ prices: { R01: 31.5, R03: 33 }, removedPrices: { R02: 32.25 }, digest: sub.body.digest, receiptVerified: true });
  });

  test("the vendor's next save after a region was removed replaces every figure: the removed price goes with the save", async () => {
    const [a] = vendors;
    const id = await openTender(buyer, [a.org], tenderBody(3, 120));
    const sub = await put(a.b, id, { fixedFee: 800, capacity: 9000, prices: { R01: 31.5, R02: 32.25, R03: 33 }, submit: true, version: null });
    expect(sub.status).toBe(200);
    const regions = [{ code: 'R01', name: 'Depot 1', forecast: 1000 }, { code: 'R03', name: 'Depot 3', forecast: 3000 }];
    expect((await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'Depot 2 closes for rebuilding.', regions })).status).toBe(201);
    expect(await t.em().fork().count(BidRemovedLine, { bid: sub.body.id })).toBe(1);
    const revised = await put(a.b, id, { fixedFee: 790, capacity: 9000, prices: { R01: 30, R03: 32 }, submit: true, version: sub.body.version });
    expect(revised.status).toBe(200);
    expect(await t.em().fork().count(BidRemovedLine, { bid: sub.body.id })).toBe(0);
    const own = (await a.b.get(`/api/tenders/${id}/bid`)).body.bid;
    expect(own).toMatchObject({ status: 'revised', revision: 2, prices: { R01: 30, R03: 32 } });
    expect(own.removedPrices).toBeUndefined();
  });
});

test('once the closing time has passed, no question, amendment or cancellation is accepted (409), and nothing is stored', async () => {
  const [v] = vendors;
  const body = tenderBody(2, TEN_DAYS);
  const id = await openTender(buyer, [v.org], body);
  // Answered by the original documents: the bid's receipt says so.
  const bid = await put(v.b, id, { fixedFee: 10, capacity: null, prices: { R01: 1 }, submit: true, version: null });
  expect(bid.body.answersAmendment).toBe(0);
  expect((await waitForMail(t, v.email, `Receipt: your bid on ${body.reference}`)).text).toContain('the original tender documents (no amendment)');
  await t.em().nativeUpdate(Tender, { id }, { clarificationsCloseAt: new Date(Date.now() + 86_400_000) });
  await passClosingTime(t, id);
  const asked = await v.b.post(`/api/tenders/${id}/questions`, { text: 'Still there?' });
  const amended = await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'Too late', closesAt: new Date(Date.now() + 9_000_000).toISOString() });
  const cancelled = await buyer.post(`/api/tenders/${id}/cancel`, { reason: 'Too late' });
  expect([asked.status, amended.status, cancelled.status]).toEqual([409, 409, 409]);
  expect(await t.em().count(Question, { tender: id })).toBe(0);
  expect(await t.em().count(Amendment, { tender: id })).toBe(0);
  expect((await buyer.get(`/api/tenders/${id}`)).body.status).toBe('closed');
});

describe('cancellation', () => {
  test('the buyer cancels an open tender with a reason: vendors are told, bids stay sealed, bidding and closing are refused', async () => {
    const [a] = vendors;
    const id = await openTender(buyer, [a.org]);
    expect((await put(a.b, id, { fixedFee: 1234.56, capacity: null, prices: { R01: 45.67 }, submit: true, version: null })).status).toBe(200);
    const noReason = await buyer.post(`/api/tenders/${id}/cancel`, { reason: '' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.errors.map((e: { field: string }) => e.field)).toEqual(['reason']);
    expect((await otherBuyer.post(`/api/tenders/${id}/cancel`, { reason: 'Intruder' })).status).toBe(404);
    expect((await t.em().findOneOrFail(Tender, { id })).status).toBe('open');

    const res = await buyer.post(`/api/tenders/${id}/cancel`, { reason: 'The budget was withdrawn by the board.' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'cancelled', cancellation: { reason: 'The budget was withdrawn by the board.' } });
    const mail = await waitForMail(t, a.email, 'Tender ');
    expect(mail.subject).toMatch(/ is cancelled$/);
    expect(mail.text).toContain('The budget was withdrawn by the board.');

    expect((await buyer.post(`/api/tenders/${id}/cancel`, { reason: 'Twice' })).status).toBe(409);
    const late = await put(a.b, id, { fixedFee: 1, capacity: null, prices: { R01: 1 }, submit: true, version: null });
    expect(late.status).toBe(409);
    expect(late.body.detail).toContain('cancelled');
    // Past its closing time, nothing opens it.
    await passClosingTime(t, id);
    expect(await closeIfDue(t.em(), id)).toBe(false);
    expect((await buyer.get(`/api/tenders/${id}`)).body.status).toBe('cancelled');
    expect((await buyer.get(`/api/tenders/${id}/bids`)).body).toEqual({ submitted: 1 });
    expect((await buyer.get(`/api/tenders/${id}/scenarios`)).status).toBe(409);
    expect((await buyer.get('/api/tenders').query({ status: 'cancelled' })).body.items.map((x: { id: string }) => x.id)).toContain(id);
    const entry = await t.em().findOneOrFail(AuditEntry, { tender: id, action: 'tender.cancelled' });
    expect(entry.detail).toEqual({ reason: 'The budget was withdrawn by the board.' });
    expect(await t.em().count(Bid, { tender: id, status: 'submitted' })).toBe(1);
  });

  test('a draft can be cancelled too, without e-mail to anyone, and its invited vendors never see it', async () => {
    const [a] = vendors;
    const created = await buyer.post('/api/tenders', tenderBody());
    await buyer.post(`/api/tenders/${created.body.id}/invitations`, { vendorOrganisationIds: [a.org] });
    const res = await buyer.post(`/api/tenders/${created.body.id}/cancel`, { reason: 'Prepared by mistake.' });
    expect(res.body.status).toBe('cancelled');
    // Never published, so its invited vendor never sees it.
    expect((await a.b.get(`/api/tenders/${created.body.id}`)).status).toBe(404);
    expect((await a.b.get('/api/tenders')).body.items.map((x: { id: string }) => x.id)).not.toContain(created.body.id);
    await drainQueue(t, QUEUES.mail);
    expect(await t.em().count(MailMessage, { subject: `Tender ${created.body.reference} is cancelled` })).toBe(0);
  });
});
