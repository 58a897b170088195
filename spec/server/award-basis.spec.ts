import XlsxPopulate from 'xlsx-populate';
import type { User } from '../../server/entities';
import { MailMessage, Recommendation, Scenario, Tender } from '../../server/entities';
import { QUEUES } from '../../server/jobs/queue';
import { type Browser, makeUser, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { drainQueue } from '../support/wait';

/**
 * The award basis is published with the tender: checked against its regions, locked at publish,
 * shown to vendors in words before they bid (tender, workbook, invitation), and at closing the
 * tender's first scenario; every other set of rules is a what-if that cannot be recommended.
 */
jest.setTimeout(120_000);
let t: TestApp;
let buyer: Browser;
let compliance: Browser;
let vendorUsers: User[];
let vendors: Browser[];

/** Split award, at most 2 vendors, no vendor above 60 % of the total, in whole multiples of 500 t. */
const BASIS = { sourcing: 'split' as const, soleRegions: [], maxVendors: 2, maxVendorShare: 0.6, awardIncrement: 500 };
const ESTIMATE = 987654.32;

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
  vendorUsers = [await makeUser(t, 'vendor'), await makeUser(t, 'vendor')];
  vendors = await Promise.all(vendorUsers.map((u) => signedIn(t, u)));
});
afterAll(() => t.close());

const orgIds = () => vendorUsers.map((u) => u.vendorOrganisation!.id);

async function download(b: Browser, path: string): Promise<Buffer> {
  const res = await b.get(path).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  expect(res.status).toBe(200);
  return res.body as Buffer;
}

/** Every text cell of every sheet, joined. */
async function workbookText(file: Buffer): Promise<string> {
  const wb = await XlsxPopulate.fromDataAsync(file);
  const out: string[] = [];
  for (const sheet of wb.sheets()) {
    const used = sheet.usedRange();
    if (!used) continue;
    // Cells hold text, numbers or nothing.
    for (const row of used.value() as (string | number | boolean | null | undefined)[][]) for (const v of row) if (v !== undefined && v !== null) out.push(String(v));
  }
  return out.join('\n');
}

describe('editing the basis', () => {
  test('sole regions must be regions of the tender: 400 names awardBasis.soleRegions[i] and nothing is stored', async () => {
    const body = tenderBody(3, 60, { awardBasis: { sourcing: 'split', soleRegions: ['R02', 'R09'] } });
    const res = await buyer.post('/api/tenders', body);
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(res.body.errors).toEqual([{ field: 'awardBasis.soleRegions[1]', message: "Region R09 is not one of this tender's regions." }]);
    expect(await t.em().count(Tender, { reference: body.reference })).toBe(0);
  });

  test('the minimum number of vendors may not exceed the maximum: 400 names awardBasis.minVendors', async () => {
    const res = await buyer.post('/api/tenders', tenderBody(3, 60, { awardBasis: { sourcing: 'split', soleRegions: [], minVendors: 3, maxVendors: 2 } }));
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ field: 'awardBasis.minVendors', message: 'Minimum number of vendors (3) is above the maximum (2).' }]);
  });

  test('with an award increment every forecast must be a whole multiple of it: 400 names the region forecast', async () => {
    // tenderBody's forecasts are 1000, 2000, 3000 t: 1000 t lorry loads fit, 750 t only 3000.
    const ok = await buyer.post('/api/tenders', tenderBody(3, 60, { awardBasis: { sourcing: 'split', soleRegions: [], awardIncrement: 1000 } }));
    expect(ok.status).toBe(201);
    expect(ok.body.awardBasis).toEqual({ sourcing: 'split', soleRegions: [], awardIncrement: 1000 });
    const off = await buyer.post('/api/tenders', tenderBody(3, 60, { awardBasis: { sourcing: 'split', soleRegions: [], awardIncrement: 750 } }));
    expect(off.status).toBe(400);
    expect(off.body.errors).toEqual([
      { field: 'regions[0].forecast', message: 'With an award increment of 750 t, the forecast must be a whole multiple of it.' },
      { field: 'regions[1].forecast', message: 'With an award increment of 750 t, the forecast must be a whole multiple of it.' },
    ]);
    const none = await buyer.post('/api/tenders', tenderBody(3, 60, { awardBasis: { sourcing: 'split', soleRegions: [], awardIncrement: 7 } }));
    expect(none.status).toBe(400);
    expect(none.body.errors).toEqual([{ field: 'awardBasis.awardIncrement', message: "No region's forecast is a whole multiple of the award increment 7 t." }]);
  });

  test('a clarification deadline after the closing time is refused naming clarificationsCloseAt', async () => {
    const res = await buyer.post('/api/tenders', tenderBody(3, 60, { clarificationsCloseAt: new Date(Date.now() + 2 * 3600_000).toISOString() }));
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ field: 'clarificationsCloseAt', message: 'The clarification deadline must be before the closing time.' }]);
  });

  test('publishing needs a buying body: 400 names buyingBody and the tender stays a draft', async () => {
    const created = await buyer.post('/api/tenders', tenderBody(3, 60, { buyingBody: null }));
    expect(created.status).toBe(201);
    await buyer.post(`/api/tenders/${created.body.id}/invitations`, { vendorOrganisationIds: orgIds() });
    const res = await buyer.post(`/api/tenders/${created.body.id}/publish`);
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([{ field: 'buyingBody', message: 'Name the buying body (name, address, contact e-mail, country) before publishing.' }]);
    expect((await t.em().findOneOrFail(Tender, { id: created.body.id as string })).status).toBe('draft');
  });

  test('after publishing the basis, buying body, zone, estimate and validity cannot be edited (409, nothing changes)', async () => {
    const body = tenderBody(3, 60, { awardBasis: BASIS, timeZone: 'Europe/Dublin', estimatedValue: ESTIMATE, bidValidityDays: 120 });
    const id = await openTender(buyer, orgIds(), body);
    const res = await buyer.send('put', `/api/tenders/${id}`, {
      ...body, awardBasis: { sourcing: 'sole', soleRegions: [] }, buyingBody: null, timeZone: 'UTC', estimatedValue: 1, bidValidityDays: 30,
    });
    expect(res.status).toBe(409);
    const view = (await buyer.get(`/api/tenders/${id}`)).body;
    expect({ awardBasis: view.awardBasis, buyingBody: view.buyingBody, timeZone: view.timeZone, estimatedValue: view.estimatedValue, bidValidityDays: view.bidValidityDays }).toEqual({
      awardBasis: BASIS, buyingBody: body.buyingBody, timeZone: 'Europe/Dublin', estimatedValue: ESTIMATE, bidValidityDays: 120,
    });
  });
});

describe('vendors see the basis before bidding, never the estimate', () => {
  let id: string;
  let reference: string;
  beforeAll(async () => {
    // 12:00 in Dublin in summer is 11:00 UTC (IST, UTC+1).
    const body = tenderBody(3, 60, { awardBasis: BASIS, timeZone: 'Europe/Dublin', estimatedValue: ESTIMATE, closesAt: '2031-07-01T11:00:00Z' });
    reference = body.reference;
    id = await openTender(buyer, orgIds(), body);
  });

  test("the vendor's GET /api/tenders/:id has the basis and zone but no estimatedValue; the buyer's has it", async () => {
    const mine = (await vendors[0].get(`/api/tenders/${id}`)).body;
    expect(mine.awardBasis).toEqual(BASIS);
    expect(mine.timeZone).toBe('Europe/Dublin');
    expect('estimatedValue' in mine).toBe(false);
    expect((await buyer.get(`/api/tenders/${id}`)).body.estimatedValue).toBe(ESTIMATE);
    const listed = (await vendors[0].get('/api/tenders')).body.items.find((x: { id: string }) => x.id === id);
    expect(listed.timeZone).toBe('Europe/Dublin');
    expect('estimatedValue' in listed).toBe(false);
  });

  test('the invitation e-mail states the basis in words and the closing time in the tender zone, without the estimate', async () => {
    const mail = await waitForMail(t, vendorUsers[0].email, `Invitation to tender ${reference}`);
    expect(mail.subject).toBe(`Invitation to tender ${reference}: Gritting salt for the winter`);
    for (const part of [mail.text, mail.html ?? '']) {
      expect(part).toContain('A region may be shared between vendors.');
      expect(part).toContain('At most 2 vendors will be awarded.');
      expect(part).toContain('No vendor will be awarded more than 60 % of the total quantity.');
      expect(part).toContain('Quantities are awarded in whole multiples of 500 t.');
      expect(part).toContain('Tue, 1 Jul 2031, 12:00 GMT+1 (Europe/Dublin)');
    }
    await drainQueue(t, QUEUES.mail);
    const all = await t.em().find(MailMessage, { subject: { $like: `%${reference}%` } });
    expect(all.length).toBeGreaterThan(0);
    for (const m of all) {
      for (const shown of ['987654', '987,654', '987 654']) {
        expect(m.text).not.toContain(shown);
        expect(m.html ?? '').not.toContain(shown);
      }
    }
  });

  test('the bid receipt names the closing time in the tender zone', async () => {
    const saved = await vendors[0].send('put', `/api/tenders/${id}/bid`, { fixedFee: 100, capacity: null, prices: { R01: 10 }, submit: true, version: null });
    expect(saved.status).toBe(200);
    const receipt = await waitForMail(t, vendorUsers[0].email, `Receipt: your bid on ${reference}`);
    expect(receipt.text).toContain('closing time (Tue, 1 Jul 2031, 12:00 GMT+1 (Europe/Dublin))');
  });

  test("the bid workbook's cover sheet states the basis and the zoned closing time, without the estimate", async () => {
    const text = await workbookText(await download(vendors[1], `/api/tenders/${id}/bid-workbook`));
    expect(text).toContain('How the contract will be awarded (the published award basis)');
    expect(text).toContain('- No vendor will be awarded more than 60 % of the total quantity.');
    expect(text).toContain('- Quantities are awarded in whole multiples of 500 t.');
    expect(text).toContain('Tue, 1 Jul 2031, 12:00 GMT+1 (Europe/Dublin)');
    expect(text).not.toContain('987654');
    expect(text).not.toContain('987,654');
  });
});

describe('awardable and what-if', () => {
  let tenderId: string;
  let scenarios: { id: string; name: string; builtIn: string | null; awardable: boolean; whatIf: string | null; rules: Record<string, unknown> }[];
  beforeAll(async () => {
    // Forecasts 1000, 2000, 3000 t; basis: at most 2 vendors, none above 60 % of the total.
    const body = tenderBody(3, 60, { awardBasis: { sourcing: 'split', soleRegions: [], maxVendors: 2, maxVendorShare: 0.6 } });
    tenderId = await openTender(buyer, orgIds(), body);
    for (const [i, v] of vendors.entries()) {
      const res = await v.send('put', `/api/tenders/${tenderId}/bid`, {
        fixedFee: 1000 + i * 500, capacity: null, prices: { R01: 10 + i, R02: 12 - i, R03: 11 }, submit: true, version: null,
      });
      expect(res.status).toBe(200);
    }
    await passClosingTime(t, tenderId);
    scenarios = (await buyer.get(`/api/tenders/${tenderId}/scenarios`)).body;
  });

  test('the published basis is the first scenario and the only awardable one of the three built-ins', () => {
    expect(scenarios.map((s) => [s.name, s.builtIn, s.awardable])).toEqual([
      ['Published award basis', 'published', true],
      ['All regions split', 'split', false],
      ['All regions sole', 'sole', false],
    ]);
    expect(scenarios[0].rules).toEqual({ sourcing: 'split', soleRegions: [], maxVendors: 2, maxVendorShare: 0.6, exclude: [], require: [] });
    expect(scenarios[0].whatIf).toBeNull();
    expect(scenarios[1].whatIf).toBe('What-if: its maximum number of vendors (none) differs from the published award basis (2). For analysis only; it cannot be recommended.');
    expect(scenarios[2].whatIf).toBe('What-if: its sourcing (each region to one vendor) differs from the published award basis (regions may be shared). For analysis only; it cannot be recommended.');
  });

  test('a scenario with the basis rules (defaults written out) is awardable; leaving out a vendor makes a what-if', async () => {
    const same = await buyer.post(`/api/tenders/${tenderId}/scenarios`, {
      name: 'Basis, spelt out', rules: { sourcing: 'split', soleRegions: [], maxVendors: 2, maxVendorShare: 0.6, maxRegionShare: 1, minVendors: 0, exclude: [], require: [] },
    });
    expect(same.status).toBe(201);
    expect([same.body.awardable, same.body.whatIf]).toEqual([true, null]);
    const without = await buyer.post(`/api/tenders/${tenderId}/scenarios`, {
      name: 'Basis without one vendor', rules: { sourcing: 'split', maxVendors: 2, maxVendorShare: 0.6, exclude: [orgIds()[1]] },
    });
    expect(without.status).toBe(201);
    expect([without.body.awardable, without.body.whatIf]).toEqual([false, 'What-if: it leaves out a vendor, which the published award basis does not. For analysis only; it cannot be recommended.']);
  });

  test('editing a rule of an awardable scenario flips it to a what-if in the list', async () => {
    const made = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'To be edited', rules: { sourcing: 'split', maxVendors: 2, maxVendorShare: 0.6 } });
    expect(made.body.awardable).toBe(true);
    const edited = await buyer.send('put', `/api/scenarios/${made.body.id}`, { name: 'To be edited', rules: { sourcing: 'split', maxVendors: 2, maxVendorShare: 0.5 } });
    expect(edited.status).toBe(200);
    const listed = (await buyer.get(`/api/tenders/${tenderId}/scenarios`)).body.find((s: { id: string }) => s.id === made.body.id);
    expect([listed.awardable, listed.whatIf]).toEqual([false, 'What-if: its maximum vendor share (50 %) differs from the published award basis (60 %). For analysis only; it cannot be recommended.']);
  });

  test('recommending a run of a what-if answers 409 naming the rule, stores nothing; the published basis run is recommended (201)', async () => {
    const split = scenarios.find((s) => s.builtIn === 'split')!;
    const published = scenarios.find((s) => s.builtIn === 'published')!;
    const whatIfRun = await waitForRun(buyer, (await buyer.post(`/api/scenarios/${split.id}/runs`)).body.id as string);
    const basisRun = await waitForRun(buyer, (await buyer.post(`/api/scenarios/${published.id}/runs`)).body.id as string);
    expect([whatIfRun.status, basisRun.status]).toEqual(['optimal', 'optimal']);
    expect([whatIfRun.awardable, basisRun.awardable]).toEqual([false, true]);

    const refused = await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: whatIfRun.id, justification: 'Cheapest.' });
    expect(refused.status).toBe(409);
    expect(refused.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(refused.body.detail).toBe('This scenario is a what-if: its maximum number of vendors (none) differs from the published award basis (2). Only a run of the published award basis can be recommended.');
    expect(refused.body.errors).toEqual([{ field: 'rules.maxVendors', message: 'This rule differs from the published award basis: its maximum number of vendors (none) differs from the published award basis (2).' }]);
    expect(await t.em().count(Recommendation, { tender: tenderId })).toBe(0);

    const compared = await compliance.get(`/api/tenders/${tenderId}/compare?runs=${basisRun.id},${whatIfRun.id}`);
    expect(compared.body.runs.map((r: { awardable: boolean }) => r.awardable)).toEqual([true, false]);
    const runs = await buyer.get(`/api/tenders/${tenderId}/runs`);
    expect(Object.fromEntries(runs.body.map((r: { id: string; awardable: boolean }) => [r.id, r.awardable]))).toEqual({ [basisRun.id]: true, [whatIfRun.id]: false });

    const workbook = await workbookText(await download(buyer, `/api/runs/${whatIfRun.id}/export.xlsx`));
    expect(workbook).toContain('What-if: its maximum number of vendors (none) differs from the published award basis (2). For analysis only; it cannot be recommended.');

    const ok = await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: basisRun.id, justification: 'Least total cost on the published basis.' });
    expect(ok.status).toBe(201);
    expect(await t.em().count(Scenario, { tender: tenderId, builtIn: 'published' })).toBe(1);
  });
});
