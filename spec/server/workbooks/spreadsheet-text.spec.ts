import XlsxPopulate from 'xlsx-populate';
import { csvCell, looksLikeFormula, outputSafeWorkbook } from '../../../server/workbooks/spreadsheet-text';
import { cellFormat, readZipText } from './zip-fixtures';

describe('the one rule for text a spreadsheet could take for a formula', () => {
  test.each([
    '=HYPERLINK("http://x","y")', '@SUM(1)', '+1+1', '-2+3', '\tx', '\rx', '  =1+1', '\u00a0@SUM(1)', '＝1+1', '＋1', '－1', '＠SUM(1)', '﹦1',
  ])('%j is formula-like', (text) => {
    expect(looksLikeFormula(text)).toBe(true);
  });

  test.each(['Harrowgate depot', 'R-01', 'a=b', '1+1', '', ' plain'])('%j is plain text', (text) => {
    expect(looksLikeFormula(text)).toBe(false);
  });

  test('a CSV cell gets a leading apostrophe for formula-like text; numbers stay numbers, negative ones too', () => {
    expect(csvCell('=HYPERLINK("http://x","y")')).toBe('"\'=HYPERLINK(""http://x"",""y"")"');
    expect(csvCell(' ＝1')).toBe('"\' ＝1"');
    expect(csvCell('plain')).toBe('"plain"');
    expect(csvCell(-12.5)).toBe('-12.5');
    expect(csvCell(7)).toBe('7');
    expect(csvCell(null)).toBe('""');
  });

  test('an exported workbook marks formula-like text as text and refuses to write a formula', async () => {
    const workbook = await XlsxPopulate.fromBlankAsync();
    const sheet = workbook.sheet(0)!;
    sheet.cell('A1').value('  =1+1');
    sheet.cell('A2').value('plain');
    sheet.cell('A3').value(-5);
    const file = await outputSafeWorkbook(workbook);
    const xml = readZipText(file, 'xl/worksheets/sheet1.xml');
    const styles = readZipText(file, 'xl/styles.xml');
    expect(cellFormat(xml, styles, 'A1')).toContain('quotePrefix="1"');
    expect(cellFormat(xml, styles, 'A2')).not.toContain('quotePrefix');
    expect(xml).toMatch(/<c r="A3"[^>]*><v>-5<\/v>/);

    sheet.cell('B1').formula('SUM(1)');
    await expect(outputSafeWorkbook(workbook)).rejects.toThrow('exported workbook holds a formula in');
  });
});
