import XlsxPopulate from 'xlsx-populate';
import { Bid, BidLine, MailMessage } from '../../server/entities';
import { Browser, makeUser, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';

let t: TestApp;
let buyer: Browser;
let compliance: Browser;
let admin: Browser;
const vendors: { b: Browser; org: string; email: string }[] = [];

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
  admin = await signedIn(t, await makeUser(t, 'admin'));
  for (let i = 0; i < 3; i++) {
    const u = await makeUser(t, 'vendor');
    vendors.push({ b: await signedIn(t, u), org: u.vendorOrganisation!.id, email: u.email });
  }
});
afterAll(() => t.close());

const figures = { fixedFee: 25000, capacity: 4000, prices: { R01: 61.5, R02: 63.25 } };
const SECRET_PRICE = 61.5;

function put(v: Browser, tender: string, body: object) {
  return v.send('put', `/api/tenders/${tender}/bid`, body);
}

test('a vendor saves a draft, submits, revises and withdraws; each submission has a receipt with its digest', async () => {
  const [v] = vendors;
  const id = await openTender(buyer, [v.org]);
  const draft = await put(v.b, id, { ...figures, submit: false, version: null });
  expect(draft.status).toBe(200);
  expect(draft.body).toMatchObject({ status: 'draft', revision: 0, digest: null, prices: figures.prices });
  const sub = await put(v.b, id, { ...figures, submit: true, version: draft.body.version });
  expect(sub.body).toMatchObject({ status: 'submitted', revision: 1 });
  expect(sub.body.digest).toMatch(/^[0-9a-f]{64}$/);
  const receipt = await waitForMail(t, v.email, 'Receipt: your bid');
  expect(receipt.text).toContain(sub.body.digest);
  const rev = await put(v.b, id, { ...figures, fixedFee: 24000, submit: true, version: sub.body.version });
  expect(rev.body).toMatchObject({ status: 'revised', revision: 2, fixedFee: 24000 });
  expect(rev.body.digest).not.toBe(sub.body.digest);
  const asDraft = await put(v.b, id, { ...figures, submit: false, version: rev.body.version });
  expect(asDraft.status).toBe(409);
  const wd = await v.b.post(`/api/tenders/${id}/bid/withdraw`, { version: rev.body.version });
  expect(wd.body.status).toBe('withdrawn');
  expect((await buyer.get(`/api/tenders/${id}/bids`)).body).toEqual({ submitted: 0 });
});

test('prices for regions outside the tender and bad figures are refused naming the field; nothing is stored', async () => {
  const [v] = vendors;
  const id = await openTender(buyer, [v.org]);
  const res = await put(v.b, id, { fixedFee: -1, capacity: 0, prices: { R01: 0, ZZ9: 5 }, submit: true, version: null });
  expect(res.status).toBe(400);
  expect(res.body.errors.map((e: { field: string }) => e.field).sort()).toEqual(['capacity', 'fixedFee', 'prices.R01']);
  const unknown = await put(v.b, id, { fixedFee: 1, capacity: null, prices: { ZZ9: 5 }, submit: true, version: null });
  expect(unknown.status).toBe(400);
  expect(unknown.body.errors).toEqual([{ field: 'prices.ZZ9', message: 'Region ZZ9 is not part of this tender.' }]);
  expect(await t.em().count(Bid, { tender: id })).toBe(0);
});

describe('sealed bids', () => {
  /** A tender of its own with a submitted bid from each of the three vendors. */
  async function tenderWithThreeBids(): Promise<string> {
    const tender = await openTender(buyer, vendors.map((v) => v.org));
    for (const v of vendors) expect((await put(v.b, tender, { ...figures, submit: true, version: null })).status).toBe(200);
    return tender;
  }
  let id: string;
  beforeAll(async () => {
    id = await tenderWithThreeBids();
    for (const v of vendors) await waitForMail(t, v.email, 'Receipt:');
  });

  test('before closing, buyer and compliance get only the count of submitted bids', async () => {
    for (const who of [buyer, compliance]) {
      const res = await who.get(`/api/tenders/${id}/bids`);
      expect(res.status).toBe(200);
      expect(res.body).toEqual({ submitted: 3 });
    }
  });

  test('before closing, no route open to buyer, compliance or admin carries a bid figure', async () => {
    const paths = [`/api/tenders/${id}`, '/api/tenders', `/api/tenders/${id}/bids`, `/api/tenders/${id}/tabulation.xlsx`];
    for (const who of [buyer, compliance, admin]) {
      for (const path of paths) {
        const res = await who.get(path);
        const text = res.body instanceof Buffer ? res.body.toString('latin1') : JSON.stringify(res.body);
        expect({ path, leaks: text.includes(String(SECRET_PRICE)) || text.includes('25000') }).toEqual({ path, leaks: false });
      }
    }
    const tab = await buyer.get(`/api/tenders/${id}/tabulation.xlsx`);
    expect(tab.status).toBe(409);
    expect(tab.body.detail).toBe('Bids are sealed until the closing time.');
    // The admin reads receipts as sent mail: they carry the digest, never the figures.
    const receipts = await t.em().find(MailMessage, { subject: { $like: 'Receipt:%' } });
    expect(receipts.length).toBeGreaterThan(0);
    for (const r of receipts) {
      const one = await admin.get(`/api/outbox/${r.id}`);
      expect(one.body.text.includes(String(SECRET_PRICE)) || one.body.html.includes(String(SECRET_PRICE))).toBe(false);
    }
  });

  test('after closing, the tabulation shows every submitted bid and exports to .xlsx; bids are locked', async () => {
    const id = await tenderWithThreeBids(); // its own tender: the tests above keep theirs open
    await passClosingTime(t, id);
    const res = await buyer.get(`/api/tenders/${id}/bids`);
    expect(res.body.submitted).toBe(3);
    expect(res.body.bids).toHaveLength(3);
    expect(res.body.bids[0]).toMatchObject({ fixedFee: 25000, capacity: 4000, prices: { R01: 61.5, R02: 63.25 } });
    expect((await buyer.get(`/api/tenders/${id}`)).body.status).toBe('closed');
    const xlsx = await compliance.get(`/api/tenders/${id}/tabulation.xlsx`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(xlsx.status).toBe(200);
    const wb = await XlsxPopulate.fromDataAsync(xlsx.body as Buffer);
    expect(wb.sheet('Tabulation')!.cell('A1').value()).toMatch(/^Bid tabulation — T-\S+: Gritting salt for the winter$/);
    const late = await put(vendors[0].b, id, { ...figures, submit: true, version: 2 });
    expect(late.status).toBe(409);
    expect(late.body.detail).toMatch(/^Bidding closed at /);
  });
});

test('a bid arriving after the closing time is refused with a clear message and nothing is stored', async () => {
  const [, v] = vendors;
  const id = await openTender(buyer, [v.org]);
  await passClosingTime(t, id);
  const res = await put(v.b, id, { ...figures, submit: true, version: null });
  expect(res.status).toBe(409);
  expect(res.body.detail).toMatch(/Bidding closed at .* UTC/);
  expect(await t.em().count(Bid, { tender: id })).toBe(0);
});

test('bids racing the deadline are each stored whole before it or refused, never half', async () => {
  const id = await openTender(buyer, vendors.map((v) => v.org), tenderBody(40, 60));
  const prices = Object.fromEntries(Array.from({ length: 40 }, (_, i) => [`R${String(i + 1).padStart(2, '0')}`, 50 + i]));
  // No pause: the closing time passes while the saves are in flight, however fast they are.
  const saving = vendors.map((v) => put(v.b, id, { fixedFee: 1000, capacity: null, prices, submit: true, version: null }));
  await passClosingTime(t, id);
  const results = await Promise.all(saving);
  for (const r of results) expect([200, 409]).toContain(r.status);
  const bids = await t.em().find(Bid, { tender: id });
  // One stored bid per accepted save, none for a refused one; each whole.
  expect(bids).toHaveLength(results.filter((r) => r.status === 200).length);
  for (const b of bids) expect(await t.em().count(BidLine, { bid: b })).toBe(40);
  expect(bids.length).toBe(results.filter((r) => r.status === 200).length);
});

test('two tabs of one vendor: the second save over a stale version gets 409 and nothing is lost', async () => {
  const [v] = vendors;
  const id = await openTender(buyer, [v.org]);
  const first = await put(v.b, id, { ...figures, submit: false, version: null });
  const tabA = await put(v.b, id, { ...figures, fixedFee: 1, submit: false, version: first.body.version });
  expect(tabA.status).toBe(200);
  const tabB = await put(v.b, id, { ...figures, fixedFee: 2, submit: false, version: first.body.version });
  expect(tabB.status).toBe(409);
  expect(tabB.body.detail).toMatch(/changed elsewhere/);
  expect((await v.b.get(`/api/tenders/${id}/bid`)).body.bid.fixedFee).toBe(1);
  // A second "first save" from a tab that never saw the bid is refused too.
  expect((await put(v.b, id, { ...figures, submit: false, version: null })).status).toBe(409);
});

test("a save that changes only prices is a new version: the other tab's save over the old one gets 409", async () => {
  const [v] = vendors;
  const id = await openTender(buyer, [v.org]);
  const first = await put(v.b, id, { ...figures, submit: false, version: null });
  const code = Object.keys(figures.prices)[0];
  const tabA = await put(v.b, id, { ...figures, prices: { ...figures.prices, [code]: 12.3456 }, submit: false, version: first.body.version });
  expect(tabA.status).toBe(200);
  expect(tabA.body.version).toBeGreaterThan(first.body.version);
  expect(tabA.body.prices[code]).toBe(12.3456);
  const tabB = await put(v.b, id, { ...figures, submit: false, version: first.body.version });
  expect(tabB.status).toBe(409);
  const stored = (await v.b.get(`/api/tenders/${id}/bid`)).body.bid;
  expect(stored.prices).toEqual(tabA.body.prices);
  expect(stored.version).toBe(tabA.body.version);
});

test('many vendors saving at the same instant are all stored', async () => {
  const many = await Promise.all(Array.from({ length: 8 }, () => makeUser(t, 'vendor')));
  const browsers = await Promise.all(many.map((u) => signedIn(t, u)));
  const id = await openTender(buyer, many.map((u) => u.vendorOrganisation!.id));
  const results = await Promise.all(browsers.map((b, i) => put(b, id, { fixedFee: 100 + i, capacity: null, prices: { R01: 10 + i }, submit: true, version: null })));
  expect(results.map((r) => r.status)).toEqual(Array(8).fill(200));
  expect((await buyer.get(`/api/tenders/${id}/bids`)).body).toEqual({ submitted: 8 });
});

/** Downloads the tender's bid workbook, checks its name, fills `cells` of its Bid sheet and uploads it as my-bid.xlsx. */
async function uploadFilled(v: Browser, tender: string, cells: Record<string, number>) {
  const dl = await v.get(`/api/tenders/${tender}/bid-workbook`).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  expect(dl.status).toBe(200);
  expect(dl.headers['content-disposition']).toMatch(/-bid\.xlsx/);
  const wb = await XlsxPopulate.fromDataAsync(dl.body as Buffer);
  for (const [cell, value] of Object.entries(cells)) wb.sheet('Bid')!.cell(cell).value(value);
  return v.agent.post(`/api/tenders/${tender}/bid-workbook`).set('X-XSRF-TOKEN', v.token).attach('file', await wb.outputAsync(), 'my-bid.xlsx');
}

test('workbook round trip: download, fill in, upload → the same figures; then submit with the document', async () => {
  const [, , v] = vendors;
  const id = await openTender(buyer, [v.org]);
  const up = await uploadFilled(v.b, id, { C4: 18000, E8: 70.25, E10: 71 });
  expect(up.status).toBe(200);
  expect(up.body.bid).toEqual({ fixedFee: 18000, capacity: null, prices: { R01: 70.25, R03: 71 } });
  const saved = await put(v.b, id, { ...up.body.bid, submit: true, version: null, documentId: up.body.documentId });
  expect(saved.status).toBe(200);
  expect(saved.body.document).toMatchObject({ filename: 'my-bid.xlsx' });
  // After closing, the buyer can download the uploaded workbook.
  await passClosingTime(t, id);
  const bids = await buyer.get(`/api/tenders/${id}/bids`);
  const doc = await buyer.get(`/api/tenders/${id}/documents/${bids.body.bids[0].documentId}`);
  expect(doc.status).toBe(200);
});

test('a draft naming no workbook keeps the one attached while its figures are the workbook\'s, and lets it go when they differ', async () => {
  const [, , v] = vendors;
  const id = await openTender(buyer, [v.org]);
  const up = await uploadFilled(v.b, id, { C4: 18000, E8: 70.25, E10: 71 });
  expect(up.status).toBe(200);
  const attached = await put(v.b, id, { ...up.body.bid, submit: false, version: null, documentId: up.body.documentId });
  expect(attached.status).toBe(200);
  expect(attached.body.document).toMatchObject({ id: up.body.documentId, filename: 'my-bid.xlsx' });
  // The same figures again, no workbook named: the draft keeps it (decided by keepsDocument, not by the one-call save).
  const same = await put(v.b, id, { ...up.body.bid, submit: false, version: attached.body.version });
  expect(same.status).toBe(200);
  expect(same.body).toMatchObject({ version: attached.body.version + 1, document: { id: up.body.documentId, filename: 'my-bid.xlsx' } });
  const typed = await put(v.b, id, { ...up.body.bid, fixedFee: 17500, submit: false, version: same.body.version });
  expect(typed.status).toBe(200);
  expect(typed.body).toMatchObject({ version: same.body.version + 1, fixedFee: 17500, document: null });
  expect(await t.em().findOneOrFail(Bid, { tender: id })).toMatchObject({ fixedFee: 17500, document: null, status: 'draft' });
  // Without a workbook attached any more, the next draft is the one-call save.
  const next = await put(v.b, id, { ...up.body.bid, fixedFee: 17000, submit: false, version: typed.body.version });
  expect(next.status).toBe(200);
  expect(next.body).toMatchObject({ version: typed.body.version + 1, fixedFee: 17000, document: null });
});

test('a broken upload is refused naming the cell, a renamed non-xlsx file by content, an oversize file with 413', async () => {
  const [, , v] = vendors;
  const id = await openTender(buyer, [v.org]);
  const wb = await XlsxPopulate.fromDataAsync(
    (await v.b.get(`/api/tenders/${id}/bid-workbook`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    })).body as Buffer,
  );
  wb.sheet('Bid')!.cell('E9').value('cheap');
  const bad = await v.b.agent.post(`/api/tenders/${id}/bid-workbook`).set('X-XSRF-TOKEN', v.b.token).attach('file', (await wb.outputAsync()), 'bid.xlsx');
  expect(bad.status).toBe(400);
  expect(bad.body.errors).toContainEqual({ field: 'Bid!E9', message: expect.stringMatching(/^Bid!E9: unit price must be a number/) });
  const renamed = await v.b.agent.post(`/api/tenders/${id}/bid-workbook`).set('X-XSRF-TOKEN', v.b.token).attach('file', Buffer.from('code,price\nR01,5\n'), 'bid.xlsx');
  expect(renamed.status).toBe(400);
  const big = await v.b.agent.post(`/api/tenders/${id}/bid-workbook`).set('X-XSRF-TOKEN', v.b.token).attach('file', Buffer.alloc(6 * 1024 * 1024, 1), 'bid.xlsx');
  expect(big.status).toBe(413);
  expect(await t.em().count(Bid, { tender: id })).toBe(0);
});
