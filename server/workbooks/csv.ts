/**
 * A small CSV reader for uploads people export from spreadsheets: comma or semicolon separated
 * (chosen from the header line), fields optionally in double quotes with "" for a quote, line breaks
 * inside quotes allowed, CRLF or LF, an optional UTF-8 byte-order mark.
 */

export interface CsvRecord {
  /** Line of the file where the record starts (1-based), for messages. */
  line: number;
  fields: string[];
}

export type CsvResult = { ok: true; delimiter: ',' | ';'; records: CsvRecord[] } | { ok: false; message: string };

/** Decodes bytes as UTF-8 (BOM removed); null when they are not valid UTF-8 text. */
export function decodeUtf8Text(buffer: Buffer): string | null {
  try {
    const text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(buffer);
    // A NUL byte never appears in text a person would call a CSV; it means a binary file.
    return text.includes('\u0000') ? null : text;
  } catch {
    return null;
  }
}

/** Picks the separator the header line uses most, outside quotes; comma when neither appears. */
function detectDelimiter(text: string): ',' | ';' {
  let commas = 0;
  let semicolons = 0;
  let quoted = false;
  for (const ch of text) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === '\n' || ch === '\r')) break;
    else if (!quoted && ch === ',') commas++;
    else if (!quoted && ch === ';') semicolons++;
  }
  return semicolons > commas ? ';' : ',';
}

export function parseCsv(text: string, maxRecords: number): CsvResult {
  const delimiter = detectDelimiter(text);
  const records: CsvRecord[] = [];
  let fields: string[] = [];
  let field = '';
  let quoted = false;
  let afterQuote = false;
  let line = 1;
  let recordLine = 1;

  const endField = () => {
    fields.push(field);
    field = '';
    afterQuote = false;
  };
  const endRecord = () => {
    endField();
    // Blank lines are skipped rather than reported: spreadsheets often leave one at the end.
    if (fields.some((f) => f.trim() !== '')) records.push({ line: recordLine, fields });
    fields = [];
  };

  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"') {
        if (text[i + 1] === '"') {
          field += '"';
          i++;
        } else {
          quoted = false;
          afterQuote = true;
        }
      } else {
        if (ch === '\n') line++;
        field += ch;
      }
      continue;
    }
    if (ch === '"') {
      if (field.trim() !== '' || afterQuote) return { ok: false, message: `Line ${line}: a quote (") appears inside an unquoted field.` };
      field = '';
      quoted = true;
    } else if (ch === delimiter) {
      endField();
    } else if (ch === '\r' || ch === '\n') {
      if (ch === '\r' && text[i + 1] === '\n') i++;
      endRecord();
      line++;
      recordLine = line;
      if (records.length > maxRecords) return { ok: false, message: `The file has more than ${maxRecords} rows.` };
    } else if (afterQuote) {
      if (ch.trim() !== '') return { ok: false, message: `Line ${line}: unexpected text after a closing quote.` };
    } else {
      field += ch;
    }
  }
  if (quoted) return { ok: false, message: `Line ${recordLine}: a quoted field is never closed.` };
  if (field !== '' || fields.length > 0) endRecord();
  if (records.length > maxRecords) return { ok: false, message: `The file has more than ${maxRecords} rows.` };
  return { ok: true, delimiter, records };
}
