import { createHash, createHmac } from 'node:crypto';
import XlsxPopulate from 'xlsx-populate';
import { simpleParser } from 'mailparser';
import { apiRoutes } from '../../server/app';
import { MailMessage } from '../../server/entities';
import { Browser, makeUser, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';
import { openTender, passClosingTime } from '../support/tenders';

/**
 * Sealed bids: before closing, no GET route of the API — whichever exists, exports and uploads
 * included — gives buyer, compliance or admin any figure of a submitted bid. The route list is the
 * one Express mounts, so a route added later is covered without editing this test.
 */
let t: TestApp;
let tenderId: string;
let documentId: string;
let vendorBrowser: Browser;
let vendorEmail: string;
/** What a reader could try to recompute: the bid's canonical content, as the server once hashed it unsalted. */
let canonical: string;
const readers: Record<string, Browser> = {};
// Figures nobody else uses, so that finding them anywhere means a leak.
const FEE = 987654.32;
const CAP = 43210.5;
const PRICE = 77.7123;

beforeAll(async () => {
  t = await startTestApp();
  const buyer = await signedIn(t, await makeUser(t, 'buyer'));
  readers['buyer'] = buyer;
  readers['compliance'] = await signedIn(t, await makeUser(t, 'compliance'));
  readers['admin'] = await signedIn(t, await makeUser(t, 'admin'));
  const vendor = await makeUser(t, 'vendor');
  const v = await signedIn(t, vendor);
  vendorBrowser = v;
  tenderId = await openTender(buyer, [vendor.vendorOrganisation!.id]);
  const wb = await v.get(`/api/tenders/${tenderId}/bid-workbook`).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  const book = await XlsxPopulate.fromDataAsync(wb.body as Buffer);
  book.sheet('Bid')!.cell('C4').value(FEE);
  book.sheet('Bid')!.cell('C5').value(CAP);
  book.sheet('Bid')!.cell('E8').value(PRICE);
  const up = await v.agent.post(`/api/tenders/${tenderId}/bid-workbook`).set('X-XSRF-TOKEN', v.token)
    .attach('file', (await book.outputAsync()), 'sealed.xlsx');
  expect(up.status).toBe(200);
  documentId = up.body.documentId;
  const saved = await v.send('put', `/api/tenders/${tenderId}/bid`, { ...up.body.bid, submit: true, version: null, documentId });
  expect(saved.status).toBe(200);
  await waitForMail(t, vendor.email, 'Receipt:');
  vendorBrowser = v;
  vendorEmail = vendor.email;
  const { reference } = (await buyer.get(`/api/tenders/${tenderId}`)).body as { reference: string };
  const prices = saved.body.prices as Record<string, number>;
  canonical = JSON.stringify({
    tender: reference, vendor: vendor.vendorOrganisation!.id, revision: 1, fixedFee: saved.body.fixedFee, capacity: saved.body.capacity,
    prices: Object.keys(prices).sort().map((code) => [code, prices[code]]),
  });
});
afterAll(() => t.close());

function text(body: unknown): string {
  return Buffer.isBuffer(body) ? body.toString('latin1') : JSON.stringify(body ?? '');
}

/** Values computed from the bid that a reader could test guesses of the figures against. */
async function derivedSecrets(): Promise<Record<string, string>> {
  const [row] = await t.em().getConnection().execute<{ nonce: string; digest: string; file_digest: string }[]>(
    `select b.nonce, b.digest, d.digest as file_digest from bid b join bid_document d on d.id = b.document_id`,
  );
  return {
    'unsalted SHA-256 of the content': createHash('sha256').update(canonical).digest('hex'),
    'nonce': row.nonce,
    'SHA-256 of the uploaded workbook': row.file_digest,
  };
}

test.each(['buyer', 'compliance', 'admin'])('before closing, no GET route shows %s a bid figure or a value a guess of the figures could be checked against', async (who) => {
  const b = readers[who];
  const secrets = await derivedSecrets();
  const mails = await t.em().find(MailMessage, {});
  const gets = apiRoutes(t.deps).filter((r) => r.method === 'get');
  let checked = 0;
  for (const r of gets) {
    const ids = r.path.includes(':documentId') ? [documentId] : r.path.includes('outbox/:id') ? mails.map((m) => m.id) : [''];
    for (const extra of ids) {
      const path = '/api' + r.path.replace(':id', r.path.startsWith('/outbox') ? extra : tenderId).replace(':documentId', extra).replace(':token', 'x'.repeat(43));
      const res = await b.get(path).buffer(true);
      const body = text(res.body) + text(res.text);
      checked += 1;
      // Text answers are searched below; a zipped file (a workbook) could hide a figure, so none may be served.
      if (res.status === 200) expect({ path, text: ['application/json', 'text/csv'].includes(res.type) }).toEqual({ path, text: true });
      for (const figure of [FEE, CAP, PRICE]) {
        expect({ path, figure, leaked: body.includes(String(figure)) }).toEqual({ path, figure, leaked: false });
      }
      for (const [what, value] of Object.entries(secrets)) {
        expect({ path, what, leaked: body.includes(value) }).toEqual({ path, what, leaked: false });
      }
    }
  }
  expect(checked).toBeGreaterThan(gets.length - 1);
});

test('before closing, the vendor is served its own figures (so the figures looked for above are there to leak)', async () => {
  const res = await vendorBrowser.get(`/api/tenders/${tenderId}/bid`);
  expect(res.status).toBe(200);
  expect(res.body.bid).toMatchObject({ status: 'submitted', fixedFee: FEE, capacity: CAP, prices: { R01: PRICE } });
});

test('before closing, the vendor itself is never served the nonce that keys its receipt', async () => {
  const { nonce } = await derivedSecrets();
  const gets = apiRoutes(t.deps).filter((r) => r.method === 'get' && !r.path.includes('outbox') && !r.path.includes(':documentId'));
  expect(gets.length).toBeGreaterThan(10);
  for (const r of gets) {
    const path = '/api' + r.path.replace(':id', tenderId).replace(':token', 'x'.repeat(43));
    const res = await vendorBrowser.get(path).buffer(true);
    expect({ path, leaked: (text(res.body) + text(res.text)).includes(nonce) }).toEqual({ path, leaked: false });
  }
});

test('before closing, no e-mail carries a figure, the unsalted digest of the content or the nonce; the receipt carries only the commitment', async () => {
  const secrets = await derivedSecrets();
  const mails = await t.em().find(MailMessage, {}, { populate: ['raw'] });
  expect(mails.length).toBeGreaterThan(0);
  for (const m of mails) {
    const all = [m.subject, m.text, m.html ?? '', m.raw.toString('latin1')].join('\n');
    for (const [what, value] of Object.entries({ ...secrets, fee: String(FEE), cap: String(CAP), price: String(PRICE) })) {
      expect({ mail: m.subject, what, leaked: all.includes(value) }).toEqual({ mail: m.subject, what, leaked: false });
    }
  }
});

test('before closing, the audit trail records that a bid arrived, with no digest or other value computed from its figures', async () => {
  const trail = (await readers['compliance'].get(`/api/tenders/${tenderId}/audit`)).body as {
    action: string; detail: Record<string, unknown>; beforeDigest: string | null; afterDigest: string | null;
  }[];
  const bidEntries = trail.filter((e) => e.action.startsWith('bid.'));
  expect(bidEntries.map((e) => e.action)).toEqual(['bid.submitted']);
  for (const e of bidEntries) {
    expect(Object.keys(e.detail).sort()).toEqual(['receivedAt', 'revision']);
    expect(e.beforeDigest).toBeNull();
    expect(e.afterDigest).toBeNull();
  }
});

describe('a cancelled tender', () => {
  // Figures of their own, so that finding them anywhere means this bid leaked.
  const C_FEE = 876543.21;
  const C_CAP = 32109.5;
  const C_PRICE = 66.6123;
  let cancelledId: string;
  let cancelledNonce: string;

  beforeAll(async () => {
    const vendor = await makeUser(t, 'vendor');
    const v = await signedIn(t, vendor);
    cancelledId = await openTender(readers['buyer'], [vendor.vendorOrganisation!.id]);
    const saved = await v.send('put', `/api/tenders/${cancelledId}/bid`, { fixedFee: C_FEE, capacity: C_CAP, prices: { R01: C_PRICE }, submit: true, version: null });
    expect(saved.status).toBe(200);
    await waitForMail(t, vendor.email, 'Receipt:');
    const cancelled = await readers['buyer'].post(`/api/tenders/${cancelledId}/cancel`, { reason: 'The requirement lapsed.' });
    expect(cancelled.status).toBe(200);
    await waitForMail(t, vendor.email, 'Tender ');
    // Past its closing time too: nothing may open it.
    await passClosingTime(t, cancelledId);
    const [row] = await t.em().getConnection().execute<{ nonce: string }[]>('select nonce from bid where tender_id = ?', [cancelledId]);
    cancelledNonce = row.nonce;
  });

  test.each(['buyer', 'compliance', 'admin'])('after cancelling, even past the closing time, no GET route shows %s a figure of its bids or their nonce', async (who) => {
    const b = readers[who];
    const gets = apiRoutes(t.deps).filter((r) => r.method === 'get' && !r.path.includes(':documentId') && !r.path.includes(':token') && !r.path.startsWith('/outbox/'));
    expect(gets.length).toBeGreaterThan(10);
    expect((await b.get(`/api/tenders/${cancelledId}`)).body.status).toBe('cancelled');
    for (const r of gets) {
      const path = '/api' + r.path.replace(':id', cancelledId);
      const res = await b.get(path).buffer(true);
      const body = text(res.body) + text(res.text);
      if (res.status === 200) expect({ path, text: ['application/json', 'text/csv'].includes(res.type) }).toEqual({ path, text: true });
      for (const secret of [String(C_FEE), String(C_CAP), String(C_PRICE), cancelledNonce]) {
        expect({ path, secret, leaked: body.includes(secret) }).toEqual({ path, secret, leaked: false });
      }
    }
  });

  test('after cancelling, no e-mail (the cancellation notice included) and no outbox entry carries a figure of its bids or their nonce', async () => {
    const mails = await t.em().find(MailMessage, {}, { populate: ['raw'] });
    expect(mails.some((m) => m.subject.endsWith(' is cancelled'))).toBe(true);
    for (const m of mails) {
      const all = [m.subject, m.text, m.html ?? '', m.raw.toString('latin1')].join('\n');
      for (const secret of [String(C_FEE), String(C_CAP), String(C_PRICE), cancelledNonce]) {
        expect({ mail: m.subject, secret, leaked: all.includes(secret) }).toEqual({ mail: m.subject, secret, leaked: false });
      }
      const shown = await readers['admin'].get(`/api/outbox/${m.id}`);
      for (const secret of [String(C_FEE), String(C_CAP), String(C_PRICE), cancelledNonce]) {
        expect({ mail: m.subject, secret, leaked: text(shown.body).includes(secret) }).toEqual({ mail: m.subject, secret, leaked: false });
      }
    }
  });
});

test('at opening, anyone can recompute each receipt from the revealed figures and nonce; the server checks it too', async () => {
  const mail = await waitForMail(t, vendorEmail, 'Receipt:');
  const parsed = await simpleParser((await t.em().findOneOrFail(MailMessage, { id: mail.id }, { populate: ['raw'] })).raw);
  const receipt = /Receipt commitment: ([0-9a-f]{64})/.exec(parsed.text ?? '')?.[1];
  expect(receipt).toMatch(/^[0-9a-f]{64}$/);

  await passClosingTime(t, tenderId);
  const res = await readers['buyer'].get(`/api/tenders/${tenderId}/bids`);
  expect(res.status).toBe(200);
  const [bid] = res.body.bids as { vendor: { id: string }; revision: number; fixedFee: number; capacity: number | null; prices: Record<string, number>; digest: string; nonce: string; receiptVerified: boolean }[];
  expect(bid).toMatchObject({ digest: receipt, receiptVerified: true });
  // The third party's recipe (DEVELOPERS.md, "Sealed bids"), with node:crypto alone.
  const { reference } = (await readers['buyer'].get(`/api/tenders/${tenderId}`)).body as { reference: string };
  const message = JSON.stringify({
    tender: reference, vendor: bid.vendor.id, revision: bid.revision, fixedFee: bid.fixedFee, capacity: bid.capacity,
    prices: Object.keys(bid.prices).sort().map((code) => [code, bid.prices[code]]),
  });
  expect(message).toBe(canonical);
  expect(createHmac('sha256', Buffer.from(bid.nonce, 'hex')).update(message).digest('hex')).toBe(receipt);
  // The vendor sees the key of its own receipt now too.
  expect((await vendorBrowser.get(`/api/tenders/${tenderId}/bid`)).body.bid).toMatchObject({ digest: receipt, nonce: bid.nonce });

  // A figure changed behind the application's back no longer matches its receipt.
  await t.em().getConnection().execute(`update bid set fixed_fee = fixed_fee + 1`);
  const tampered = await readers['compliance'].get(`/api/tenders/${tenderId}/bids`);
  expect(tampered.body.bids[0]).toMatchObject({ digest: receipt, receiptVerified: false });
});
