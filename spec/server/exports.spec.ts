import XlsxPopulate from 'xlsx-populate';
import { Tender, VendorOrganisation } from '../../server/entities';
import { looksLikeFormula } from '../../server/workbooks/spreadsheet-text';
import { Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { passClosingTime, tenderBody } from '../support/tenders';
import { buildZip, cellFormat, readZipText, unzipAll } from './workbooks/zip-fixtures';

/** Exports never carry live formulas or links: every workbook and CSV Tendara writes, and the copy of an uploaded workbook. */
jest.setTimeout(120_000);

const LINK = '=HYPERLINK("http://x","y")';
const WIDE = '＝HYPERLINK("http://x","y")';

let t: TestApp;
let buyer: Browser;
let compliance: Browser;
let vendorA: Browser;
let vendorB: Browser;
let tenderId: string;
let reference: string;

function binary(res: import('superagent').Request) {
  return res.buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

/**
 * Reads an exported workbook back: no sheet holds a formula, and every text cell a spreadsheet
 * could take for a formula is stored as text with the quote prefix. Returns the cell values, by
 * "Sheet!A1", for the caller's own checks.
 */
async function readNeutralised(file: Buffer): Promise<Map<string, unknown>> {
  const parts = await unzipAll(file);
  const styles = parts.get('xl/styles.xml')!.toString('utf8');
  const workbook = await XlsxPopulate.fromDataAsync(file);
  const values = new Map<string, unknown>();
  let formulaLike = 0;
  workbook.sheets().forEach((sheet, i) => {
    const xml = readZipText(file, `xl/worksheets/sheet${i + 1}.xml`);
    expect(xml).not.toMatch(/<f[ >]/);
    sheet.forEachExistingRow((row) => {
      for (let c = 1; c <= 60; c++) {
        if (!row.hasCell(c)) continue;
        const cell = row.cell(c);
        expect(cell.formula()).toBeUndefined();
        const value = cell.value();
        values.set(`${sheet.name()}!${cell.address()}`, value);
        if (typeof value === 'string' && looksLikeFormula(value)) {
          formulaLike++;
          expect(xml).toMatch(new RegExp(`<c r="${cell.address()}"[^>]*t="s"`));
          expect(cellFormat(xml, styles, cell.address())).toContain('quotePrefix="1"');
        }
      }
    });
  });
  values.set('(formula-like cells)', formulaLike);
  return values;
}

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer', { name: WIDE }));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
  const a = await makeUser(t, 'vendor');
  const b = await makeUser(t, 'vendor');
  await t.em().nativeUpdate(VendorOrganisation, { id: a.vendorOrganisation!.id }, { name: LINK });
  await t.em().nativeUpdate(VendorOrganisation, { id: b.vendorOrganisation!.id }, { name: '-2+3 Haulage' });
  vendorA = await signedIn(t, a);
  vendorB = await signedIn(t, b);
  const body = tenderBody(3, 60, { title: '@SUM(1)' });
  body.regions[0].name = '+1+1';
  body.regions[1].name = ` ${LINK}`;
  const created = await buyer.post('/api/tenders', body);
  expect(created.status).toBe(201);
  tenderId = created.body.id;
  reference = body.reference;
  expect((await buyer.post(`/api/tenders/${tenderId}/invitations`, { vendorOrganisationIds: [a.vendorOrganisation!.id, b.vendorOrganisation!.id] })).status).toBe(200);
  expect((await buyer.post(`/api/tenders/${tenderId}/publish`)).status).toBe(200);
});
afterAll(() => t.close());

/** The vendor's workbook, filled in, with a formula (and its cached value), an external link, a defined name and a macro part added. */
async function hostileUpload(): Promise<Buffer> {
  const dl = await binary(vendorA.get(`/api/tenders/${tenderId}/bid-workbook`));
  const wb = await XlsxPopulate.fromDataAsync(dl.body as Buffer);
  const sheet = wb.sheet('Bid')!;
  sheet.cell('C4').value(18000);
  sheet.cell('E8').value(70.25);
  sheet.cell('E10').value(71);
  sheet.cell('G1').value('y');
  const parts = await unzipAll(await wb.outputAsync());
  const bidXml = parts.get('xl/worksheets/sheet2.xml')!.toString('utf8');
  parts.set('xl/worksheets/sheet2.xml', Buffer.from(bidXml.replace(/<c r="G1"[^>]*>.*?<\/c>/, '<c r="G1" t="str"><f>HYPERLINK("http://x","y")</f><v>y</v></c>')));
  const workbookXml = parts.get('xl/workbook.xml')!.toString('utf8');
  parts.set('xl/workbook.xml', Buffer.from(workbookXml.replace('</sheets>', '</sheets><definedNames><definedName name="outside">\'http://x/[book.xlsx]Sheet1\'!$A$1</definedName></definedNames>')));
  parts.set('xl/externalLinks/externalLink1.xml', Buffer.from('<externalLink xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><externalBook/></externalLink>'));
  parts.set('xl/vbaProject.bin', Buffer.from('not really a macro project'));
  return buildZip([...parts].map(([name, data]) => ({ name, data })));
}

describe('exports', () => {
  test('the bid workbook a vendor downloads carries the formula-like vendor and region names as text', async () => {
    const dl = await binary(vendorA.get(`/api/tenders/${tenderId}/bid-workbook`));
    expect(dl.status).toBe(200);
    const values = await readNeutralised(dl.body as Buffer);
    expect(values.get('Bid!B8')).toBe('+1+1');
    // Names are trimmed on entry, so the leading space is gone; the unit test of the rule covers it.
    expect(values.get('Bid!B9')).toBe(LINK);
    expect(String(values.get('Bid!A2'))).toMatch(/^=HYPERLINK\("http:\/\/x","y"\) · closes/);
    expect(values.get('(formula-like cells)')).toBeGreaterThanOrEqual(3);
  });

  test('a bid saved with an uploaded workbook whose figures differ is refused naming the field and the cell; nothing is saved', async () => {
    const up = await vendorA.agent.post(`/api/tenders/${tenderId}/bid-workbook`).set('X-XSRF-TOKEN', vendorA.token).attach('file', await hostileUpload(), 'bid.xlsx');
    expect(up.status).toBe(200);
    expect(up.body.bid).toEqual({ fixedFee: 18000, capacity: null, prices: { R01: 70.25, R03: 71 } });
    const res = await vendorA.send('put', `/api/tenders/${tenderId}/bid`, {
      fixedFee: 18500, capacity: null, prices: { R01: 70.25, R02: 60 }, submit: true, version: null, documentId: up.body.documentId,
    });
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([
      { field: 'fixedFee', message: 'The uploaded workbook has 18000 in Bid!C4, but the bid\'s fixed fee is 18500. Save the bid without the workbook, or upload a workbook with the same figures.' },
      { field: 'prices.R03', message: 'The uploaded workbook has 71 in Bid!E10, but the bid\'s unit price for region R03 is not given. Save the bid without the workbook, or upload a workbook with the same figures.' },
      { field: 'prices.R02', message: 'The uploaded workbook has no figure in the row of region R02, but the bid\'s unit price for region R02 is 60. Save the bid without the workbook, or upload a workbook with the same figures.' },
    ]);
    expect((await vendorA.get(`/api/tenders/${tenderId}/bid`)).body).toEqual({ bid: null });
    const ok = await vendorA.send('put', `/api/tenders/${tenderId}/bid`, { ...up.body.bid, submit: true, version: null, documentId: up.body.documentId });
    expect(ok.status).toBe(200);
    expect(ok.body.document).toMatchObject({ id: up.body.documentId });
    // A revision typed into the form with other figures detaches the workbook; the same figures keep it.
    const typed = await vendorA.send('put', `/api/tenders/${tenderId}/bid`, { ...up.body.bid, fixedFee: 17000, submit: true, version: ok.body.version });
    expect(typed.status).toBe(200);
    expect(typed.body.document).toBeNull();
    const again = await vendorA.send('put', `/api/tenders/${tenderId}/bid`, { ...up.body.bid, submit: true, version: typed.body.version, documentId: up.body.documentId });
    expect(again.body.document).toMatchObject({ id: up.body.documentId });
    const same = await vendorA.send('put', `/api/tenders/${tenderId}/bid`, { ...up.body.bid, submit: true, version: again.body.version });
    expect(same.status).toBe(200);
    expect(same.body.document).toMatchObject({ id: up.body.documentId });
    const form = await vendorB.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 100, capacity: 5000, prices: { R01: 60, R02: 65, R03: 66 }, submit: true, version: null });
    expect(form.status).toBe(200);
    await passClosingTime(t, tenderId);
    expect((await buyer.get(`/api/tenders/${tenderId}`)).body.status).toBe('closed');
  });

  test('the buyer downloads a values-only copy of the uploaded workbook: no formula, link, defined name or macro part', async () => {
    const bids = await buyer.get(`/api/tenders/${tenderId}/bids`);
    const withDoc = bids.body.bids.find((b: { documentId: string | null }) => b.documentId);
    const doc = await binary(buyer.get(`/api/tenders/${tenderId}/documents/${withDoc.documentId}`));
    expect(doc.status).toBe(200);
    const parts = await unzipAll(doc.body as Buffer);
    expect([...parts.keys()].filter((name) => /externalLink|vbaProject|hyperlink/i.test(name))).toEqual([]);
    for (const [, data] of parts) {
      expect(data.toString('utf8')).not.toMatch(/<definedName|<hyperlink|TargetMode="External"|<f[ >]/);
    }
    const values = await readNeutralised(doc.body as Buffer);
    expect(values.get('Bid!G1')).toBe('y');
    expect(values.get('Bid!C4')).toBe(18000);
    expect(values.get('Bid!B8')).toBe('+1+1');
    // The original is kept byte for byte as the record.
    const stored = await t.em().getConnection().execute('select digest, length(content) as size from bid_document where id = ?', [withDoc.documentId]);
    expect(Number(stored[0].size)).toBeGreaterThan(0);
  });

  test('the bid tabulation shows the names as text', async () => {
    const res = await binary(buyer.get(`/api/tenders/${tenderId}/tabulation.xlsx`));
    expect(res.status).toBe(200);
    const values = await readNeutralised(res.body as Buffer);
    expect(values.get('Tabulation!A1')).toBe(`Bid tabulation — ${reference}: @SUM(1)`);
    expect(values.get('Tabulation!D5')).toBe('-2+3 Haulage');
    expect(values.get('Tabulation!E5')).toBe(LINK);
    expect(values.get('Tabulation!B7')).toBe('+1+1');
    expect(values.get('(formula-like cells)')).toBe(4);
  });

  test('the run export and the award schedule show the names as text', async () => {
    const scenario = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: '+cmd|calc', rules: {} });
    expect(scenario.status).toBe(201);
    const queued = await buyer.post(`/api/scenarios/${scenario.body.id}/runs`);
    const run = await waitForRun(buyer, queued.body.id);
    expect(run.status).toBe('optimal');
    const exported = await binary(buyer.get(`/api/runs/${run.id}/export.xlsx`));
    expect(exported.status).toBe(200);
    const values = await readNeutralised(exported.body as Buffer);
    const vendorNames = [...values].filter(([key]) => /^(Award|Allocation)!A\d+$/.test(key)).map(([, v]) => v);
    expect(vendorNames).toEqual(expect.arrayContaining([LINK, '-2+3 Haulage']));
    expect(values.get('(formula-like cells)')).toBeGreaterThanOrEqual(2);

    expect((await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least cost.' })).status).toBe(201);
    expect((await compliance.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: '' })).status).toBe(200);
    const schedule = await binary(buyer.get(`/api/tenders/${tenderId}/award-schedule.xlsx`));
    expect(schedule.status).toBe(200);
    const scheduleValues = await readNeutralised(schedule.body as Buffer);
    expect(scheduleValues.get('(formula-like cells)')).toBeGreaterThanOrEqual(2);
  });

  test('the audit CSV writes formula-like text with a leading apostrophe, full-width and spaced variants too', async () => {
    const tender = await t.em().findOneOrFail(Tender, { id: tenderId });
    const csv = await compliance.get(`/api/tenders/${tender.id}/audit.csv`);
    expect(csv.status).toBe(200);
    const cells = csv.text.replace(/^\uFEFF/, '').split(/\r\n/).filter(Boolean).flatMap((line) => line.match(/"(?:[^"]|"")*"|[^,]+/g) ?? []);
    const texts = cells.map((c) => (c.startsWith('"') ? c.slice(1, -1).replace(/""/g, '"') : c));
    expect(texts).toContain(`'${WIDE}`);
    expect(texts.filter((x) => looksLikeFormula(x))).toEqual([]);
  });
});
