import XlsxPopulate from 'xlsx-populate';
import { MAX_REGIONS, findDuplicateRegionCodes, regionListSchema, type RegionInput } from '@shared/bids';
import { lowerFirst, quoteForMessage, readCell, type CellReading } from './cell-reading';
import { decodeUtf8Text, parseCsv } from './csv';
import { DEFAULT_XLSX_LIMITS, formatBytes, inspectXlsx, looksLikeZip } from './xlsx-guard';

/**
 * Reads the regions of a tender from a buyer's .xlsx (first sheet) or .csv file. A header row names
 * the columns code, name and forecast in any order and any case. The file's content decides how it
 * is read; the name or MIME type only makes a refusal message more helpful.
 */

export interface RegionFileHint {
  filename?: string;
  mimeType?: string;
}

export interface RegionRowError {
  /** Row of the sheet, or line of the CSV file; null for a problem with the whole file. */
  row: number | null;
  message: string;
}

export type RegionImportResult = { ok: true; regions: RegionInput[] } | { ok: false; errors: RegionRowError[] };

type Field = 'code' | 'name' | 'forecast';
const HEADER_NAMES: Record<Field, string[]> = {
  code: ['code', 'region code'],
  name: ['name', 'region', 'region name'],
  forecast: ['forecast', 'forecast quantity', 'quantity'],
};
/** How far down the header row is looked for, so a title line or two above it is fine. */
const HEADER_SEARCH_ROWS = 10;
/** Rows read beyond the region limit, so "too many" is reported rather than silently cut. */
const MAX_DATA_ROWS = MAX_REGIONS + 1;

/** A cell or field as read, before validation. */
type RawValue = { text: string } | { number: number } | { problem: string } | null;

interface RawRow {
  row: number;
  code: RawValue;
  name: RawValue;
  forecast: RawValue;
}

function headerField(text: string): Field | null {
  const normalised = text.trim().toLowerCase().replace(/\s+/g, ' ');
  for (const field of Object.keys(HEADER_NAMES) as Field[]) {
    if (HEADER_NAMES[field].includes(normalised)) return field;
  }
  return null;
}

/** Maps each field to its column index if every field appears exactly once in `cells`. */
function matchHeader(cells: string[]): Record<Field, number> | null {
  const found: Partial<Record<Field, number>> = {};
  cells.forEach((cell, i) => {
    const field = headerField(cell);
    if (field && found[field] === undefined) found[field] = i;
  });
  return found.code !== undefined && found.name !== undefined && found.forecast !== undefined
    ? { code: found.code, name: found.name, forecast: found.forecast }
    : null;
}

const NO_HEADER = `No header row naming the columns code, name and forecast was found in the first ${HEADER_SEARCH_ROWS} rows.`;

/**
 * Reads a number typed as text. "." is the decimal point; "," is accepted as one only in a
 * semicolon-separated file, where it is the usual convention. Spaces may group thousands; other
 * thousands separators are refused rather than guessed ("4,200" could be 4.2 or 4200).
 */
function numberFromText(text: string, commaIsDecimal: boolean): number | null {
  let t = text.replace(/[\s\u00a0\u202f]/g, '');
  if (commaIsDecimal && !t.includes('.')) t = t.replace(',', '.');
  if (!/^[+-]?\d+(\.\d+)?$/.test(t)) return null;
  return Number(t);
}

function toForecast(raw: RawValue, commaIsDecimal: boolean): number | string | undefined {
  if (raw === null) return undefined;
  if ('number' in raw) return raw.number;
  if ('problem' in raw) return `forecast ${raw.problem}`;
  const n = numberFromText(raw.text, commaIsDecimal);
  return n ?? `forecast must be a number above 0, but it is ${quoteForMessage(raw.text)}.`;
}

/** Validates the raw rows with the shared schema and turns issues into "Row N: …" messages. */
function validateRows(rows: RawRow[], commaIsDecimal: boolean): RegionImportResult {
  const errors: RegionRowError[] = [];
  // Fields already reported as unreadable, so the schema does not report them again as missing.
  const reported = new Set<string>();
  if (rows.length > MAX_REGIONS) {
    return { ok: false, errors: [{ row: null, message: `The file has more than ${MAX_REGIONS} regions; a tender has at most ${MAX_REGIONS}.` }] };
  }
  const candidates = rows.map((r) => {
    const text = (v: RawValue) => (v === null ? undefined : 'text' in v ? v.text : 'number' in v ? String(v.number) : undefined);
    const forecast = toForecast(r.forecast, commaIsDecimal);
    if (typeof forecast === 'string') {
      errors.push({ row: r.row, message: `Row ${r.row}: ${forecast}` });
      reported.add(`${r.row}:forecast`);
    }
    for (const [field, value] of [['code', r.code], ['name', r.name]] as const) {
      if (value !== null && 'problem' in value) {
        errors.push({ row: r.row, message: `Row ${r.row}: ${field} ${value.problem}` });
        reported.add(`${r.row}:${field}`);
      }
    }
    return { code: text(r.code) ?? '', name: text(r.name) ?? '', forecast: typeof forecast === 'number' ? forecast : undefined };
  });

  const parsed = regionListSchema.safeParse(candidates);
  if (!parsed.success) {
    // The schema skips its duplicate check when a row is invalid; the importer wants both at once.
    const duplicates = findDuplicateRegionCodes(candidates).map((d) => ({ path: [d.index, 'code'], message: d.message }));
    const issues = [...parsed.error.issues, ...duplicates];
    const seen = new Set<string>();
    for (const issue of issues) {
      const [index, field] = issue.path;
      const rowNumber = typeof index === 'number' ? rows[index]?.row ?? null : null;
      if (rowNumber !== null && reported.has(`${rowNumber}:${String(field)}`)) continue;
      const message = rowNumber === null ? issue.message : `Row ${rowNumber}: ${lowerFirst(issue.message)}`;
      if (seen.has(message)) continue;
      seen.add(message);
      errors.push({ row: rowNumber, message });
    }
  }
  if (errors.length > 0) {
    errors.sort((a, b) => (a.row ?? 0) - (b.row ?? 0));
    return { ok: false, errors };
  }
  return parsed.success ? { ok: true, regions: parsed.data } : { ok: false, errors };
}

function cellToRaw(reading: CellReading): RawValue {
  switch (reading.kind) {
    case 'blank': return null;
    case 'text': return { text: reading.text };
    case 'number': return { number: reading.value };
    case 'formula': return { problem: 'is a formula; paste the values instead (formulas are not read).' };
    case 'other': return { problem: `must be plain text or a number, but the cell holds ${reading.description}.` };
  }
}

async function readXlsx(buffer: Buffer): Promise<RegionImportResult> {
  const check = await inspectXlsx(buffer);
  if (!check.ok) return { ok: false, errors: [{ row: null, message: check.message }] };
  let workbook: XlsxPopulate.Workbook;
  try {
    workbook = await XlsxPopulate.fromDataAsync(buffer);
  } catch {
    return { ok: false, errors: [{ row: null, message: 'The workbook could not be read; it may be damaged.' }] };
  }
  const sheet = workbook.sheet(0);
  if (!sheet) return { ok: false, errors: [{ row: null, message: 'The workbook has no sheet.' }] };

  let header: Record<Field, number> | null = null;
  let headerRow = 0;
  const rows: RawRow[] = [];
  // Only rows present in the file are visited; they come in ascending order.
  sheet.forEachExistingRow((row, rowNumber) => {
    if (!header) {
      if (rowNumber > HEADER_SEARCH_ROWS) return;
      const maxColumn = 30;
      const cells: string[] = [];
      for (let c = 1; c <= maxColumn; c++) {
        const reading = row.hasCell(c) ? readCell(row.cell(c)) : { kind: 'blank' as const };
        cells.push(reading.kind === 'text' ? reading.text : '');
      }
      header = matchHeader(cells);
      headerRow = rowNumber;
      return;
    }
    if (rows.length > MAX_DATA_ROWS) return;
    const at = (column: number) => cellToRaw(readCell(row.cell(column + 1)));
    const raw: RawRow = { row: rowNumber, code: at(header.code), name: at(header.name), forecast: at(header.forecast) };
    if (raw.code !== null || raw.name !== null || raw.forecast !== null) rows.push(raw);
  });
  if (!header) return { ok: false, errors: [{ row: null, message: `Sheet "${sheet.name()}": ${NO_HEADER}` }] };
  if (rows.length === 0) return { ok: false, errors: [{ row: null, message: `Sheet "${sheet.name()}": no region rows below the header in row ${headerRow}.` }] };
  return validateRows(rows, false);
}

function readCsv(text: string): RegionImportResult {
  const csv = parseCsv(text, MAX_DATA_ROWS + HEADER_SEARCH_ROWS);
  if (!csv.ok) return { ok: false, errors: [{ row: null, message: csv.message }] };
  const headerIndex = csv.records.slice(0, HEADER_SEARCH_ROWS).findIndex((r) => matchHeader(r.fields) !== null);
  if (headerIndex < 0) return { ok: false, errors: [{ row: null, message: NO_HEADER }] };
  const header = matchHeader(csv.records[headerIndex].fields) as Record<Field, number>;
  const field = (fields: string[], i: number): RawValue => {
    const value = (fields[i] ?? '').trim();
    return value === '' ? null : { text: value };
  };
  const rows = csv.records.slice(headerIndex + 1).map((r) => ({
    row: r.line,
    code: field(r.fields, header.code),
    name: field(r.fields, header.name),
    forecast: field(r.fields, header.forecast),
  }));
  if (rows.length === 0) return { ok: false, errors: [{ row: null, message: 'The file has no region rows below its header.' }] };
  return validateRows(rows, csv.delimiter === ';');
}

/**
 * Parses a region file into the tender's region list, or returns every problem by row
 * ("Row 7: forecast must be a number above 0."). Row numbers are the sheet's rows, or the CSV's lines.
 */
export async function parseRegionFile(buffer: Buffer, hint: RegionFileHint = {}): Promise<RegionImportResult> {
  if (buffer.length > DEFAULT_XLSX_LIMITS.maxBytes) {
    return { ok: false, errors: [{ row: null, message: `The file is ${buffer.length.toLocaleString('en-US')} bytes; at most ${formatBytes(DEFAULT_XLSX_LIMITS.maxBytes)} is accepted.` }] };
  }
  if (looksLikeZip(buffer)) return readXlsx(buffer);
  const text = decodeUtf8Text(buffer);
  if (text === null) {
    const named = hint.filename ? ` "${hint.filename}"` : '';
    return { ok: false, errors: [{ row: null, message: `The file${named} is neither an .xlsx workbook nor a UTF-8 CSV file. Save the regions as .xlsx or as CSV (UTF-8).` }] };
  }
  return readCsv(text);
}
