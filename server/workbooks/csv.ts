import { CsvError, parse } from 'csv-parse/sync';

/**
 * Reads CSV uploads people export from spreadsheets with csv-parse: comma or semicolon separated
 * (chosen from the header line), fields optionally in double quotes with "" for a quote, line breaks
 * inside quotes allowed, CRLF or LF, an optional UTF-8 byte-order mark (removed when decoding).
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

/** What csv-parse reports, in the words of the people who upload the file. */
function csvMessage(err: CsvError): string {
  const line = (err as CsvError & { lines?: number }).lines;
  switch (err.code) {
    case 'CSV_QUOTE_NOT_CLOSED': return `Line ${line}: a quoted field is never closed.`;
    case 'INVALID_OPENING_QUOTE': return `Line ${line}: a quote (") appears inside an unquoted field.`;
    case 'CSV_INVALID_CLOSING_QUOTE': return `Line ${line}: unexpected text after a closing quote.`;
    default: return `Line ${line}: this line cannot be read as CSV (${err.message}).`;
  }
}

/** A record as csv-parse gives it with `info` and `raw`. */
interface ParsedRecord { record: string[]; info: { lines: number }; raw: string }

export function parseCsv(text: string, maxRecords: number): CsvResult {
  const delimiter = detectDelimiter(text);
  let parsed: ParsedRecord[];
  try {
    // One kind of line break: csv-parse counts a CRLF inside quotes as two lines.
    parsed = parse(text.replace(/\r\n?/g, '\n'), {
      delimiter,
      relax_column_count: true,
      // Blank lines (often one at the end) are skipped rather than reported.
      skip_records_with_empty_values: true,
      trim: true,
      info: true,
      raw: true,
      // One more than allowed, to tell "too many" from "just enough".
      to: maxRecords + 1,
      // csv-parse's types do not model the `info` and `raw` options' record shape.
    }) as unknown as ParsedRecord[];
  } catch (err) {
    if (err instanceof CsvError) return { ok: false, message: csvMessage(err) };
    throw err;
  }
  if (parsed.length > maxRecords) return { ok: false, message: `The file has more than ${maxRecords} rows.` };
  // info.lines is where a record ends; it starts as many lines earlier as it holds line breaks
  // (raw text includes the line break that ends it).
  const records = parsed.map(({ record, info, raw }) => ({ line: info.lines - (raw.replace(/\n$/, '').match(/\n/g)?.length ?? 0), fields: record }));
  return { ok: true, delimiter, records };
}
