import type { Worklist } from '@shared/worklist';
import XlsxPopulate from 'xlsx-populate';
import { createHash } from 'node:crypto';
import { apiRoutes } from '../../server/app';
import { AuditEntry, Bid, BidDocument, Invitation, Notice, Question, Recommendation, Run, Scenario, Tender, type User } from '../../server/entities';
import type { AnyRoute } from '../../server/http/route';
import { type Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { waitFor } from '../support/wait';

/**
 * Ownership: a buyer edits and evaluates only the tenders it created. Another buyer gets 404 — not
 * 403, so it cannot learn which tenders exist — on every buyer route that takes a tender or something
 * under one. The routes come from the list Express mounts, so a route added later is checked too, or
 * must be named below as exempt, with the reason.
 */
jest.setTimeout(120_000);

/** Buyer routes that take no tender, and why they need no ownership check. */
const EXEMPT: Record<string, string> = {
  'POST /tenders': 'creates a tender of the caller’s own',
  'POST /tenders/regions/import': 'reads a region file for the editor; no tender, nothing stored',
  'GET /vendor-organisations': 'the register of vendor firms, shared by every buyer for inviting',
  'GET /me/notification-settings': 'the caller’s own reminder settings; no tender',
  'PUT /me/notification-settings': 'the caller’s own reminder settings; no tender',
};
/** Lists: they answer 200, holding only the caller's own tenders (checked below). */
const LISTS = ['GET /tenders', 'GET /notices', 'GET /worklist', 'GET /worklist/count'];

let t: TestApp;
let owner: Browser;
let other: Browser;
let otherUser: User;
let compliance: Browser;
let admin: Browser;
const ids: Record<string, string> = {};

const key = (r: AnyRoute) => `${r.method.toUpperCase()} ${r.path}`;

beforeAll(async () => {
  t = await startTestApp();
  const ownerUser = await makeUser(t, 'buyer');
  owner = await signedIn(t, ownerUser);
  otherUser = await makeUser(t, 'buyer');
  other = await signedIn(t, otherUser);
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
  admin = await signedIn(t, await makeUser(t, 'admin'));
  const vendorUser = await makeUser(t, 'vendor');
  const vendor = await signedIn(t, vendorUser);
  ids['organisation'] = vendorUser.vendorOrganisation!.id;

  // The owner's tender, taken all the way: bid with its workbook, closed, run, recommended, approved, notices queued.
  const tenderId = await openTender(owner, [ids['organisation']]);
  ids['tender'] = tenderId;
  const bid = await vendor.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 900, capacity: null, prices: { R01: 10, R02: 11, R03: 12 }, submit: true, version: null });
  expect(bid.status).toBe(200);
  ids['bid'] = bid.body.id;
  const em = t.em();
  // A real (blank) workbook: the owner downloads a values-only copy made from it.
  const content = await (await XlsxPopulate.fromBlankAsync()).outputAsync();
  const doc = em.create(BidDocument, {
    tender: tenderId, vendorOrganisation: ids['organisation'], uploadedBy: vendorUser.id, filename: 'bid.xlsx', size: content.length,
    digest: createHash('sha256').update(content).digest('hex'), content,
  });
  await em.flush();
  await em.nativeUpdate(Bid, { id: bid.body.id }, { document: doc.id });
  ids['document'] = doc.id;
  await passClosingTime(t, tenderId);
  const scenarios = await owner.get(`/api/tenders/${tenderId}/scenarios`);
  ids['scenario'] = scenarios.body.find((s: { builtIn: string | null }) => s.builtIn === 'split').id;
  const run = await waitForRun(owner, (await owner.post(`/api/scenarios/${ids['scenario']}/runs`)).body.id);
  expect(run.status).toBe('optimal');
  ids['run'] = run.id;
  expect((await owner.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least cost.' })).status).toBe(201);
  expect((await compliance.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: '' })).status).toBe(200);
  expect((await owner.post(`/api/tenders/${tenderId}/notices`)).status).toBe(202);
  ids['notice'] = (await t.em().findOneOrFail(Notice, { tender: tenderId })).id;
  // A clarification question on the owner's tender, still awaiting its answer.
  const qem = t.em();
  const question = qem.create(Question, { tender: tenderId, vendorOrganisation: ids['organisation'], askedBy: vendorUser.id, text: 'Which grade?' });
  await qem.flush();
  ids['question'] = question.id;
  // Once the letter is out the tender is notified: wait for that, so that its status stays put below.
  await waitFor('the notice to be sent (tender notified)', async () => (await t.em().findOneOrFail(Tender, { id: tenderId })).status === 'notified');
});
afterAll(() => t.close());

/** The route's path with the owner's ids in place of its parameters. */
function concrete(r: AnyRoute): string {
  const prefix = r.path.split('/')[1];
  const byPrefix: Record<string, string | undefined> = {
    tenders: ids['tender'], scenarios: ids['scenario'], runs: ids['run'], notices: ids['notice'], questions: ids['question'],
  };
  return '/api' + r.path.replace(/:([A-Za-z]+)/g, (_m, name: string) => {
    const named: Record<string, string | undefined> = { documentId: ids['document'], organisationId: ids['organisation'], bidId: ids['bid'], vendorId: ids['organisation'], region: 'R01' };
    const id = name === 'id' ? byPrefix[prefix] : named[name];
    if (!id) throw new Error(`${key(r)}: no id for :${name} — teach this test the new parameter`);
    return id;
  });
}

/** A valid body or query, so that the answer is about the tender, not about the input. */
const BODIES: Record<string, object> = {
  'PUT /tenders/:id': tenderBody(),
  'POST /tenders/:id/invitations': { vendorOrganisationIds: [] },
  'POST /tenders/:id/scenarios': { name: 'Intruder', rules: {} },
  'PUT /scenarios/:id': { name: 'Intruder', rules: {} },
  'POST /tenders/:id/recommendation': { runId: '', justification: 'Intruder' },
  'PUT /tenders/:id/bids/:bidId/compliance': { decision: 'excluded', ground: 'other', note: 'Intruder' },
  'PUT /tenders/:id/bids/:bidId/abnormally-low': { accepted: true, note: 'Intruder' },
  'POST /questions/:id/answer': { text: 'Intruder' },
  'POST /tenders/:id/amendments': { reason: 'Intruder', description: 'Intruder' },
  'POST /tenders/:id/cancel': { reason: 'Intruder' },
  'PUT /tenders/:id/closure-days': { closureDays: ['2026-12-29'] },
  'POST /tenders/:id/contracts': { vendorId: '00000000-0000-4000-8000-000000000001', signedOn: '2026-01-05', lines: [{ region: 'R01', quantity: 1, unitPrice: 1 }] },
};
const QUERIES: Record<string, () => Record<string, string>> = {
  'GET /tenders/:id/compare': () => ({ runs: `${ids['run']},${ids['run']}` }),
};

function buyerRoutes(): AnyRoute[] {
  return apiRoutes(t.deps).filter((r) => r.access === 'signed-in' || (Array.isArray(r.access) && r.access.includes('buyer')));
}

test('every buyer route is checked for ownership, listed, or exempt with a reason', () => {
  const keys = buyerRoutes().map(key);
  for (const k of [...Object.keys(EXEMPT), ...LISTS]) expect(keys).toContain(k);
  expect(keys.filter((k) => !EXEMPT[k] && !LISTS.includes(k)).length).toBeGreaterThan(20);
});

test("another buyer gets 404 on every route that takes the owner's tender or something under it; the owner reads each", async () => {
  const checked = buyerRoutes().filter((r) => !EXEMPT[key(r)] && !LISTS.includes(key(r)));
  expect(checked.length).toBeGreaterThan(20);
  BODIES['POST /tenders/:id/recommendation'] = { runId: ids['run'], justification: 'Intruder' };
  BODIES['POST /tenders/:id/invitations'] = { vendorOrganisationIds: [ids['organisation']] };
  const statusBefore = (await t.em().findOneOrFail(Tender, { id: ids['tender'] })).status;
  for (const r of checked) {
    const path = concrete(r);
    const query = QUERIES[key(r)]?.() ?? {};
    const res = r.method === 'get' ? await other.get(path).query(query) : await other.send(r.method, path, BODIES[key(r)] ?? {});
    expect({ route: key(r), status: res.status, type: res.type, title: res.body?.title }).toEqual({
      route: key(r), status: 404, type: 'application/problem+json', title: 'Not found',
    });
    // The same request by the owner finds it: the 404 above is about who asks, not about the ids.
    if (r.method === 'get') expect({ route: key(r), status: (await owner.get(path).query(query)).status }).toEqual({ route: key(r), status: 200 });
  }
  // And nothing the other buyer sent changed anything.
  const tenderId = ids['tender'];
  expect(await t.em().count(AuditEntry, { tender: tenderId, actor: otherUser.id })).toBe(0);
  expect((await t.em().findOneOrFail(Tender, { id: tenderId })).status).toBe(statusBefore);
  expect(await t.em().count(Scenario, { tender: tenderId, name: 'Intruder' })).toBe(0);
  expect(await t.em().count(Run, { tender: tenderId })).toBe(1);
  expect(await t.em().count(Recommendation, { tender: tenderId })).toBe(1);
  expect(await t.em().count(Invitation, { tender: tenderId })).toBe(1);
  expect(await t.em().count(Notice, { tender: tenderId })).toBe(1);
  expect((await t.em().findOneOrFail(Question, { id: ids['question'] })).status).toBe('asked');
});

test('the tender list and the notice list show a buyer only its own tenders; compliance and admin see every tender', async () => {
  const own = await other.post('/api/tenders', tenderBody());
  expect(own.status).toBe(201);
  const list = await other.get('/api/tenders');
  expect(list.body.items.map((x: { id: string }) => x.id)).toEqual([own.body.id]);
  expect(list.body.total).toBe(1);
  expect((await other.get('/api/tenders').query({ q: 'Gritting' })).body.items.map((x: { id: string }) => x.id)).toEqual([own.body.id]);
  expect((await owner.get('/api/tenders')).body.items.map((x: { id: string }) => x.id)).toEqual([ids['tender']]);
  expect((await other.get('/api/notices')).body).toEqual([]);
  expect((await other.get('/api/notices').query({ tenderId: ids['tender'] })).body).toEqual([]);
  expect((await owner.get('/api/notices')).body).toHaveLength(1);
  // The worklist: the other buyer's draft is its only item; the owner's tender (in its standstill) is the owner's.
  const worklistLinks = async (b: Browser) => ((await b.get('/api/worklist')).body as Worklist).sections.flatMap((s) => s.items.map((i) => i.link));
  expect(await worklistLinks(other)).toEqual([`/tenders/${own.body.id}`]);
  expect((await other.get('/api/worklist/count')).body).toEqual({ total: 1 });
  expect(await worklistLinks(owner)).toEqual([`/tenders/${ids['tender']}`]);
  for (const overseer of [compliance, admin]) {
    const all = (await overseer.get('/api/tenders')).body.items.map((x: { id: string }) => x.id).sort();
    expect(all).toEqual([ids['tender'], own.body.id].sort());
    expect((await overseer.get(`/api/tenders/${ids['tender']}`)).status).toBe(200);
  }
  expect((await compliance.get(`/api/tenders/${ids['tender']}/audit`)).status).toBe(200);
});
