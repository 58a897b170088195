import type { Worklist, WorklistItem } from '@shared/worklist';
import { Tender, type User } from '../../server/entities';
import { QUEUES } from '../../server/jobs/queue';
import { localDate } from '../../server/services/standstill';
import { type Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { waitFor } from '../support/wait';

/**
 * GET /api/worklist on a real database: each kind of item appears when its condition holds and
 * leaves when it no longer does; a buyer sees only its own tenders, a vendor only its organisation's
 * matters; before closing a buyer learns the number of bids, nothing of their figures.
 */
jest.setTimeout(240_000);
let t: TestApp;
let buyer: Browser;
let otherBuyer: Browser;
let compliance: Browser;
let complianceUser: User;
let admin: Browser;

interface Vendor { user: User; b: Browser; org: string }
const vendor = async (): Promise<Vendor> => {
  const user = await makeUser(t, 'vendor');
  return { user, b: await signedIn(t, user), org: user.vendorOrganisation!.id };
};

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer', { name: 'Nora Quill' }));
  otherBuyer = await signedIn(t, await makeUser(t, 'buyer'));
  complianceUser = await makeUser(t, 'compliance', { name: 'Ivo Marsh' });
  compliance = await signedIn(t, complianceUser);
  admin = await signedIn(t, await makeUser(t, 'admin'));
});
afterAll(() => t.close());

async function worklist(b: Browser): Promise<Worklist> {
  const res = await b.get('/api/worklist');
  expect(res.status).toBe(200);
  return res.body as Worklist;
}

/** The items of one kind about one tender (or all of that kind when `tenderId` is undefined). */
async function items(b: Browser, kind: string, tenderId?: string): Promise<WorklistItem[]> {
  const list = await worklist(b);
  return list.sections.flatMap((s) => s.items).filter((i) => i.kind === kind && (tenderId === undefined || i.tenderId === tenderId));
}

/** Every tender any item of this worklist is about. */
async function linkedTenders(b: Browser): Promise<string[]> {
  const list = await worklist(b);
  return list.sections.flatMap((s) => s.items).map((i) => i.tenderId).filter((id): id is string => !!id);
}

const bid = (fixedFee: number, prices: Record<string, number>, submit: boolean, version: number | null = null) => ({ fixedFee, capacity: null, prices, submit, version });

describe('vendor', () => {
  test('an invitation waits until a bid is started; a draft closing within 72 h waits until it is submitted; a draft closing later does not', async () => {
    const [a, b, outsider] = [await vendor(), await vendor(), await vendor()];
    const soon = await openTender(buyer, [a.org, b.org], tenderBody(3, 60));
    const later = await openTender(buyer, [a.org], tenderBody(3, 6 * 24 * 60));
    const invitation = await items(a.b, 'invitation', soon);
    expect(invitation.map((i) => ({ why: i.why, dueLabel: i.dueLabel, link: i.link }))).toEqual([
      { why: 'Your organisation is invited to bid and has no bid yet.', dueLabel: 'Closes', link: `/tenders/${soon}` },
    ]);
    expect(await items(outsider.b, 'invitation')).toEqual([]);

    expect((await a.b.send('put', `/api/tenders/${soon}/bid`, bid(100, { R01: 20, R02: 21 }, false))).status).toBe(200);
    expect((await a.b.send('put', `/api/tenders/${later}/bid`, bid(100, { R01: 20 }, false))).status).toBe(200);
    expect(await items(a.b, 'invitation', soon)).toEqual([]);
    expect((await items(a.b, 'draft-closing', soon)).map((i) => i.why)).toEqual([
      'Your bid is still a draft and closing is within 72 hours: a draft is not opened.',
    ]);
    // Six days to closing: not yet pressing.
    expect(await items(a.b, 'draft-closing', later)).toEqual([]);
    // B's invitation is its own; A's draft is not B's business.
    expect((await items(b.b, 'invitation', soon)).length).toBe(1);
    expect(await items(b.b, 'draft-closing', soon)).toEqual([]);

    const version = (await a.b.get(`/api/tenders/${soon}/bid`)).body.bid.version as number;
    expect((await a.b.send('put', `/api/tenders/${soon}/bid`, bid(100, { R01: 20, R02: 21 }, true, version))).status).toBe(200);
    expect(await items(a.b, 'draft-closing', soon)).toEqual([]);
  });

  test('a submitted bid returned to draft by an amendment waits, with the amendment’s note, until it is submitted again', async () => {
    const a = await vendor();
    const body = tenderBody(2, 10 * 24 * 60);
    const id = await openTender(buyer, [a.org], body);
    expect((await a.b.send('put', `/api/tenders/${id}/bid`, bid(100, { R01: 20, R02: 21 }, true))).status).toBe(200);
    expect(await items(a.b, 'bid-returned', id)).toEqual([]);
    const amended = await buyer.post(`/api/tenders/${id}/amendments`, {
      reason: 'A third depot joins the contract.', regions: [...body.regions, { code: 'R03', name: 'Depot 3', forecast: 500 }],
    });
    expect(amended.status).toBe(201);
    const returned = await items(a.b, 'bid-returned', id);
    expect(returned.map((i) => i.why)).toEqual([
      'Amendment 1 added region R03 (Depot 3): add your price (or leave it unpriced to decline) and submit again. Until you do, your bid is a draft and will not be opened.',
    ]);
    const version = (await a.b.get(`/api/tenders/${id}/bid`)).body.bid.version as number;
    expect((await a.b.send('put', `/api/tenders/${id}/bid`, bid(100, { R01: 20, R02: 21, R03: 22 }, true, version))).status).toBe(200);
    expect(await items(a.b, 'bid-returned', id)).toEqual([]);
  });

  test('an answered clarification waits for each vendor until that vendor reads the tender’s clarifications', async () => {
    const [asker, reader] = [await vendor(), await vendor()];
    const id = await openTender(buyer, [asker.org, reader.org], tenderBody(2, 10 * 24 * 60));
    const asked = await asker.b.post(`/api/tenders/${id}/questions`, { text: 'May deliveries to Depot 2 start at 06:00?' });
    expect(asked.status).toBe(201);
    // The buyer's side: one question waits for an answer, on its own worklist only.
    expect((await items(buyer, 'questions', id)).map((i) => i.why)).toEqual(['1 question from vendors waiting for your answer.']);
    expect(await items(otherBuyer, 'questions', id)).toEqual([]);
    expect(await items(reader.b, 'clarification-answered', id)).toEqual([]);

    expect((await buyer.post(`/api/questions/${asked.body.id}/answer`, { text: 'Yes, from 06:00 on working days.' })).status).toBe(200);
    expect(await items(buyer, 'questions', id)).toEqual([]);
    const expected = ['1 clarification answer published since you last read the clarifications.'];
    expect((await items(reader.b, 'clarification-answered', id)).map((i) => i.why)).toEqual(expected);
    expect((await items(asker.b, 'clarification-answered', id)).map((i) => i.why)).toEqual(expected);

    expect((await reader.b.get(`/api/tenders/${id}/questions`)).status).toBe(200);
    expect(await items(reader.b, 'clarification-answered', id)).toEqual([]);
    // Reading is each person's own: the asker has not read it yet.
    expect((await items(asker.b, 'clarification-answered', id)).map((i) => i.why)).toEqual(expected);
  });
});

describe('buyer', () => {
  test('a draft waits until published; an open tender closing within 72 h shows the count of bids only, never a figure, and only to its own buyer', async () => {
    const a = await vendor();
    const created = await buyer.post('/api/tenders', tenderBody(2, 120));
    expect(created.status).toBe(201);
    const id = created.body.id as string;
    expect((await items(buyer, 'draft', id)).map((i) => i.why)).toEqual(['Not published: invited vendors cannot see it yet.']);
    expect((await buyer.post(`/api/tenders/${id}/invitations`, { vendorOrganisationIds: [a.org] })).status).toBe(200);
    expect((await buyer.post(`/api/tenders/${id}/publish`)).status).toBe(200);
    expect(await items(buyer, 'draft', id)).toEqual([]);
    expect((await items(buyer, 'closing-soon', id)).map((i) => i.why)).toEqual(['No bid submitted so far.']);

    // Figures no one else may know before closing.
    expect((await a.b.send('put', `/api/tenders/${id}/bid`, bid(98765.43, { R01: 871.19, R02: 862.07 }, true))).status).toBe(200);
    expect((await items(buyer, 'closing-soon', id)).map((i) => i.why)).toEqual(['1 bid submitted so far.']);
    for (const b of [buyer, compliance, admin]) {
      const text = JSON.stringify(await worklist(b));
      for (const figure of ['98765', '98,765', '871.19', '862.07']) expect({ figure, found: text.includes(figure) }).toEqual({ figure, found: false });
    }
    // Another buyer never sees it, in any section.
    expect(await linkedTenders(otherBuyer)).not.toContain(id);
  });

  test('a tender’s way from closing to contracts: to evaluate, awaiting approval, returned, letters due, standstill, contracts to record — each leaves when done', async () => {
    const [a, b] = [await vendor(), await vendor()];
    const id = await openTender(buyer, [a.org, b.org], tenderBody(2, 60));
    // A is cheapest in both regions: the published basis (split) awards A alone.
    expect((await a.b.send('put', `/api/tenders/${id}/bid`, bid(100, { R01: 18, R02: 18 }, true))).status).toBe(200);
    expect((await b.b.send('put', `/api/tenders/${id}/bid`, bid(100, { R01: 21, R02: 21 }, true))).status).toBe(200);
    await passClosingTime(t, id);
    const bids = ((await buyer.get(`/api/tenders/${id}/bids`)).body as { bids: { id: string }[] }).bids;
    expect(bids.length).toBe(2);
    expect((await items(buyer, 'to-evaluate', id)).map((i) => ({ why: i.why, link: i.link }))).toEqual([
      { why: '2 bids without a compliance check; no award scenario run yet.', link: `/tenders/${id}` },
    ]);
    for (const x of bids) {
      expect((await buyer.send('put', `/api/tenders/${id}/bids/${x.id}/compliance`, { decision: 'compliant', note: 'Complete.' })).status).toBe(200);
    }
    expect((await items(buyer, 'to-evaluate', id)).map((i) => ({ why: i.why, link: i.link }))).toEqual([
      { why: 'No award scenario run yet.', link: `/tenders/${id}/evaluation` },
    ]);
    const scenarios = await buyer.get(`/api/tenders/${id}/scenarios`);
    const basis = scenarios.body.find((s: { builtIn: string | null }) => s.builtIn === 'published');
    const run = await waitForRun(buyer, (await buyer.post(`/api/scenarios/${basis.id}/runs`)).body.id);
    expect(await items(buyer, 'to-evaluate', id)).toEqual([]);

    // Recommended: compliance is asked, with who recommended and how long it has waited.
    expect((await buyer.post(`/api/tenders/${id}/recommendation`, { runId: run.id, justification: 'Least cost under the published basis.' })).status).toBe(201);
    expect((await items(compliance, 'approval', id)).map((i) => ({ why: i.why, link: i.link }))).toEqual([
      { why: 'Recommended by Nora Quill, waiting less than an hour for your decision.', link: `/tenders/${id}/evaluation/recommendation` },
    ]);
    // Returned: it leaves compliance's list and waits on the buyer's, with the comment.
    expect((await compliance.post(`/api/tenders/${id}/recommendation/return`, { comment: 'Please state the fee comparison.' })).status).toBe(200);
    expect(await items(compliance, 'approval', id)).toEqual([]);
    expect((await items(buyer, 'returned', id)).map((i) => i.why)).toEqual([
      'Returned by Ivo Marsh: “Please state the fee comparison.” Revise and recommend again.',
    ]);
    expect(await items(otherBuyer, 'returned')).toEqual([]);
    expect((await buyer.post(`/api/tenders/${id}/recommendation`, { runId: run.id, justification: 'Least cost; fees compared: both 100.' })).status).toBe(201);
    expect(await items(buyer, 'returned', id)).toEqual([]);
    expect((await items(compliance, 'approval', id)).length).toBe(1);

    // Approved: letters are due until sent.
    expect((await compliance.post(`/api/tenders/${id}/recommendation/approve`, { comment: '' })).status).toBe(200);
    expect(await items(compliance, 'approval', id)).toEqual([]);
    expect((await items(buyer, 'letters-due', id)).map((i) => ({ why: i.why, link: i.link }))).toEqual([
      { why: 'The award is approved: no bidder has been sent its letter yet.', link: `/tenders/${id}/notices` },
    ]);
    expect((await buyer.post(`/api/tenders/${id}/notices`)).status).toBe(202);
    await waitFor('the letters to be sent (tender notified)', async () => (await t.em().findOneOrFail(Tender, { id })).status === 'notified');
    expect(await items(buyer, 'letters-due', id)).toEqual([]);

    // Notified: the standstill runs to its stored end; each vendor has its own letter.
    const tender = await t.em().findOneOrFail(Tender, { id });
    expect((await items(buyer, 'standstill', id)).map((i) => ({ dueAt: i.dueAt, dueLabel: i.dueLabel }))).toEqual([
      { dueAt: tender.standstillEndsAt!.toISOString(), dueLabel: 'Standstill ends' },
    ]);
    const letterOf = async (v: Vendor) => (await items(v.b, 'letter', id)).map((i) => i.why);
    expect(await letterOf(a)).toEqual(['Award letter received.']);
    expect(await letterOf(b)).toEqual(['Regret letter received.']);
    expect((await items(a.b, 'letter', id)).map((i) => /^\/notices\/[0-9a-f-]{36}$/.test(i.link))).toEqual([true]);

    // As if the clock had run on past the standstill end: contracts are to record.
    await t.em().nativeUpdate(Tender, { id }, { standstillEndsAt: new Date(Date.now() - 5 * 86_400_000) });
    expect(await items(buyer, 'standstill', id)).toEqual([]);
    expect((await items(buyer, 'contracts', id)).map((i) => i.why)).toEqual(['The standstill period has ended: 1 contract of 1 to record.']);
    const view = (await buyer.get(`/api/tenders/${id}/contracts`)).body as { vendors: { vendor: { id: string }; awarded: { region: string; quantity: number; unitPrice: number }[] }[] };
    const awarded = view.vendors.find((v) => v.vendor.id === a.org)!.awarded.map(({ region, quantity, unitPrice }) => ({ region, quantity, unitPrice }));
    const recorded = await buyer.post(`/api/tenders/${id}/contracts`, { vendorId: a.org, signedOn: localDate(new Date(), 'UTC'), lines: awarded });
    expect(recorded.status).toBe(201);
    expect(await items(buyer, 'contracts', id)).toEqual([]);
    // Contracted: the vendors' letters leave their lists too.
    expect(await letterOf(a)).toEqual([]);
    // Nothing of this tender ever reached the other buyer's worklist.
    expect(await linkedTenders(otherBuyer)).not.toContain(id);
  });
});

describe('compliance', () => {
  test('a tender’s audit trail waits until verified, and again once new entries are written', async () => {
    const a = await vendor();
    const id = await openTender(buyer, [a.org], tenderBody(2, 10 * 24 * 60));
    const before = await items(compliance, 'audit-verify', id);
    expect(before.map((i) => ({ link: i.link, never: i.why.endsWith('never verified by you.') }))).toEqual([{ link: `/tenders/${id}/evaluation/audit`, never: true }]);
    const verified = await compliance.get(`/api/tenders/${id}/audit/verify`);
    expect(verified.body.ok).toBe(true);
    expect(await items(compliance, 'audit-verify', id)).toEqual([]);
    // Another officer's list is its own.
    const second = await signedIn(t, await makeUser(t, 'compliance'));
    expect((await items(second, 'audit-verify', id)).length).toBe(1);
    // A new entry (a bid submitted) puts it back, counted.
    expect((await a.b.send('put', `/api/tenders/${id}/bid`, bid(100, { R01: 20, R02: 21 }, true))).status).toBe(200);
    expect((await items(compliance, 'audit-verify', id)).map((i) => i.why)).toEqual(['1 new entry since you last verified the trail.']);
  });
});

describe('admin', () => {
  test('a pending invitation waits until a password is set; a deactivated account with a live session and a failed e-mail wait until dealt with', async () => {
    const invited = await admin.post('/api/users', { name: 'Petra Lind', email: 'petra.lind@people.test', role: 'compliance' });
    expect(invited.status).toBe(201);
    const pending = await items(admin, 'pending-invitation');
    expect(pending.filter((i) => i.what === 'Petra Lind (petra.lind@people.test)').map((i) => ({ why: i.why, dueLabel: i.dueLabel, link: i.link }))).toEqual([
      { why: 'Invited; no password set yet.', dueLabel: 'Link expires', link: '/people' },
    ]);

    // Deactivated behind the application's back: its session is still in the store.
    const leftOver = await makeUser(t, 'buyer', { name: 'Odile Fenn' });
    await signedIn(t, leftOver);
    await t.em().nativeUpdate('User', { id: leftOver.id }, { active: false });
    const sessions = await items(admin, 'deactivated-session');
    expect(sessions.filter((i) => i.what.startsWith('Odile Fenn')).map((i) => i.why)).toEqual(['Deactivated, yet 1 session is still live.']);
    await t.em().getConnection().execute(`delete from http_session where sess #>> '{passport,user}' = ?`, [leftOver.id]);
    expect((await items(admin, 'deactivated-session')).filter((i) => i.what.startsWith('Odile Fenn'))).toEqual([]);

    // An e-mail the queue gave up on (held back so that no worker takes it first, then failed).
    const jobId = await t.boss.send(QUEUES.mail, { to: 'gone@nowhere.test', subject: 'Your receipt for T-1', text: 'x', html: 'x' }, { startAfter: 3600, retryLimit: 0 });
    await t.boss.fail(QUEUES.mail, jobId!, { message: '550 mailbox unavailable' });
    const failed = (await items(admin, 'failed-mail')).filter((i) => i.what.includes('gone@nowhere.test'));
    expect(failed.map((i) => ({ what: i.what, why: i.why, link: i.link }))).toEqual([
      { what: 'Your receipt for T-1 (to gone@nowhere.test)', why: 'Not delivered: 550 mailbox unavailable', link: '/outbox' },
    ]);
    await t.boss.deleteJob(QUEUES.mail, jobId!);
    expect((await items(admin, 'failed-mail')).filter((i) => i.what.includes('gone@nowhere.test'))).toEqual([]);
  });
});

test('every role’s count is the number of its worklist’s items, and the sections are the role’s own, in order', async () => {
  const a = await vendor();
  for (const [b, kinds] of [
    [a.b, ['invitation', 'bid-returned', 'draft-closing', 'clarification-answered', 'letter']],
    [buyer, ['questions', 'closing-soon', 'to-evaluate', 'returned', 'letters-due', 'standstill', 'contracts', 'draft']],
    [compliance, ['approval', 'audit-verify']],
    [admin, ['failed-mail', 'deactivated-session', 'pending-invitation']],
  ] as const) {
    const list = await worklist(b);
    expect(list.sections.map((s) => s.kind)).toEqual(kinds);
    const total = list.sections.reduce((sum, s) => sum + s.items.length, 0);
    expect({ total: list.total, counts: list.sections.map((s) => s.count) }).toEqual({ total, counts: list.sections.map((s) => s.items.length) });
    expect((await b.get('/api/worklist/count')).body).toEqual({ total });
  }
});

test('the OpenAPI document describes GET /api/worklist with its response schema', async () => {
  const doc = (await buyer.get('/api/openapi.json')).body;
  const schema = doc.paths['/api/worklist'].get.responses['200'].content['application/json'].schema;
  expect({ properties: Object.keys(schema.properties).sort(), roles: doc.paths['/api/worklist'].get['x-roles'] }).toEqual({
    properties: ['sections', 'total'], roles: ['admin', 'buyer', 'compliance', 'vendor'],
  });
});
