import type XlsxPopulate from 'xlsx-populate';
import { markAsText } from './xlsx-internals';

/**
 * The one rule for text that leaves Tendara in a spreadsheet file (workbooks and CSV): text a
 * spreadsheet application would read as a formula or a command is neutralised; numbers stay
 * numbers. A formula lead is `=`, `+`, `-` or `@` (or their full-width and small forms, which some
 * applications fold to the plain ones), possibly after leading spaces; a leading tab or carriage
 * return also counts, as some applications treat it as the start of a new cell.
 */
const FORMULA_LEAD = /^[\s\u00a0\u2000-\u200b\u3000\ufeff]*[=+\-@\uff1d\uff0b\uff0d\uff20\ufe66\ufe62\ufe63\ufe6b]/;
const CONTROL_LEAD = /^[\t\r\n]/;

/** True when a spreadsheet could take `text` for a formula. */
export function looksLikeFormula(text: string): boolean {
  return CONTROL_LEAD.test(text) || FORMULA_LEAD.test(text);
}

/**
 * One CSV cell, always quoted. Formula-like text gets a leading apostrophe, which spreadsheet
 * applications show as text and never evaluate; numbers are written as numbers.
 */
export function csvCell(value: unknown): string {
  if (typeof value === 'number' && Number.isFinite(value)) return String(value);
  let text = value === null || value === undefined ? '' : typeof value === 'string' ? value : JSON.stringify(value);
  if (looksLikeFormula(text)) text = `'${text}`;
  return `"${text.replace(/"/g, '""')}"`;
}

/** Most columns looked at per row when a workbook is checked or copied (Tendara's own use five). */
export const MAX_COLUMNS = 100;

/** Calls `visit` for every cell that exists in the sheet, up to {@link MAX_COLUMNS} columns. */
export function forEachExistingCell(sheet: XlsxPopulate.Sheet, visit: (cell: XlsxPopulate.Cell, row: number, column: number) => void): void {
  const last = Math.min(sheet.usedRange()?.endCell().columnNumber() ?? 0, MAX_COLUMNS);
  sheet.forEachExistingRow((row, rowNumber) => {
    for (let c = 1; c <= last; c++) if (row.hasCell(c)) visit(row.cell(c), rowNumber, c);
  });
}

/**
 * The last step of every exported workbook: each text cell that looks like a formula is marked as
 * text (the "quote prefix", so editing the cell keeps it text), and a workbook that somehow holds
 * a formula is refused rather than sent. Text is stored as text by xlsx-populate in any case; this
 * pass is the one place where that promise is checked for the whole file.
 */
export async function outputSafeWorkbook(workbook: XlsxPopulate.Workbook): Promise<Buffer> {
  for (const sheet of workbook.sheets()) {
    forEachExistingCell(sheet, (cell) => {
      const formula = cell.formula();
      if (formula !== undefined && formula !== '') throw new Error(`exported workbook holds a formula in ${cell.address({ includeSheetName: true })}`);
      const value = cell.value();
      if (typeof value === 'string' && looksLikeFormula(value)) markAsText(cell);
    });
  }
  return workbook.outputAsync();
}
