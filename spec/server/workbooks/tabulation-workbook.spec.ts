import XlsxPopulate from 'xlsx-populate';
import { TABULATION_LAYOUT, buildTabulationWorkbook, type TabulationView } from '../../../server/workbooks/tabulation-workbook';
import { cellFormat, readZipText } from './zip-fixtures';

// Fictional vendors; one name is crafted to look like a formula.
const view: TabulationView = {
  reference: 'TQ-2026-014',
  title: 'De-icing salt',
  currency: 'EUR',
  unit: 't',
  regions: [
    { code: 'NW-01', name: 'Harrowgate depot', forecast: 4200 },
    { code: 'NW-02', name: '=HYPERLINK("http://example.invalid","Feltby")', forecast: 1500 },
    { code: 'NW-03', name: 'Quarrel Cross', forecast: 900 },
  ],
  bids: [
    { vendor: { id: 'v1', name: 'Brindle Haulage', sme: true }, fixedFee: 25000, capacity: 6000, prices: { 'NW-01': 61.5, 'NW-02': 70 } },
    { vendor: { id: 'v2', name: '=cmd|"/c calc"!A1', sme: false }, fixedFee: 0, capacity: null, prices: { 'NW-01': 63, 'NW-02': 70 } },
    { vendor: { id: 'v3', name: '@Sutton Minerals', sme: false }, fixedFee: 1200.5, capacity: 900, prices: { 'NW-01': 60.25 } },
  ],
};

async function open(): Promise<{ file: Buffer; sheet: XlsxPopulate.Sheet }> {
  const file = await buildTabulationWorkbook(view);
  const sheet = (await XlsxPopulate.fromDataAsync(file)).sheet(TABULATION_LAYOUT.sheet);
  if (!sheet) throw new Error('no tabulation sheet');
  return { file, sheet };
}

describe('bid tabulation workbook', () => {
  it('shows regions down and vendors across, with fixed fees, caps and region counts below', async () => {
    const { sheet } = await open();
    expect(sheet.range('A5:H5').value()[0]).toEqual([
      'Region code', 'Region', 'Forecast (t)', 'Brindle Haulage', '=cmd|"/c calc"!A1', '@Sutton Minerals', 'Lowest unit price (EUR)', 'Bids received',
    ]);
    expect(sheet.range('D6:F6').value()[0]).toEqual(['SME', 'not SME', 'not SME']);
    expect(sheet.range('A7:H9').value()).toEqual([
      ['NW-01', 'Harrowgate depot', 4200, 61.5, 63, 60.25, 60.25, 3],
      ['NW-02', '=HYPERLINK("http://example.invalid","Feltby")', 1500, 70, 70, undefined, 70, 2],
      ['NW-03', 'Quarrel Cross', 900, undefined, undefined, undefined, 'no bid', 0],
    ]);
    expect(sheet.range('B11:F13').value()).toEqual([
      ['Fixed fee (EUR)', undefined, 25000, 0, 1200.5],
      ['Capacity cap (t)', undefined, 6000, 'no cap', 900],
      ['Regions bid', undefined, 2, 2, 1],
    ]);
  });

  it('marks the lowest price of each region by bold, shading and a "(lowest)" suffix, ties included', async () => {
    const { sheet } = await open();
    const marked = (address: string) => sheet.cell(address).style('bold') === true
      && String(sheet.cell(address).style('numberFormat')).includes('(lowest)');
    expect(['F7', 'D8', 'E8'].every(marked)).toBe(true);
    expect(['D7', 'E7'].some(marked)).toBe(false);
    expect(sheet.cell('F7').style('fill')).toMatchObject({ type: 'solid' });
    expect(sheet.cell('D7').style('fill')).toBeUndefined();
  });

  it('explains the marking in a legend, so colour is not the only cue', async () => {
    const { sheet } = await open();
    expect(sheet.cell(TABULATION_LAYOUT.legend).value()).toMatch(/bold figure on a shaded background, followed by "\(lowest\)", is the lowest unit price/);
  });

  it('writes formula-like names as text, never as formulas', async () => {
    const { file, sheet } = await open();
    const xml = readZipText(file, 'xl/worksheets/sheet1.xml');
    const styles = readZipText(file, 'xl/styles.xml');
    expect(xml).not.toContain('<f>');
    for (const address of ['E5', 'F5', 'B8']) {
      expect(sheet.cell(address).formula()).toBeUndefined();
      expect(xml).toMatch(new RegExp(`<c r="${address}" t="s"`));
      expect(cellFormat(xml, styles, address)).toContain('quotePrefix="1"');
    }
    expect(cellFormat(xml, styles, 'D5')).not.toContain('quotePrefix');
  });

  it('handles region codes that name built-in object properties: a region nobody bid stays blank', async () => {
    const prices = JSON.parse('{ "__proto__": 5 }') as Record<string, number>;
    const file = await buildTabulationWorkbook({
      ...view,
      regions: [
        { code: '__proto__', name: 'A', forecast: 10 },
        { code: 'constructor', name: 'B', forecast: 20 },
        { code: 'toString', name: 'C', forecast: 30 },
      ],
      bids: [{ vendor: { id: 'v1', name: 'Brindle Haulage', sme: false }, fixedFee: 1, capacity: null, prices }],
    });
    const sheet = (await XlsxPopulate.fromDataAsync(file)).sheet(TABULATION_LAYOUT.sheet)!;
    expect(sheet.range('A7:F9').value()).toEqual([
      ['__proto__', 'A', 10, 5, 5, 1],
      ['constructor', 'B', 20, undefined, 'no bid', 0],
      ['toString', 'C', 30, undefined, 'no bid', 0],
    ]);
    expect(sheet.cell('D13').value()).toBe(1);
  });
});
