import XlsxPopulate from 'xlsx-populate';
import { byCode } from '@shared/bids';
import { DEFAULT_TIME_ZONE, formatInZone } from '@shared/time-zone';
import { BID_LAYOUT, type BidWorkbookView } from './bid-layout';
import { outputSafeWorkbook } from './spreadsheet-text';
import { addDecimalValidation, protectSheet, unlockCell } from './xlsx-internals';
import {
  FORMATS, HEADER_STYLE, INPUT_STYLE, NOTE_STYLE, READ_ONLY_STYLE, TITLE_STYLE, quantityFormat, sizeColumns,
} from './workbook-style';


const { columns: COL } = BID_LAYOUT;

/** The closing time in the one format: the procedure's zone, its offset and name (a file travels between zones). */
function closingTime(view: BidWorkbookView): string {
  return formatInZone(view.closesAt, view.timeZone ?? DEFAULT_TIME_ZONE);
}

const BASIS_HEADING = 'How the contract will be awarded (the published award basis)';

function instructionLines(view: BidWorkbookView): string[] {
  const closing = closingTime(view);
  const basis = view.awardBasis?.length ? ['', BASIS_HEADING, ...view.awardBasis.map((line) => `- ${line}`)] : [];
  return [
    `Bid workbook for tender ${view.reference}: ${view.title}`,
    `Prepared for ${view.vendorName}.`,
    '',
    'How to fill it in',
    `1. On the "${BID_LAYOUT.sheet}" sheet, enter your fixed fee in cell ${BID_LAYOUT.fixedFee}, in ${view.currency}, once for the whole contract (0 if there is none).`,
    `2. Enter your capacity cap in cell ${BID_LAYOUT.capacity}: the most ${view.unit} you can supply over the contract. Leave it blank for no cap.`,
    `3. For each region you offer, enter a delivered unit price in column ${COL.price}, in ${view.currency} per ${view.unit}. Leave a price blank if you do not offer that region.`,
    '4. Type numbers only: prices above 0 with at most 4 decimals, the fixed fee with at most 2 decimals.',
    '5. Upload the workbook on the tender\'s bid page, check the figures shown there, then submit your bid.',
    '',
    'Rules for the file',
    `- Bids close at ${closing}. A bid arriving after that time is refused.`,
    '- Keep the file as .xlsx. Do not rename, move or add sheets, rows or columns; only the white cells are editable.',
    '- Formulas are not accepted in any input cell: type the values themselves.',
    '- Uploading the workbook does not submit it: you review the figures and submit on the bid page.',
    ...basis,
    '',
    'The buyer\'s procurement rules and the tender documents decide what a valid bid is; this workbook is only a way to enter its figures.',
  ];
}

function writeInstructions(sheet: XlsxPopulate.Sheet, view: BidWorkbookView): void {
  const lines = instructionLines(view);
  lines.forEach((line, i) => {
    const cell = sheet.cell(i + 1, 1).value(line);
    cell.style({ wrapText: true, verticalAlignment: 'top', fontColor: TITLE_STYLE.fontColor });
  });
  sheet.cell(1, 1).style(TITLE_STYLE);
  lines.forEach((line, i) => {
    if (line === 'How to fill it in' || line === 'Rules for the file' || line === BASIS_HEADING) sheet.cell(i + 1, 1).style({ bold: true });
  });
  sizeColumns(sheet, [110]);
  sheet.gridLinesVisible(false);
}

function writeHeaderBlock(sheet: XlsxPopulate.Sheet, view: BidWorkbookView): void {
  const L = BID_LAYOUT;
  sheet.cell(L.title).value(`Tender ${view.reference}: ${view.title}`).style(TITLE_STYLE);
  sheet.cell(L.subtitle)
    .value(`${view.vendorName} · closes ${closingTime(view)} · prices in ${view.currency} per ${view.unit}`)
    .style(NOTE_STYLE);
  sheet.cell(L.referenceLabel).value(L.labels.reference).style({ bold: true });
  sheet.cell(L.reference).value(view.reference);

  sheet.cell(L.fixedFeeLabel).value(L.labels.fixedFee).style({ bold: true });
  sheet.cell(L.fixedFeeNote).value(`${view.currency}, once for the whole contract (0 if none)`).style(NOTE_STYLE);
  const fee = sheet.cell(L.fixedFee);
  if (view.bid) fee.value(view.bid.fixedFee);
  fee.style({ ...INPUT_STYLE, numberFormat: FORMATS.money });
  unlockCell(fee);
  addDecimalValidation(sheet, L.fixedFee, {
    operator: 'greaterThanOrEqual', bound: '0', title: 'Fixed fee', error: 'Enter a number, 0 or more.',
  });

  sheet.cell(L.capacityLabel).value(L.labels.capacity).style({ bold: true });
  sheet.cell(L.capacityNote).value(`${view.unit} over the whole contract; blank = no cap`).style(NOTE_STYLE);
  const cap = sheet.cell(L.capacity);
  if (view.bid?.capacity != null) cap.value(view.bid.capacity);
  cap.style({ ...INPUT_STYLE, numberFormat: FORMATS.quantity });
  unlockCell(cap);
  addDecimalValidation(sheet, L.capacity, {
    operator: 'greaterThan', bound: '0', title: 'Capacity cap', error: 'Enter a number above 0, or leave the cell blank for no cap.',
  });
}

function writeRegionTable(sheet: XlsxPopulate.Sheet, view: BidWorkbookView): void {
  const L = BID_LAYOUT;
  const header = L.headerRow;
  sheet.cell(`${COL.code}${header}`).value(L.labels.code);
  sheet.cell(`${COL.name}${header}`).value('Region');
  sheet.cell(`${COL.forecast}${header}`).value('Forecast');
  sheet.cell(`${COL.unit}${header}`).value('Unit');
  sheet.cell(`${COL.price}${header}`).value(`${L.labels.price} (${view.currency} per ${view.unit})`);
  sheet.range(`${COL.code}${header}:${COL.price}${header}`).style(HEADER_STYLE);

  view.regions.forEach((region, i) => {
    const row = L.firstRegionRow + i;
    sheet.cell(`${COL.code}${row}`).value(region.code).style(READ_ONLY_STYLE);
    sheet.cell(`${COL.name}${row}`).value(region.name).style(READ_ONLY_STYLE);
    sheet.cell(`${COL.forecast}${row}`).value(region.forecast).style({ ...READ_ONLY_STYLE, numberFormat: quantityFormat(region.forecast) });
    sheet.cell(`${COL.unit}${row}`).value(view.unit).style(READ_ONLY_STYLE);
    const price = sheet.cell(`${COL.price}${row}`);
    const offered = byCode(view.bid?.prices, region.code);
    if (offered !== undefined) price.value(offered);
    price.style({ ...INPUT_STYLE, numberFormat: FORMATS.price });
    unlockCell(price);
  });

  const last = L.firstRegionRow + view.regions.length - 1;
  addDecimalValidation(sheet, `${COL.price}${L.firstRegionRow}:${COL.price}${last}`, {
    operator: 'greaterThan', bound: '0', title: 'Unit price',
    prompt: `${view.currency} per ${view.unit}; blank = region not offered`,
    error: 'Enter a number above 0, or leave the cell blank if you do not offer this region.',
  });
}

/**
 * Builds the vendor's bid workbook: an `Instructions` sheet and a protected `Bid` sheet whose only
 * editable cells are the fixed fee, the capacity cap and one unit price per region (see BID_LAYOUT).
 * When `view.bid` is given, its figures are filled in so a vendor can continue from a saved draft.
 */
export async function buildBidWorkbook(view: BidWorkbookView): Promise<Buffer> {
  const workbook = await XlsxPopulate.fromBlankAsync();
  const instructions = workbook.sheet(0);
  if (!instructions) throw new Error('a blank workbook has no sheet');
  instructions.name(BID_LAYOUT.instructionsSheet);
  writeInstructions(instructions, view);

  const bid = workbook.addSheet(BID_LAYOUT.sheet);
  writeHeaderBlock(bid, view);
  writeRegionTable(bid, view);
  sizeColumns(bid, [16, 34, 14, 8, 24]);
  bid.freezePanes(`A${BID_LAYOUT.firstRegionRow}`);
  protectSheet(bid);
  protectSheet(instructions);

  workbook.property('Title', `Bid workbook ${view.reference}`);
  return outputSafeWorkbook(workbook);
}
