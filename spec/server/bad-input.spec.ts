import { threadId } from 'node:worker_threads';
import express from 'express';
import request from 'supertest';
import { BidDocument, Tender, User, VendorOrganisation } from '../../server/entities';
import { errorHandler } from '../../server/http/error-handler';
import { buildBidWorkbook } from '../../server/workbooks/bid-workbook';
import { holdWorkbookTasksAt, lastWorkbookThreadId } from '../../server/workbooks/workbook-pool';
import { Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { openTender, tenderBody } from '../support/tenders';
import { waitFor } from '../support/wait';
import { buildZip, editWorkbook, xlsxLikeParts } from './workbooks/zip-fixtures';

/** Bad input changes nothing and never crashes: a 4xx problem+json naming the field, nothing stored, the server answering. */
// The first upload starts a worker thread, which from the sources compiles its TypeScript first.
jest.setTimeout(60_000);

let t: TestApp;
let buyer: Browser;
let admin: Browser;
let vendor: Browser;
let org: string;

beforeAll(async () => {
  t = await startTestApp({ solver: false });
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  admin = await signedIn(t, await makeUser(t, 'admin'));
  const v = await makeUser(t, 'vendor');
  org = v.vendorOrganisation!.id;
  vendor = await signedIn(t, v);
});
afterAll(() => t.close());

const MB = 1024 * 1024;
const fields = (res: { body: { errors?: { field: string }[] } }) => (res.body.errors ?? []).map((e) => e.field);

async function stillAnswering(): Promise<void> {
  const res = await buyer.get('/api/session');
  expect(res.status).toBe(200);
}

describe('control characters are refused with the field named, before anything is stored', () => {
  test('a NUL in a tender title or a region name: 400 naming each, no tender stored', async () => {
    const before = await t.em().count(Tender, {});
    const body = tenderBody(2);
    body.title = 'Salt\u0000';
    body.regions[1].name = 'Depot\u00002';
    const res = await buyer.post('/api/tenders', body);
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.errors).toEqual(expect.arrayContaining([
      { field: 'title', message: 'Title must not contain control characters such as line breaks, tabs or NUL.' },
      { field: 'regions[1].name', message: 'Region name must not contain control characters such as line breaks, tabs or NUL.' },
    ]));
    expect(await t.em().count(Tender, {})).toBe(before);
    await stillAnswering();
  });

  test('a description may hold line breaks but not a NUL', async () => {
    const ok = await buyer.post('/api/tenders', tenderBody(1, 60, { description: 'Line one\nLine two\tend' }));
    expect(ok.status).toBe(201);
    const bad = await buyer.post('/api/tenders', tenderBody(1, 60, { description: 'Line one\u0000' }));
    expect(bad.status).toBe(400);
    expect(bad.body.errors).toEqual([{ field: 'description', message: 'Description must not contain control characters (only line breaks and tabs are allowed).' }]);
  });

  test('a NUL in the sign-in e-mail: 400 naming the e-mail, not a 500', async () => {
    const b = await new Browser(t.app).init();
    const res = await b.signIn('buyer\u0000@people.test');
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ field: 'email', message: 'E-mail must not contain control characters such as line breaks, tabs or NUL.' }]);
  });

  test('a NUL in a person\'s or an organisation\'s name: 400 naming it, nobody stored', async () => {
    const people = await t.em().count(User, {});
    const firms = await t.em().count(VendorOrganisation, {});
    const person = await admin.post('/api/users', { name: 'Ada\u0000', email: 'ada@council.test', role: 'buyer' });
    expect(person.status).toBe(400);
    expect(fields(person)).toEqual(['name']);
    const firm = await admin.post('/api/vendor-organisations', { name: 'Firm\u0007', registrationNumber: 'R-1\u0000', sme: false, contactEmail: 'firm@firm.test' });
    expect(firm.status).toBe(400);
    expect(fields(firm).sort()).toEqual(['name', 'registrationNumber']);
    expect(await t.em().count(User, {})).toBe(people);
    expect(await t.em().count(VendorOrganisation, {})).toBe(firms);
  });

  test('a malformed path such as /api/tenders/% is a 400 problem, not a 500', async () => {
    const res = await buyer.get('/api/tenders/%');
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body).toMatchObject({ status: 400, title: 'Malformed path', errors: [{ field: '(path)', message: 'The request path is not valid URL encoding.' }] });
    await stillAnswering();
  });
});

describe('the database refusing a client\'s value is a 400, never a 500 (the safety net behind the schemas)', () => {
  const cases: Array<[string, string, unknown[]]> = [
    ['invalid byte sequence (22021)', "select convert_from(decode('610062', 'hex'), 'UTF8') as v", []],
    ['numeric out of range (22003)', 'select ?::numeric(16,4) as v', ['1e20']],
    ['invalid text representation (22P02)', 'select ?::int as v', ['twelve']],
  ];
  test.each(cases)('%s', async (_name, sql, params) => {
    const app = express();
    app.get('/probe', async () => {
      await t.em().execute(sql, params);
    });
    app.use(errorHandler);
    const res = await request(app).get('/probe');
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.errors).toHaveLength(1);
  });
});

describe('figures the columns cannot store exactly are refused', () => {
  test('a forecast of 1e-7 (which numeric(16,4) would store as 0) or of 1e12 is refused naming the region', async () => {
    const before = await t.em().count(Tender, {});
    const body = tenderBody(3);
    body.regions[0].forecast = 1e-7;
    body.regions[1].forecast = 12.34567;
    body.regions[2].forecast = 1e12;
    const res = await buyer.post('/api/tenders', body);
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([
      { field: 'regions[0].forecast', message: 'Forecast may have at most 4 decimals (and must not round to 0).' },
      { field: 'regions[1].forecast', message: 'Forecast may have at most 4 decimals (and must not round to 0).' },
      { field: 'regions[2].forecast', message: 'Forecast must be below 1e+12.' },
    ]);
    expect(await t.em().count(Tender, {})).toBe(before);
  });

  test('a capacity cap of 1e-7 is refused naming the capacity; no bid is stored', async () => {
    const id = await openTender(buyer, [org]);
    const res = await vendor.send('put', `/api/tenders/${id}/bid`, { fixedFee: 0, capacity: 1e-7, prices: { R01: 5 }, submit: true, version: null });
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ field: 'capacity', message: 'Capacity cap may have at most 4 decimals (and must not round to 0).' }]);
    expect((await vendor.get(`/api/tenders/${id}/bid`)).body).toEqual({ bid: null });
  });

  test('a capacity cap of 1e-7 in an uploaded workbook is refused naming its cell', async () => {
    const id = await openTender(buyer, [org]);
    const body = tenderBody();
    const tender = await t.em().findOneOrFail(Tender, { id });
    const real = await editWorkbook(await buildBidWorkbook({
      reference: tender.reference, title: 'X', currency: 'EUR', unit: 't', closesAt: body.closesAt, vendorName: 'V', regions: body.regions,
    }), (wb) => {
      const sheet = wb.sheet('Bid')!;
      sheet.cell('C4').value(10);
      sheet.cell('C5').value(1e-7);
      sheet.cell('E8').value(5);
    });
    const before = await t.em().count(BidDocument, {});
    const res = await vendor.agent.post(`/api/tenders/${id}/bid-workbook`).set('X-XSRF-TOKEN', vendor.token).attach('file', real, 'bid.xlsx');
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ field: 'Bid!C5', message: 'Bid!C5: capacity cap may have at most 4 decimals (and must not round to 0).' }]);
    expect(await t.em().count(BidDocument, {})).toBe(before);
  });

  test('a forecast of 1e-7 in an imported region file is refused naming its row', async () => {
    const csv = 'code,name,forecast\nR01,Depot,0.0000001\nR02,Other,12\n';
    const res = await buyer.agent.post('/api/tenders/regions/import').set('X-XSRF-TOKEN', buyer.token).attach('file', Buffer.from(csv), 'regions.csv');
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ field: 'row 2', message: 'Row 2: forecast may have at most 4 decimals (and must not round to 0).' }]);
  });
});

describe('region codes that are reserved words are refused at entry', () => {
  test.each(['__proto__', 'constructor', 'toString'])('a tender with region code %s is refused naming the code', async (code) => {
    const before = await t.em().count(Tender, {});
    const body = tenderBody(2);
    body.regions[1].code = code;
    const res = await buyer.post('/api/tenders', body);
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{
      field: 'regions[1].code',
      message: `Region code "${code}" is a reserved word; region codes are letters, digits, ".", "_" and "-", and not a word such as __proto__, constructor or toString.`,
    }]);
    expect(await t.em().count(Tender, {})).toBe(before);
  });

  test('an imported region file with such codes is refused naming the rows', async () => {
    const csv = 'code,name,forecast\n__proto__,A,10\nconstructor,B,20\nR03,C,30\n';
    const res = await buyer.agent.post('/api/tenders/regions/import').set('X-XSRF-TOKEN', buyer.token).attach('file', Buffer.from(csv), 'regions.csv');
    expect(res.status).toBe(400);
    expect(fields(res)).toEqual(['row 2', 'row 3']);
    expect(res.body.errors[0].message).toMatch(/^Row 2: region code "__proto__" is a reserved word/);
  });

  test('a bid pricing a region __proto__ or constructor is refused naming the price, not silently dropped', async () => {
    const id = await openTender(buyer, [org]);
    const raw = JSON.stringify({ fixedFee: 0, capacity: null, submit: true, version: null }).replace('{', '{"prices":{"__proto__":5,"constructor":6,"R01":7},');
    const res = await vendor.agent.put(`/api/tenders/${id}/bid`).set('X-XSRF-TOKEN', vendor.token).set('Content-Type', 'application/json').send(raw);
    expect(res.status).toBe(400);
    expect(fields(res).sort()).toEqual(['prices.__proto__', 'prices.constructor']);
    expect((await vendor.get(`/api/tenders/${id}/bid`)).body).toEqual({ bid: null });
  });
});

describe('hostile workbooks are refused without holding up the server', () => {
  let tenderId: string;
  beforeAll(async () => {
    tenderId = await openTender(buyer, [org]);
  });

  function upload(file: Buffer) {
    return vendor.agent.post(`/api/tenders/${tenderId}/bid-workbook`).set('X-XSRF-TOKEN', vendor.token).attach('file', file, 'bid.xlsx');
  }

  /** About 40 to 1: under the ratio limit, so only the total or the part count can catch it. */
  function modestPart(size: number): Buffer {
    const part = Buffer.alloc(size);
    for (let i = 0; i < part.length; i += 1024) part.writeUInt32LE((i * 2654435761) >>> 0, i);
    return part;
  }

  const bombs: Array<[string, () => Buffer, string]> = [
    ['many parts under 1 MB adding up to 27 MB', () => buildZip([...xlsxLikeParts(), ...Array.from({ length: 30 }, (_, i) => ({ name: `xl/worksheets/sheet${i + 1}.xml`, data: modestPart(900 * 1024) }))]),
      'The workbook would expand to more than 20 MB; it is refused as unsafe.'],
    ['many parts under 1 MB whose headers say 1 kB each', () => buildZip([...xlsxLikeParts(), ...Array.from({ length: 30 }, (_, i) => ({ name: `xl/worksheets/sheet${i + 1}.xml`, data: modestPart(900 * 1024), declaredSize: 1024 }))]),
      'The workbook part "xl/worksheets/sheet1.xml" expands beyond its declared size; it is refused as unsafe.'],
    ['one huge part of zeros', () => buildZip([...xlsxLikeParts(), { name: 'xl/worksheets/sheet1.xml', data: Buffer.alloc(60 * MB) }]),
      'The workbook would expand to more than 20 MB; it is refused as unsafe.'],
    ['600 tiny parts', () => buildZip([...xlsxLikeParts(), ...Array.from({ length: 600 }, (_, i) => ({ name: `xl/p${i}.xml`, data: Buffer.from('<x/>'), store: true }))]),
      'The workbook has 602 internal parts; at most 500 are accepted.'],
  ];

  test.each(bombs)('%s: 400 naming the file and the problem, nothing stored, the server still answering', async (_name, make, message) => {
    const before = await t.em().count(BidDocument, {});
    const res = await upload(make());
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.errors).toEqual([{ field: 'file', message }]);
    expect(await t.em().count(BidDocument, {})).toBe(before);
    await stillAnswering();
  });

  test('a legitimate large workbook is parsed in another thread: the server answers a session request while the parse is held', async () => {
    const body = tenderBody(500);
    const id = await openTender(buyer, [org], body);
    const tender = await t.em().findOneOrFail(Tender, { id });
    const file = await editWorkbook(await buildBidWorkbook({
      reference: tender.reference, title: body.title, currency: 'EUR', unit: 't', closesAt: body.closesAt, vendorName: 'V', regions: body.regions,
    }), (wb) => {
      const sheet = wb.sheet('Bid')!;
      sheet.cell('C4').value(100);
      for (let row = 8; row < 508; row++) sheet.cell(`E${row}`).value(50 + (row % 40) / 4);
    });

    const gate = new SharedArrayBuffer(4);
    const slots = new Int32Array(gate);
    holdWorkbookTasksAt(gate);
    try {
      const pending = vendor.agent.post(`/api/tenders/${id}/bid-workbook`).set('X-XSRF-TOKEN', vendor.token).attach('file', file, 'big.xlsx').then((r) => r);
      // Wait until the worker has the task and is held at the gate.
      await waitFor('the upload to reach the workbook worker', () => Atomics.load(slots, 0) === 1, { timeoutMs: 50_000, everyMs: 5 });
      const session = await vendor.get('/api/session');
      expect(session.status).toBe(200);
      expect(Atomics.load(slots, 0)).toBe(1);
      Atomics.store(slots, 0, 2);
      Atomics.notify(slots, 0);
      const res = await pending;
      expect(res.status).toBe(200);
      expect(Object.keys(res.body.bid.prices)).toHaveLength(500);
      expect(typeof lastWorkbookThreadId).toBe('number');
      expect(lastWorkbookThreadId).not.toBe(threadId);
    } finally {
      holdWorkbookTasksAt(undefined);
      Atomics.store(slots, 0, 2);
      Atomics.notify(slots, 0);
    }
  });
});
