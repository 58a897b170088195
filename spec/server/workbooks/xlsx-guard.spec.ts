import { buildBidWorkbook } from '../../../server/workbooks/bid-workbook';
import { parseBidWorkbook } from '../../../server/workbooks/bid-workbook-parse';
import { UnsafeWorkbookError, assertSafeXlsx, inspectXlsx } from '../../../server/workbooks/xlsx-guard';
import { buildZip, xlsxLikeParts } from './zip-fixtures';

const regions = [{ code: 'R1', name: 'Lowmoor', forecast: 100 }];

async function realWorkbook(): Promise<Buffer> {
  return buildBidWorkbook({
    reference: 'TQ-9', title: 'Grit', currency: 'EUR', unit: 't', closesAt: '2026-01-01T00:00:00Z', vendorName: 'Vendor', regions,
  });
}

const MB = 1024 * 1024;

describe('xlsx guard: hostile packages are refused before any spreadsheet library opens them', () => {
  it('accepts a workbook Tendara wrote and lists its parts', async () => {
    const entries = await assertSafeXlsx(await realWorkbook());
    expect(entries.map((e) => e.name)).toEqual(expect.arrayContaining(['[Content_Types].xml', 'xl/workbook.xml']));
  });

  it('refuses a package whose parts expand to more than 20 MB in total, even at a modest ratio', async () => {
    // About 40 to 1: under the ratio limit, so only the total can catch it.
    const part = Buffer.alloc(26 * MB);
    for (let i = 0; i < part.length; i += 1024) part.writeUInt32LE((i * 2654435761) >>> 0, i);
    const bomb = buildZip([...xlsxLikeParts(), { name: 'xl/a.bin', data: part }, { name: 'xl/b.bin', data: part }]);
    expect(bomb.length).toBeLessThan(5 * MB);
    expect(await inspectXlsx(bomb)).toEqual({
      ok: false, reason: 'zip-bomb', message: 'The workbook would expand to more than 20 MB; it is refused as unsafe.',
    });
  });

  it('refuses a part compressed more than 200 to 1', async () => {
    const bomb = buildZip([...xlsxLikeParts(), { name: 'xl/worksheets/sheet1.xml', data: Buffer.alloc(4 * MB) }]);
    expect(await inspectXlsx(bomb)).toEqual({
      ok: false, reason: 'zip-bomb', message: 'The workbook part "xl/worksheets/sheet1.xml" is compressed more than 200 to 1; it is refused as unsafe.',
    });
  });

  it('refuses a part that expands beyond the size its header declares', async () => {
    const liar = buildZip([...xlsxLikeParts(), { name: 'xl/styles.xml', data: Buffer.alloc(3 * MB), declaredSize: 900 }]);
    expect(await inspectXlsx(liar)).toEqual({
      ok: false, reason: 'zip-bomb', message: 'The workbook part "xl/styles.xml" expands beyond its declared size; it is refused as unsafe.',
    });
  });

  it('refuses a package with more than 500 parts', async () => {
    const parts = Array.from({ length: 2001 }, (_, i) => ({ name: `xl/p${i}.xml`, data: Buffer.from('<x/>'), store: true }));
    const crowded = buildZip([...xlsxLikeParts(), ...parts]);
    await expect(assertSafeXlsx(crowded)).rejects.toEqual(new UnsafeWorkbookError('too-many-entries', 'The workbook has 2003 internal parts; at most 500 are accepted.'));
  });

  it('refuses a zip that is not a workbook, such as a word-processing document', async () => {
    const document = buildZip([{ name: '[Content_Types].xml', data: Buffer.from('<Types/>') }, { name: 'word/document.xml', data: Buffer.from('<w/>') }]);
    const check = await inspectXlsx(document);
    expect(check).toMatchObject({ ok: false, reason: 'not-xlsx' });
  });

  it('refuses an encrypted or legacy workbook with advice to save it as .xlsx', async () => {
    const compound = Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(512)]);
    expect(await inspectXlsx(compound)).toEqual({
      ok: false, reason: 'not-xlsx',
      message: 'The file is a password-protected workbook or an old .xls file. Save it as .xlsx without a password and upload it again.',
    });
  });

  it('refuses a truncated workbook as damaged', async () => {
    const good = await realWorkbook();
    expect(await inspectXlsx(good.subarray(0, Math.floor(good.length / 2)))).toMatchObject({ ok: false, reason: 'corrupt' });
  });

  it('reports a zip bomb (a long run of zeros) to the vendor through parseBidWorkbook without returning a bid', async () => {
    const bomb = buildZip([...xlsxLikeParts(), { name: 'xl/worksheets/sheet2.xml', data: Buffer.alloc(60 * MB) }]);
    expect(bomb.length).toBeLessThan(MB);
    const result = await parseBidWorkbook(bomb, regions);
    expect(result).toEqual({
      ok: false,
      errors: [{ cell: '', message: 'The workbook would expand to more than 20 MB; it is refused as unsafe.' }],
    });
  });

  it('reports too many parts through parseBidWorkbook', async () => {
    const parts = Array.from({ length: 2100 }, (_, i) => ({ name: `xl/q${i}.xml`, data: Buffer.from('<x/>'), store: true }));
    const result = await parseBidWorkbook(buildZip([...xlsxLikeParts(), ...parts]), regions);
    expect(result).toEqual({ ok: false, errors: [{ cell: '', message: 'The workbook has 2102 internal parts; at most 500 are accepted.' }] });
  });
});
