import XlsxPopulate from 'xlsx-populate';
import { buildBidWorkbook } from '../../../server/workbooks/bid-workbook';
import { BID_LAYOUT, type BidWorkbookView } from '../../../server/workbooks/bid-layout';
import { parseBidWorkbook } from '../../../server/workbooks/bid-workbook-parse';
import type { BidWorkbookResult } from '../../../server/workbooks/bid-layout';
import { cellFormat, editWorkbook, readZipText } from './zip-fixtures';

// A fictional tender, invented for these tests.
const regions = [
  { code: 'NW-01', name: 'Harrowgate depot', forecast: 4200 },
  { code: 'NW-02', name: 'Feltby yard', forecast: 1500.5 },
  { code: 'NW-03', name: 'Quarrel Cross', forecast: 9000 },
];
const view: BidWorkbookView = {
  reference: 'TQ-2026-014',
  title: 'De-icing salt, winter 2026/27',
  currency: 'EUR',
  unit: 't',
  closesAt: '2026-03-02T12:00:00+01:00',
  vendorName: 'Brindle & Sons Haulage',
  regions,
};

function sheetOf(workbook: XlsxPopulate.Workbook, name: string): XlsxPopulate.Sheet {
  const sheet = workbook.sheet(name);
  if (!sheet) throw new Error(`no sheet ${name}`);
  return sheet;
}

/** Fills the downloaded workbook the way a vendor would, then returns the saved bytes. */
async function filled(edit: (bid: XlsxPopulate.Sheet) => void): Promise<Buffer> {
  return editWorkbook(await buildBidWorkbook(view), (wb) => edit(sheetOf(wb, 'Bid')));
}

function fillGood(bid: XlsxPopulate.Sheet): void {
  bid.cell('C4').value(25000);
  bid.cell('C5').value(12000);
  bid.cell('E8').value(61.5);
  bid.cell('E10').value(58.1234);
}

function errorsOf(result: BidWorkbookResult) {
  expect(result.ok).toBe(false);
  expect(result).not.toHaveProperty('bid');
  return result.ok ? [] : result.errors;
}

describe('bid workbook: download, fill in, upload', () => {
  it('gives back exactly the bid the vendor typed in (round trip)', async () => {
    const result = await parseBidWorkbook(await filled(fillGood), regions, { reference: view.reference });
    expect(result).toEqual({
      ok: true, bid: { fixedFee: 25000, capacity: 12000, prices: { 'NW-01': 61.5, 'NW-03': 58.1234 } }, priceCells: { 'NW-01': 'Bid!E8', 'NW-03': 'Bid!E10' },
    });
  });

  it('reads a blank capacity cap as no cap and a blank price as a region not offered', async () => {
    const result = await parseBidWorkbook(await filled((bid) => {
      bid.cell('C4').value(0);
      bid.cell('E9').value(70);
    }), regions);
    expect(result).toEqual({ ok: true, bid: { fixedFee: 0, capacity: null, prices: { 'NW-02': 70 } }, priceCells: { 'NW-02': 'Bid!E9' } });
  });

  it('fills in a saved draft, which reads back unchanged', async () => {
    const draft = { fixedFee: 1234.56, capacity: 8000.5, prices: { 'NW-02': 63, 'NW-03': 0.0001 } };
    const result = await parseBidWorkbook(await buildBidWorkbook({ ...view, bid: draft }), regions);
    expect(result).toEqual({ ok: true, bid: draft, priceCells: { 'NW-02': 'Bid!E9', 'NW-03': 'Bid!E10' } });
  });

  it('has an instructions sheet with the closing time in the one date-time format (no zone given: UTC), the blank rule, the file rules and the caution', async () => {
    const workbook = await XlsxPopulate.fromDataAsync(await buildBidWorkbook(view));
    expect(workbook.sheets().map((s) => s.name())).toEqual(['Instructions', 'Bid']);
    const text = (sheetOf(workbook, 'Instructions').usedRange()?.value() ?? []).flat().map(String).join('\n');
    expect(text).toContain('Mon, 2 Mar 2026, 11:00 UTC');
    expect(text).toMatch(/Leave a price blank if you do not offer that region/);
    expect(text).toMatch(/Keep the file as \.xlsx/);
    expect(text).toMatch(/Formulas are not accepted/);
    expect(text).toMatch(/procurement rules/);
  });

  it('lays the Bid sheet out at the documented cells, one row per region', async () => {
    const bid = sheetOf(await XlsxPopulate.fromDataAsync(await buildBidWorkbook(view)), 'Bid');
    expect(BID_LAYOUT).toMatchObject({ fixedFee: 'C4', capacity: 'C5', firstRegionRow: 8 });
    expect(bid.cell('A4').value()).toBe('Fixed fee');
    expect(bid.cell('D5').value()).toMatch(/blank = no cap/);
    expect(bid.range('A8:D10').value()).toEqual([
      ['NW-01', 'Harrowgate depot', 4200, 't'],
      ['NW-02', 'Feltby yard', 1500.5, 't'],
      ['NW-03', 'Quarrel Cross', 9000, 't'],
    ]);
  });

  it('protects the Bid sheet so only the fixed fee, the cap and the prices are editable', async () => {
    const file = await buildBidWorkbook(view);
    const sheetXml = readZipText(file, 'xl/worksheets/sheet2.xml');
    const styles = readZipText(file, 'xl/styles.xml');
    expect(sheetXml).toMatch(/<sheetProtection [^>]*sheet="1"/);
    for (const input of ['C4', 'C5', 'E8', 'E9', 'E10']) {
      expect(cellFormat(sheetXml, styles, input)).toContain('<protection locked="0"/>');
    }
    for (const locked of ['A8', 'B9', 'C10', 'D8', 'A4']) {
      expect(cellFormat(sheetXml, styles, locked)).not.toContain('locked="0"');
    }
  });

  it('validates the price column as a number above 0', async () => {
    const sheetXml = readZipText(await buildBidWorkbook(view), 'xl/worksheets/sheet2.xml');
    expect(sheetXml).toMatch(/<dataValidation type="decimal"[^>]*operator="greaterThan"[^>]*sqref="E8:E10"><formula1>0<\/formula1><\/dataValidation>/);
    expect(sheetXml).not.toContain('"undefined"');
  });
});

describe('bid workbook: refused uploads name the sheet and cell, and return no bid', () => {
  it('refuses text in a price cell', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('E9').value('about 60');
    }), regions));
    expect(errors).toEqual([{ cell: 'Bid!E9', message: 'Bid!E9: unit price must be a number, but the cell holds the text "about 60".' }]);
  });

  it('refuses text in the fixed fee cell', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('C4').value('25k');
    }), regions));
    expect(errors).toEqual([{ cell: 'Bid!C4', message: 'Bid!C4: fixed fee must be a number, but the cell holds the text "25k".' }]);
  });

  it.each([[0], [-4.5]])('refuses a unit price of %p', async (price) => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('E8').value(price);
    }), regions));
    expect(errors).toEqual([{ cell: 'Bid!E8', message: 'Bid!E8: unit price must be a positive number.' }]);
  });

  it('refuses a price with more than 4 decimals and a fee with more than 2', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('C4').value(100.125);
      bid.cell('E8').value(61.12345);
    }), regions));
    expect(errors.map((e) => e.message)).toEqual([
      'Bid!C4: fixed fee may have at most 2 decimals.',
      'Bid!E8: unit price may have at most 4 decimals.',
    ]);
  });

  it('refuses formulas in input cells instead of evaluating them', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('C5').formula('SUM(C8:C10)');
      bid.cell('E9').formula('E8*1.02');
    }), regions));
    expect(errors).toEqual([
      { cell: 'Bid!C5', message: 'Bid!C5: formulas are not accepted; type the capacity cap as a number.' },
      { cell: 'Bid!E9', message: 'Bid!E9: formulas are not accepted; type the unit price as a number.' },
    ]);
  });

  it('refuses an unknown region code, and reports the region whose row it replaced as missing', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('A9').value('ZZ-99');
    }), regions));
    expect(errors.map((e) => e.cell)).toEqual(['Bid!A9', 'Bid!A8:A10']);
    expect(errors[0].message).toBe('Bid!A9: unknown region code "ZZ-99": this tender has no such region. Keep the region rows as downloaded.');
    expect(errors[1].message).toMatch(/^Bid!A8:A10: the row of region NW-02 \(Feltby yard\) is missing/);
  });

  it('refuses a region row given twice', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('A11').value('NW-01');
      bid.cell('E11').value(59);
    }), regions));
    expect(errors).toEqual([{ cell: 'Bid!A11', message: 'Bid!A11: region NW-01 appears twice (also in row 8); keep one row per region.' }]);
  });

  it('refuses a price on a row without a region code', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('E14').value(50);
    }), regions));
    expect(errors).toEqual([{ cell: 'Bid!E14', message: 'Bid!E14: a unit price is entered on a row without a region code.' }]);
  });

  it('refuses a workbook whose Bid sheet was renamed', async () => {
    const file = await editWorkbook(await filled(fillGood), (wb) => sheetOf(wb, 'Bid').name('My bid'));
    const errors = errorsOf(await parseBidWorkbook(file, regions));
    expect(errors).toEqual([{
      cell: 'Bid',
      message: 'Bid: the workbook has no sheet named "Bid" (it has "Instructions", "My bid"). Keep the sheet names of the downloaded workbook.',
    }]);
  });

  it('refuses a workbook whose rows were shifted, since no cell can be trusted then', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled((bid) => {
      fillGood(bid);
      bid.cell('A4').value('Capacity cap');
    }), regions));
    expect(errors).toEqual([expect.objectContaining({ cell: 'Bid!A4', message: expect.stringMatching(/^Bid!A4: expected the label "Fixed fee" here/) })]);
  });

  it('refuses a blank fixed fee and a workbook without any price', async () => {
    const errors = errorsOf(await parseBidWorkbook(await buildBidWorkbook(view), regions));
    expect(errors).toEqual([{ cell: 'Bid!C4', message: 'Bid!C4: the fixed fee is required; enter 0 if there is none.' }]);
    const noPrices = errorsOf(await parseBidWorkbook(await filled((bid) => bid.cell('C4').value(10)), regions));
    expect(noPrices).toEqual([{ cell: 'Bid!E8:E10', message: 'Bid!E8:E10: no unit price is entered; offer at least one region.' }]);
  });

  it('refuses the workbook of another tender when the reference is checked', async () => {
    const errors = errorsOf(await parseBidWorkbook(await filled(fillGood), regions, { reference: 'TQ-2026-015' }));
    expect(errors).toEqual([{ cell: 'Bid!B3', message: 'Bid!B3: this workbook belongs to tender "TQ-2026-014", not TQ-2026-015. Download the workbook of this tender.' }]);
  });

  it('refuses a CSV file renamed to .xlsx, judging by content', async () => {
    const csv = Buffer.from('Region code,Unit price\nNW-01,61.5\n', 'utf8');
    const errors = errorsOf(await parseBidWorkbook(csv, regions));
    expect(errors).toEqual([{ cell: '', message: expect.stringMatching(/^The file is not an \.xlsx workbook/) }]);
  });

  it('refuses a PDF renamed to .xlsx', async () => {
    const pdf = Buffer.from('%PDF-1.7\n1 0 obj\n<<>>\nendobj\n', 'latin1');
    expect(errorsOf(await parseBidWorkbook(pdf, regions))).toEqual([{ cell: '', message: 'The file is a PDF, not an .xlsx workbook.' }]);
  });

  it('refuses a file over 5 MB before opening it', async () => {
    const good = await filled(fillGood);
    const big = Buffer.concat([good, Buffer.alloc(5 * 1024 * 1024 + 1 - good.length)]);
    expect(errorsOf(await parseBidWorkbook(big, regions))).toEqual([{ cell: '', message: 'The file is 5,242,881 bytes; at most 5 MB is accepted.' }]);
  });
});
