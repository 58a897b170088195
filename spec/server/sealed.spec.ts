import XlsxPopulate from 'xlsx-populate';
import { apiRoutes } from '../../server/app';
import { MailMessage } from '../../server/entities';
import { Browser, makeUser, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';
import { openTender } from '../support/tenders';

/**
 * Sealed bids: before closing, no GET route of the API — whichever exists, exports and uploads
 * included — gives buyer, compliance or admin any figure of a submitted bid. The route list is the
 * one Express mounts, so a route added later is covered without editing this test.
 */
let t: TestApp;
let tenderId: string;
let documentId: string;
let vendorBrowser: Browser;
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
});
afterAll(() => t.close());

function text(body: unknown): string {
  return Buffer.isBuffer(body) ? body.toString('latin1') : JSON.stringify(body ?? '');
}

test.each(['buyer', 'compliance', 'admin'])('before closing, no GET route shows %s a bid figure', async (who) => {
  const b = readers[who];
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
    }
  }
  expect(checked).toBeGreaterThan(gets.length - 1);
});

test('before closing, the vendor is served its own figures (so the figures looked for above are there to leak)', async () => {
  const res = await vendorBrowser.get(`/api/tenders/${tenderId}/bid`);
  expect(res.status).toBe(200);
  expect(res.body.bid).toMatchObject({ status: 'submitted', fixedFee: FEE, capacity: CAP, prices: { R01: PRICE } });
});
