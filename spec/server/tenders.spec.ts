import { z } from 'zod';
import { tenderPageSchema, tenderSummarySchema } from '@shared/tenders';
import { AuditEntry, MailMessage, Region, Tender } from '../../server/entities';
import { QUEUES } from '../../server/jobs/queue';
import { Browser, makeUser, sessionIdOf, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { drainQueue, waitFor } from '../support/wait';
import { sessionForReadWith } from '../../server/auth/session.queries';
import { tenderListJson, tenderListPage, vendorListWithSession, type TenderListFilter, type TenderListJsonRow } from '../../server/services/queries/tenders.queries';

let t: TestApp;
let buyer: Browser;
let vendorA: Browser;
let vendorB: Browser;
let orgA: string;
let vendorAEmail: string;

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  const a = await makeUser(t, 'vendor');
  vendorAEmail = a.email;
  orgA = a.vendorOrganisation!.id;
  vendorA = await signedIn(t, a);
  vendorB = await signedIn(t, await makeUser(t, 'vendor'));
});
afterAll(() => t.close());

test('a buyer creates a draft tender with its regions; the closing time is stored in UTC', async () => {
  const body = tenderBody(3, 120, { closesAt: '2031-03-02T14:00:00+02:00' });
  const res = await buyer.post('/api/tenders', body);
  expect(res.status).toBe(201);
  expect(res.body).toMatchObject({ status: 'draft', closesAt: '2031-03-02T12:00:00.000Z', regionCount: 3, totalForecast: 6000 });
  expect(res.body.regions).toEqual(body.regions);
});

test('bad tender input is refused naming each field, and nothing is stored', async () => {
  const before = await t.em().count(Tender, {});
  const res = await buyer.post('/api/tenders', {
    ...tenderBody(), currency: 'euro', closesAt: 'tomorrow', standstillDays: -1,
    regions: [{ code: 'R1', name: 'A', forecast: 0 }, { code: 'r1', name: 'B', forecast: 5 }],
  });
  expect(res.status).toBe(400);
  expect(res.body.errors.map((e: { field: string }) => e.field).sort()).toEqual(['closesAt', 'currency', 'regions[0].forecast', 'regions[1].code', 'standstillDays']);
  expect(await t.em().count(Tender, {})).toBe(before);
});

test('a closing time in the past is refused', async () => {
  const res = await buyer.post('/api/tenders', tenderBody(2, -5));
  expect(res.status).toBe(400);
  expect(res.body.errors).toEqual([{ field: 'closesAt', message: 'Closing time must be in the future.' }]);
});

test('a duplicate reference is a 409 naming the field', async () => {
  const body = tenderBody();
  await buyer.post('/api/tenders', body);
  const res = await buyer.post('/api/tenders', body);
  expect(res.status).toBe(409);
  expect(res.body.errors[0].field).toBe('reference');
});

test('publishing needs regions, an invitation and a future closing time, and says what is missing', async () => {
  const created = await buyer.post('/api/tenders', tenderBody());
  const res = await buyer.post(`/api/tenders/${created.body.id}/publish`);
  expect(res.status).toBe(400);
  expect(res.body.errors).toEqual([{ field: 'invitations', message: 'Invite at least one vendor.' }]);
});

test('publishing e-mails every invited vendor; only invited vendors see the tender, never a draft', async () => {
  const draft = await buyer.post('/api/tenders', tenderBody());
  expect((await vendorA.get(`/api/tenders/${draft.body.id}`)).status).toBe(404);
  const id = await openTender(buyer, [orgA]);
  const mail = await waitForMail(t, vendorAEmail);
  expect(mail.subject).toMatch(/^Invitation to tender T-/);
  expect(mail.text).toContain(`/tenders/${id}`);
  const listA = await vendorA.get('/api/tenders');
  expect(listA.body.items.map((x: { id: string }) => x.id)).toEqual([id]);
  expect((await vendorA.get(`/api/tenders/${id}`)).body.invitations).toBeUndefined();
  expect((await vendorB.get('/api/tenders')).body).toEqual({ items: [], total: 0, page: 1, size: 25 });
  expect((await vendorB.get(`/api/tenders/${id}`)).status).toBe(404);
});

test('a published tender cannot be edited', async () => {
  const id = await openTender(buyer, [orgA]);
  const res = await (buyer.send('put', `/api/tenders/${id}`, tenderBody()));
  expect(res.status).toBe(409);
  expect(await t.em().count(Region, { tender: id })).toBe(3);
});

test('the tender list filters by status and searches reference and title', async () => {
  const body = tenderBody(1, 60, { title: 'Treatment chemicals for nine works' });
  await buyer.post('/api/tenders', body);
  const found = await buyer.get('/api/tenders').query({ q: 'chemicals', status: 'draft' });
  expect(found.body.items.map((x: { reference: string }) => x.reference)).toEqual([body.reference]);
  const bad = await buyer.get('/api/tenders').query({ status: 'sleeping' });
  expect(bad.status).toBe(400);
  expect(bad.body.errors[0].field).toBe('status');
});

test('the tender list comes a page at a time, newest closing first, with how many match in all; past the end it still counts them', async () => {
  // A buyer of its own, so no other test's tender is in the list.
  const own = await signedIn(t, await makeUser(t, 'buyer'));
  const refs: string[] = [];
  for (const [k, minutes] of [300, 100, 200].entries()) {
    const body = tenderBody(1 + k, minutes, { reference: `PG-${k}-${Date.now().toString(36)}`, title: ['Brine', 'Alpha grit', 'Zinc posts'][k] });
    expect((await own.post('/api/tenders', body)).status).toBe(201);
    refs.push(body.reference);
  }
  const [late, early, middle] = refs;
  const first = await own.get('/api/tenders').query({ size: 2 });
  expect(first.body).toMatchObject({ total: 3, page: 1, size: 2 });
  expect(first.body.items.map((x: { reference: string }) => x.reference)).toEqual([late, middle]);
  // Each row is counted and summed by the database: the first tender has 1 region of 1,000 t.
  expect(first.body.items[0]).toMatchObject({ regionCount: 1, totalForecast: 1000, status: 'draft' });
  const second = await own.get('/api/tenders').query({ size: 2, page: 2 });
  expect(second.body).toMatchObject({ total: 3, page: 2, size: 2 });
  expect(second.body.items.map((x: { reference: string }) => x.reference)).toEqual([early]);
  expect((await own.get('/api/tenders').query({ size: 2, page: 9 })).body).toEqual({ items: [], total: 3, page: 9, size: 2 });
  const byTitle = await own.get('/api/tenders').query({ sort: 'title' });
  expect(byTitle.body.items.map((x: { title: string }) => x.title)).toEqual(['Alpha grit', 'Brine', 'Zinc posts']);
  const byTitleDown = await own.get('/api/tenders').query({ sort: 'title', dir: 'desc', size: 1 });
  expect(byTitleDown.body.items.map((x: { title: string }) => x.title)).toEqual(['Zinc posts']);
  const searched = await own.get('/api/tenders').query({ q: 'grit', size: 1 });
  expect(searched.body).toMatchObject({ total: 1, items: [{ reference: early }] });
});

test("a vendor's list comes a page at a time with the count of its invitations only, its own bid's status, and still counts past the end", async () => {
  // A vendor of its own, invited to three tenders; a fourth it is not invited to and a draft stay out.
  const u = await makeUser(t, 'vendor');
  const vendor = await signedIn(t, u);
  const org = u.vendorOrganisation!.id;
  const refs: string[] = [];
  for (const minutes of [300, 100, 200]) {
    const body = tenderBody(2, minutes);
    await openTender(buyer, [org], body);
    refs.push(body.reference);
  }
  await openTender(buyer, [orgA]);
  const invitedDraft = await buyer.post('/api/tenders', tenderBody());
  expect((await buyer.post(`/api/tenders/${invitedDraft.body.id}/invitations`, { vendorOrganisationIds: [org] })).status).toBe(200);
  const [late, early, middle] = refs;
  const first = await vendor.get('/api/tenders').query({ size: 2 });
  expect(first.body).toMatchObject({ total: 3, page: 1, size: 2 });
  expect(first.body.items.map((x: { reference: string }) => x.reference)).toEqual([late, middle]);
  expect(first.body.items[0]).toMatchObject({ regionCount: 2, totalForecast: 3000, status: 'open', myBidStatus: null });
  const second = await vendor.get('/api/tenders').query({ size: 2, page: 2 });
  expect(second.body).toMatchObject({ total: 3, page: 2, size: 2 });
  expect(second.body.items.map((x: { reference: string }) => x.reference)).toEqual([early]);
  expect((await vendor.get('/api/tenders').query({ size: 2, page: 9 })).body).toEqual({ items: [], total: 3, page: 9, size: 2 });
  const searched = await vendor.get('/api/tenders').query({ q: early, size: 1 });
  expect(searched.body).toMatchObject({ total: 1, items: [{ reference: early }] });
});

test("a vendor's list filters by status as of now, searches, sorts by each column both ways, and shows its own bid per tender", async () => {
  // A vendor of its own, invited to three tenders: a bid saved on one, another past its closing time.
  const u = await makeUser(t, 'vendor');
  const vendor = await signedIn(t, u);
  const org = u.vendorOrganisation!.id;
  const stamp = Date.now().toString(36);
  const ids: string[] = [];
  for (const [k, [minutes, title]] of ([[300, 'Brine'], [100, 'Alpha grit'], [200, 'Zinc posts']] as const).entries()) {
    ids.push(await openTender(buyer, [org], tenderBody(2, minutes, { reference: `VL-${k}-${stamp}`, title })));
  }
  const [brine, grit, zinc] = ids;
  expect((await vendor.send('put', `/api/tenders/${zinc}/bid`, { fixedFee: 100, capacity: null, prices: { R01: 10, R02: 11 }, submit: false, version: null })).status).toBe(200);
  await passClosingTime(t, grit);
  const list = async (query: Record<string, string | number>) => {
    const res = await vendor.get('/api/tenders').query(query);
    expect(res.status).toBe(200);
    return res.body as { total: number; items: { id: string; status: string; myBidStatus: string | null }[] };
  };
  // Past its closing time and not yet closed by the job: listed, and filtered, as closed.
  expect(await list({ status: 'closed' })).toMatchObject({ total: 1, items: [{ id: grit, status: 'closed', myBidStatus: null }] });
  expect((await list({ status: 'open' })).items.map((x) => x.id)).toEqual([brine, zinc]);
  expect((await list({ status: 'open', q: 'zinc' })).items.map((x) => x.id)).toEqual([zinc]);
  expect((await list({ status: 'draft' })).total).toBe(0);
  expect((await list({})).items.map((x) => [x.id, x.myBidStatus])).toEqual([[brine, null], [zinc, 'draft'], [grit, null]]);
  expect((await list({ sort: 'title' })).items.map((x) => x.id)).toEqual([grit, brine, zinc]);
  expect((await list({ sort: 'title', dir: 'desc' })).items.map((x) => x.id)).toEqual([zinc, brine, grit]);
  expect((await list({ sort: 'reference', dir: 'desc', size: 2 })).items.map((x) => x.id)).toEqual([zinc, grit]);
  expect((await list({ sort: 'closesAt', dir: 'asc' })).items.map((x) => x.id)).toEqual([grit, zinc, brine]);
  // By status in the order of the procedure (open before closed); ties newest closing first.
  expect((await list({ sort: 'status' })).items.map((x) => x.id)).toEqual([brine, zinc, grit]);
  expect((await list({ sort: 'status', dir: 'desc' })).items.map((x) => x.id)).toEqual([grit, brine, zinc]);
  // Past the end, a filtered list still counts what matches.
  expect(await list({ status: 'open', size: 1, page: 5 })).toEqual({ items: [], total: 2, page: 5, size: 1 });
});

test("the list's JSON, written by PostgreSQL, is exactly the declared page schema and says of each tender what the tender's own view says", async () => {
  // A buyer and a vendor of their own: two tenders, one with a bid saved by the vendor.
  const own = await signedIn(t, await makeUser(t, 'buyer'));
  const u = await makeUser(t, 'vendor');
  const vendor = await signedIn(t, u);
  const ids: string[] = [];
  for (const [k, minutes] of [200, 100].entries()) {
    const body = tenderBody(2 + k, minutes, { closesAt: new Date(Date.now() + minutes * 60_000 + 123).toISOString() });
    ids.push(await openTender(own, [u.vendorOrganisation!.id], body));
  }
  expect((await vendor.send('put', `/api/tenders/${ids[0]}/bid`, { fixedFee: 100, capacity: null, prices: { R01: 10, R02: 11 }, submit: false, version: null })).status).toBe(200);
  // Strict: no key beyond the schema's, none missing, every value of its declared type.
  const strictPage = tenderPageSchema.extend({ items: z.array(tenderSummarySchema.strict()) }).strict();
  for (const [who, withBid] of [[own, false], [vendor, true]] as const) {
    const res = await who.get('/api/tenders');
    expect(res.type).toBe('application/json');
    const page = strictPage.parse(res.body);
    expect(page).toMatchObject({ total: 2, page: 1, size: 25 });
    expect(page.items.map((x) => x.id)).toEqual(ids);
    for (const item of page.items) {
      const view = (await who.get(`/api/tenders/${item.id}`)).body;
      const summary = Object.fromEntries(Object.keys(tenderSummarySchema.shape).filter((k) => k in view || k in item).map((k) => [k, view[k]]));
      expect(item).toEqual(withBid ? summary : { ...summary, myBidStatus: undefined });
    }
    expect(page.items[0].closesAt).toMatch(/\.\d{3}Z$/);
    if (withBid) expect(page.items.map((x) => x.myBidStatus)).toEqual(['draft', null]);
    else expect(page.items.every((x) => !('myBidStatus' in x))).toBe(true);
  }
});

test('a page, page size, order or direction out of range is refused naming the parameter', async () => {
  for (const [query, field] of [[{ size: 0 }, 'size'], [{ size: 101 }, 'size'], [{ page: 0 }, 'page'], [{ page: 'two' }, 'page'], [{ sort: 'price' }, 'sort'], [{ dir: 'up' }, 'dir']] as const) {
    const res = await buyer.get('/api/tenders').query(query);
    expect([res.status, res.type, res.body.errors[0].field]).toEqual([400, 'application/problem+json', field]);
  }
});

test('inviting a new vendor contact registers the firm and e-mails an account link', async () => {
  const created = await buyer.post('/api/tenders', tenderBody());
  const res = await buyer.post(`/api/tenders/${created.body.id}/invitations`, {
    newVendor: { organisationName: 'Moorgate Grit', registrationNumber: 'MG-77', sme: true, contactName: 'Ada Moor', contactEmail: 'ada@moorgate.test' },
  });
  expect(res.status).toBe(200);
  expect(res.body.invitations.map((i: { vendorOrganisation: { name: string } }) => i.vendorOrganisation.name)).toContain('Moorgate Grit');
  const mail = await waitForMail(t, 'ada@moorgate.test');
  expect(mail.subject).toBe('Your Tendara account: set your password');
});

test('region import reads a CSV and reports bad rows by number', async () => {
  const ok = await buyer.agent.post('/api/tenders/regions/import').set('X-XSRF-TOKEN', buyer.token)
    .attach('file', Buffer.from('code;name;forecast\nN1;North depot;1500\nS1;South depot;2200\n'), 'regions.csv');
  expect(ok.status).toBe(200);
  expect(ok.body.regions).toEqual([{ code: 'N1', name: 'North depot', forecast: 1500 }, { code: 'S1', name: 'South depot', forecast: 2200 }]);
  const bad = await buyer.agent.post('/api/tenders/regions/import').set('X-XSRF-TOKEN', buyer.token)
    .attach('file', Buffer.from('code,name,forecast\nN1,North,abc\n'), 'regions.csv');
  expect(bad.status).toBe(400);
  expect(bad.body.errors[0]).toMatchObject({ field: 'row 2' });
  expect(bad.body.errors[0].message).toMatch(/Row 2: forecast/);
});

test('no e-mail to vendors is sent for a draft', async () => {
  const body = tenderBody();
  const created = await buyer.post('/api/tenders', body);
  await buyer.post(`/api/tenders/${created.body.id}/invitations`, { vendorOrganisationIds: [orgA] });
  // Every mail goes through the queue: once it is drained, anything (wrongly) given to it has been sent.
  await drainQueue(t, QUEUES.mail);
  expect(await t.em().count(MailMessage, { subject: { $like: `Invitation to tender ${body.reference}%` } })).toBe(0);
});

test('the scheduled close job closes a tender at its closing time without anyone reading it', async () => {
  const id = await openTender(buyer, [orgA]);
  // Publishing scheduled the job for the closing time; run the clock forward and send it now.
  await passClosingTime(t, id);
  await t.boss.send(QUEUES.tenderClose, { tenderId: id });
  await waitFor('the close job to close the tender', async () => (await t.em().findOneOrFail(Tender, { id })).status === 'closed', { timeoutMs: 10_000 });
  expect((await t.em().findOneOrFail(Tender, { id })).status).toBe('closed');
});

test('a tender past its closing time is listed as closed before the close job runs, without the list writing; the job records the closing in the audit trail', async () => {
  const id = await openTender(buyer, [orgA]);
  await passClosingTime(t, id);
  const list = await buyer.get('/api/tenders');
  expect(list.body.items.find((x: { id: string }) => x.id === id).status).toBe('closed');
  expect((await buyer.get('/api/tenders?status=closed')).body.items.map((x: { id: string }) => x.id)).toContain(id);
  expect((await buyer.get('/api/tenders?status=open')).body.items.map((x: { id: string }) => x.id)).not.toContain(id);
  // Reading the list wrote nothing: the row is still open and no closing is in the trail yet.
  expect((await t.em().findOneOrFail(Tender, { id })).status).toBe('open');
  expect(await t.em().count(AuditEntry, { tender: id, action: 'tender.closed' })).toBe(0);
  await t.boss.send(QUEUES.tenderClose, { tenderId: id });
  await waitFor('the close job to close the tender', async () => (await t.em().findOneOrFail(Tender, { id })).status === 'closed', { timeoutMs: 10_000 });
  const trail = await buyer.get(`/api/tenders/${id}/audit`);
  expect(trail.body.map((e: { action: string }) => e.action)).toEqual(['tender.created', 'invitations.added', 'tender.published', 'tender.closed']);
  expect((await buyer.get(`/api/tenders/${id}/audit/verify`)).body.ok).toBe(true);
});

test("a vendor's page read in the session's statement is the page its own statement reads, in every shape; anyone else's session gives no tender from it", async () => {
  // A vendor invited to three tenders (one with its bid, one past its closing time) and a buyer.
  const u = await makeUser(t, 'vendor');
  const vendor = await signedIn(t, u);
  const org = u.vendorOrganisation!.id;
  const stamp = Date.now().toString(36);
  const ids: string[] = [];
  for (const [k, minutes] of [300, 100, 200].entries()) ids.push(await openTender(buyer, [org], tenderBody(2, minutes, { reference: `VS-${k}-${stamp}` })));
  expect((await vendor.send('put', `/api/tenders/${ids[2]}/bid`, { fixedFee: 100, capacity: null, prices: { R01: 10, R02: 11 }, submit: false, version: null })).status).toBe(200);
  await passClosingTime(t, ids[1]);
  const sidOf = (email: string) => sessionIdOf(t, email);
  const sid = await sidOf(u.email);
  const pool = t.deps.sessionPool;
  const shapes: Partial<TenderListFilter>[] = [
    {}, { status: 'open' }, { status: 'closed' }, { q: `VS-1-${stamp}` }, { q: 'no such tender' }, { status: 'open', q: 'VS' },
    { sort: 'title', dir: 'asc' }, { sort: 'status', dir: 'desc' }, { sort: 'reference', dir: 'desc', size: 2 }, { size: 2, page: 2 }, { size: 1, page: 9 },
  ];
  for (const shape of shapes) {
    const f: TenderListFilter = { vendorOrganisationId: org, ownerId: null, page: 1, size: 25, sort: 'closesAt', dir: 'desc', ...shape };
    const own = await tenderListJson(pool, f);
    const withSession = await sessionForReadWith(pool, sid, vendorListWithSession(f, sid));
    expect(withSession?.session.person?.id).toBe(u.id);
    expect(await tenderListPage(pool, f, withSession!.row as unknown as TenderListJsonRow)).toEqual(own);
  }
  // The route reads it so — one statement for the session and the page — and answers what the
  // vendor's own statement reads.
  const f: TenderListFilter = { vendorOrganisationId: org, ownerId: null, page: 1, size: 25, sort: 'closesAt', dir: 'desc' };
  const sent = jest.spyOn(pool, 'query');
  const answered = (await vendor.get('/api/tenders')).body as { items: unknown[]; total: number };
  const names = sent.mock.calls.map(([q]) => (q as { name?: string }).name);
  sent.mockRestore();
  expect(names).toEqual([expect.stringMatching(/^tendara-session-with-tender-json-session-/)]);
  const own = await tenderListJson(pool, f);
  expect(answered).toEqual({ items: JSON.parse(own.items), total: own.total, page: 1, size: 25 });
  expect(answered.total).toBe(3);
  // A buyer's session reads no tender through the vendor's statement, and its list is the buyer's own.
  const buyerUser = await makeUser(t, 'buyer');
  const otherBuyer = await signedIn(t, buyerUser);
  const buyerSid = await sidOf(buyerUser.email);
  expect((await sessionForReadWith(pool, buyerSid, vendorListWithSession(f, buyerSid)))?.row).toMatchObject({ items: '[]', total: 0, n: 0 });
  expect((await otherBuyer.get('/api/tenders')).body).toMatchObject({ items: [], total: 0 });
  // The vendor deactivated: its session names no person, so no tender either, and the list is 401.
  await t.em().getConnection().execute(`update app_user set active = false where id = ?`, [u.id]);
  const inactive = await sessionForReadWith(pool, sid, vendorListWithSession(f, sid));
  expect(inactive?.session.person).toBeNull();
  expect(inactive?.row).toMatchObject({ items: '[]', total: 0, n: 0 });
  expect((await vendor.get('/api/tenders')).status).toBe(401);
  // A session gone reads nothing at all.
  await t.em().getConnection().execute(`delete from http_session where sid = ?`, [sid]);
  expect(await sessionForReadWith(pool, sid, vendorListWithSession(f, sid))).toBeNull();
});

test("a tender's list entry, kept on its row, follows every change of the tender: odd text, a draft's edit, an amendment, plain SQL", async () => {
  const u = await makeUser(t, 'vendor');
  const vendor = await signedIn(t, u);
  const own = await signedIn(t, await makeUser(t, 'buyer'));
  /** The entry of tender `id` in `who`'s list against what the tender's own view says (as the schema test above). */
  const entryIsView = async (who: Browser, id: string, reference: string) => {
    const list = await who.get('/api/tenders').query({ q: reference });
    expect(list.status).toBe(200);
    const item = (list.body.items as Record<string, unknown>[]).find((x) => x['id'] === id)!;
    const view = (await who.get(`/api/tenders/${id}`)).body as Record<string, unknown>;
    const keys = Object.keys(tenderSummarySchema.shape).filter((k) => k !== 'myBidStatus');
    expect(Object.fromEntries(keys.map((k) => [k, item[k]]))).toEqual(Object.fromEntries(keys.map((k) => [k, view[k]])));
    return item;
  };
  // Quotes, a backslash, a control-free line of accents and an emoji: JSON's escaping, as json_agg wrote it.
  const body = tenderBody(3, 240, { title: 'Salt "coarse" \\ grade — Ærø 🧂', commodity: 'Sel gemme <b>&' });
  const draft = await own.post('/api/tenders', body);
  expect(draft.status).toBe(201);
  const id = draft.body.id as string;
  expect(await entryIsView(own, id, body.reference)).toMatchObject({ title: body.title, regionCount: 3, totalForecast: 6000, status: 'draft' });
  // The draft edited: title, closing time, regions.
  const edited = { ...body, title: 'Gritting salt, edited', closesAt: new Date(Date.now() + 300 * 60_000 + 7).toISOString(), regions: body.regions.slice(0, 2) };
  expect((await own.send('put', `/api/tenders/${id}`, edited)).status).toBe(200);
  expect(await entryIsView(own, id, body.reference)).toMatchObject({ title: 'Gritting salt, edited', regionCount: 2, totalForecast: 3000 });
  // Published, then amended: a later closing time and one more region.
  expect((await own.post(`/api/tenders/${id}/invitations`, { vendorOrganisationIds: [u.vendorOrganisation!.id] })).status).toBe(200);
  expect((await own.post(`/api/tenders/${id}/publish`, {})).status).toBe(200);
  const later = new Date(Date.now() + 600 * 60_000 + 321).toISOString();
  const amended = await own.post(`/api/tenders/${id}/amendments`, {
    reason: 'A new depot and more time.', closesAt: later, regions: [...edited.regions, { code: 'R09', name: 'Depot 9', forecast: 1234.5 }],
  });
  expect(amended.status).toBe(201);
  for (const who of [own, vendor]) expect(await entryIsView(who, id, body.reference)).toMatchObject({ closesAt: later, regionCount: 3, totalForecast: 4234.5, status: 'open' });
  // Behind the API's back, in plain SQL: the trigger still writes the entry.
  await t.em().getConnection().execute(`update tender set title = ?, unit = ? where id = ?`, ['Written "by hand"', 'kg', id]);
  expect(await entryIsView(vendor, id, body.reference)).toMatchObject({ title: 'Written "by hand"', unit: 'kg', myBidStatus: null });
});
