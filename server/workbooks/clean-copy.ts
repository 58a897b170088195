import XlsxPopulate from 'xlsx-populate';
import { forEachExistingCell, outputSafeWorkbook } from './spreadsheet-text';
import { inspectXlsx } from './xlsx-guard';

/** Error values, rich text and other objects a cell can return, as plain text or a number. */
function plainValue(value: XlsxPopulate.CellValue): string | number | boolean | undefined {
  if (value === undefined || value === null) return undefined;
  if (typeof value === 'string' || typeof value === 'number' || typeof value === 'boolean') return value;
  if (value instanceof Date) return value.toISOString();
  const object = value as { text?: () => unknown; error?: () => unknown };
  if (typeof object.text === 'function') return String(object.text());
  if (typeof object.error === 'function') return String(object.error());
  return undefined;
}

/**
 * The copy of a vendor's uploaded workbook that buyers download: a new workbook holding only the
 * values of the original's cells, sheet by sheet (the first 100 columns). Nothing else is carried
 * over, so formulas (replaced by the values the vendor's application last computed), external
 * links, hyperlinks, defined names, macros, embedded objects and any other active content cannot
 * reach the buyer; text that looks like a formula is kept as text. The original stays stored,
 * byte for byte, as the record.
 */
export async function cleanWorkbookCopy(original: Buffer): Promise<{ ok: true; content: Buffer } | { ok: false; message: string }> {
  const check = await inspectXlsx(original);
  if (!check.ok) return { ok: false, message: check.message };
  let source: XlsxPopulate.Workbook;
  try {
    source = await XlsxPopulate.fromDataAsync(original);
  } catch {
    return { ok: false, message: 'The stored workbook could not be read.' };
  }
  const copy = await XlsxPopulate.fromBlankAsync();
  source.sheets().forEach((sheet, i) => {
    const target = i === 0 ? copy.sheet(0)!.name(sheet.name()) : copy.addSheet(sheet.name());
    forEachExistingCell(sheet, (cell, row, column) => {
      const value = plainValue(cell.value());
      if (value !== undefined) target.cell(row, column).value(value);
    });
  });
  copy.property('Title', 'Values-only copy of an uploaded bid workbook');
  return { ok: true, content: await outputSafeWorkbook(copy) };
}
