import type XlsxPopulate from 'xlsx-populate';

/**
 * Tendara's own, deliberately plain workbook look: slate text, a pale blue-grey header band, white
 * input cells with a darker border, and light grey for read-only data. Shared by every workbook we
 * write so they read as one family.
 */
export const PALETTE = {
  text: '1B2A33',
  muted: '52606B',
  headerFill: 'DCE3E8',
  readOnlyFill: 'F3F5F7',
  inputFill: 'FFFFFF',
  inputBorder: '5B6B78',
  highlightFill: 'CFE8D4',
} as const;

export const TITLE_STYLE: XlsxPopulate.StyleMap = { bold: true, fontSize: 14, fontColor: PALETTE.text };
export const NOTE_STYLE: XlsxPopulate.StyleMap = { italic: true, fontColor: PALETTE.muted };
export const HEADER_STYLE: XlsxPopulate.StyleMap = {
  bold: true,
  fontColor: PALETTE.text,
  fill: PALETTE.headerFill,
  border: true,
  borderColor: PALETTE.inputBorder,
  verticalAlignment: 'center',
  wrapText: true,
};
export const READ_ONLY_STYLE: XlsxPopulate.StyleMap = { fill: PALETTE.readOnlyFill, fontColor: PALETTE.text };
export const INPUT_STYLE: XlsxPopulate.StyleMap = {
  fill: PALETTE.inputFill,
  border: true,
  borderColor: PALETTE.inputBorder,
  fontColor: PALETTE.text,
};

/** Number formats: money with 2 decimals, prices with 2 to 4, quantities as entered. */
export const FORMATS = {
  money: '#,##0.00',
  price: '#,##0.00##',
  quantity: '#,##0.####',
  wholeQuantity: '#,##0',
} as const;

/** Integers get a format without a decimal point, so "4,200" is not shown as "4,200.". */
export function quantityFormat(value: number): string {
  return Number.isInteger(value) ? FORMATS.wholeQuantity : FORMATS.quantity;
}

/** Sets column widths in characters, left to right from column A. */
export function sizeColumns(sheet: XlsxPopulate.Sheet, widths: number[]): void {
  widths.forEach((width, i) => sheet.column(i + 1).width(width));
}

/** Column letter(s) for a 1-based column number (1 → A, 27 → AA). */
export function columnLetter(columnNumber: number): string {
  let n = columnNumber;
  let letters = '';
  while (n > 0) {
    const rem = (n - 1) % 26;
    letters = String.fromCharCode(65 + rem) + letters;
    n = Math.floor((n - 1) / 26);
  }
  return letters;
}
