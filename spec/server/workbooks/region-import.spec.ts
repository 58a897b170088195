import XlsxPopulate from 'xlsx-populate';
import { parseRegionFile } from '../../../server/workbooks/region-import';

async function workbookWith(rows: unknown[][], edit?: (sheet: XlsxPopulate.Sheet) => void): Promise<Buffer> {
  const workbook = await XlsxPopulate.fromBlankAsync();
  const sheet = workbook.sheet(0);
  if (!sheet) throw new Error('no sheet');
  rows.forEach((row, r) => row.forEach((value, c) => {
    if (value !== null) sheet.cell(r + 1, c + 1).value(value as string | number);
  }));
  edit?.(sheet);
  return workbook.outputAsync();
}

describe('region import from .xlsx', () => {
  it('reads the first sheet with its header in any order and case, below a title line', async () => {
    const file = await workbookWith([
      ['Depots for the 2026 salt tender'],
      ['FORECAST', 'Code', 'Name'],
      [4200, 'D-01', 'Ashcombe depot'],
      [1500.25, 'D-02', '  Birchley yard '],
      [null, null, null],
      ['3000', 'D-03', 'Coldharbour'],
    ]);
    expect(await parseRegionFile(file, { filename: 'depots.xlsx' })).toEqual({
      ok: true,
      regions: [
        { code: 'D-01', name: 'Ashcombe depot', forecast: 4200 },
        { code: 'D-02', name: 'Birchley yard', forecast: 1500.25 },
        { code: 'D-03', name: 'Coldharbour', forecast: 3000 },
      ],
    });
  });

  it('names every bad row by its sheet row number', async () => {
    const file = await workbookWith([
      ['code', 'name', 'forecast'],
      ['D-01', 'Ashcombe', 0],
      ['D 02', 'Birchley', 100],
      ['D-03', null, 'lots'],
      ['d-01', 'Ashcombe again', 50],
      ['D-05', 'Dunmere', null],
    ], (sheet) => sheet.cell('C7').formula('C2*2'));
    expect(await parseRegionFile(file)).toEqual({
      ok: false,
      errors: [
        { row: 2, message: 'Row 2: forecast must be a number above 0.' },
        { row: 3, message: 'Row 3: region code may only contain letters, digits, ".", "_" and "-".' },
        { row: 4, message: 'Row 4: forecast must be a number above 0, but it is "lots".' },
        { row: 4, message: 'Row 4: region name is required.' },
        { row: 5, message: 'Row 5: region code "d-01" is used twice (first at region 1).' },
        { row: 6, message: 'Row 6: forecast must be a number above 0.' },
        { row: 7, message: 'Row 7: forecast is a formula; paste the values instead (formulas are not read).' },
        { row: 7, message: 'Row 7: region code is required.' },
        { row: 7, message: 'Row 7: region name is required.' },
      ],
    });
  });

  it('says so when no header row is found', async () => {
    const file = await workbookWith([['Depot', 'Tonnes'], ['Ashcombe', 100]]);
    expect(await parseRegionFile(file)).toEqual({
      ok: false,
      errors: [{ row: null, message: 'Sheet "Sheet1": No header row naming the columns code, name and forecast was found in the first 10 rows.' }],
    });
  });
});

describe('region import from .csv', () => {
  it('reads a comma-separated file with quoted fields', async () => {
    const csv = 'code,name,forecast\r\nD-01,"Ashcombe, north gate",4200\r\nD-02,"The ""Old"" yard",1500.5\r\n\r\n';
    expect(await parseRegionFile(Buffer.from(csv), { filename: 'regions.csv' })).toEqual({
      ok: true,
      regions: [
        { code: 'D-01', name: 'Ashcombe, north gate', forecast: 4200 },
        { code: 'D-02', name: 'The "Old" yard', forecast: 1500.5 },
      ],
    });
  });

  it('reads a semicolon-separated UTF-8 file with a byte-order mark and decimal commas', async () => {
    const csv = '\uFEFFName;Forecast;Code\nÉtang-sur-Lys;2 500,5;E-1\nMühlbach;900;E-2\n';
    expect(await parseRegionFile(Buffer.from(csv, 'utf8'))).toEqual({
      ok: true,
      regions: [
        { code: 'E-1', name: 'Étang-sur-Lys', forecast: 2500.5 },
        { code: 'E-2', name: 'Mühlbach', forecast: 900 },
      ],
    });
  });

  it('reports bad rows by line, refusing ambiguous thousands separators', async () => {
    const csv = 'code,name,forecast\nD-01,Ashcombe,"4,200"\nD-02,Birchley,-5\nD-03,Coldharbour,12\n';
    expect(await parseRegionFile(Buffer.from(csv))).toEqual({
      ok: false,
      errors: [
        { row: 2, message: 'Row 2: forecast must be a number above 0, but it is "4,200".' },
        { row: 3, message: 'Row 3: forecast must be a number above 0.' },
      ],
    });
  });

  it('refuses an unclosed quote and a file that is not text', async () => {
    expect(await parseRegionFile(Buffer.from('code,name,forecast\nD-01,"Ashcombe,4200\n'))).toEqual({
      ok: false, errors: [{ row: null, message: 'Line 2: a quoted field is never closed.' }],
    });
    const binary = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0xff]);
    expect(await parseRegionFile(binary, { filename: 'map.png' })).toEqual({
      ok: false,
      errors: [{ row: null, message: 'The file "map.png" is neither an .xlsx workbook nor a UTF-8 CSV file. Save the regions as .xlsx or as CSV (UTF-8).' }],
    });
  });

  it('refuses more than 500 regions', async () => {
    const lines = ['code,name,forecast', ...Array.from({ length: 501 }, (_, i) => `R${i},Region ${i},10`)];
    expect(await parseRegionFile(Buffer.from(lines.join('\n')))).toEqual({
      ok: false, errors: [{ row: null, message: 'The file has more than 500 regions; a tender has at most 500.' }],
    });
  });
});
