import { parseCsv } from '../../../server/workbooks/csv';

// Expected values worked by hand from each file's text (RFC 4180 quoting, "" for a quote).
describe('CSV uploads (server/workbooks/csv.ts, on csv-parse)', () => {
  it('numbers each record by the line it starts on, across quoted line breaks and blank lines, CRLF or LF, keeping spaces inside quotes', () => {
    const text = 'code,name\r\nD-01,"Ash\r\ncombe"\r\n\r\nD-02," Birch ""Hill"" "\r\n';
    expect(parseCsv(text, 10)).toEqual({
      ok: true, delimiter: ',',
      records: [
        { line: 1, fields: ['code', 'name'] },
        { line: 2, fields: ['D-01', 'Ash\ncombe'] },
        { line: 5, fields: ['D-02', ' Birch "Hill" '] },
      ],
    });
  });

  it('takes the separator the header line uses most (semicolon files from a comma-decimal locale)', () => {
    expect(parseCsv('code;forecast\nD-01;"4,5"\n', 10)).toEqual({
      ok: true, delimiter: ';', records: [{ line: 1, fields: ['code', 'forecast'] }, { line: 2, fields: ['D-01', '4,5'] }],
    });
  });

  it('names the line of a quote inside an unquoted field, of text after a closing quote, and of a quote never closed', () => {
    expect(parseCsv('a,b\nx"y,2\n', 10)).toEqual({ ok: false, message: 'Line 2: a quote (") appears inside an unquoted field.' });
    expect(parseCsv('a,b\n"xy"q,2\n', 10)).toEqual({ ok: false, message: 'Line 2: unexpected text after a closing quote.' });
    expect(parseCsv('a,b\n"xy,2\n', 10)).toEqual({ ok: false, message: 'Line 2: a quoted field is never closed.' });
  });

  it('refuses a file with more records than allowed, and accepts exactly that many', () => {
    expect(parseCsv('a\n1\n2\n', 2)).toEqual({ ok: false, message: 'The file has more than 2 rows.' });
    expect(parseCsv('a\n1\n', 2)).toEqual({ ok: true, delimiter: ',', records: [{ line: 1, fields: ['a'] }, { line: 2, fields: ['1'] }] });
  });
});
