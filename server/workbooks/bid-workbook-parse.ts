import XlsxPopulate from 'xlsx-populate';
import type { ZodType } from 'zod';
import { capacitySchema, fixedFeeSchema, recordByCode, unitPriceSchema, type RegionInput } from '@shared/bids';
import {
  BID_LAYOUT, EXTRA_ROWS_SCANNED, MAX_REPORTED_ERRORS, cellRef, type BidCellError, type BidWorkbookResult,
} from './bid-layout';
import { lowerFirst, quoteForMessage, readCell } from './cell-reading';
import { inspectXlsx } from './xlsx-guard';

const { columns: COL } = BID_LAYOUT;

class CellErrors {
  readonly list: BidCellError[] = [];
  add(address: string, text: string): void {
    const cell = cellRef(address);
    this.list.push({ cell, message: `${cell}: ${text}` });
  }
}

/**
 * Reads one numeric input cell. Blank returns null (the caller decides whether blank is allowed);
 * a problem is recorded against the cell and returns undefined.
 */
function readNumber(
  sheet: XlsxPopulate.Sheet, address: string, field: string, schema: ZodType<number | null>, errors: CellErrors,
): number | null | undefined {
  const reading = readCell(sheet.cell(address));
  switch (reading.kind) {
    case 'blank':
      return null;
    case 'formula':
      errors.add(address, `formulas are not accepted; type the ${field} as a number.`);
      return undefined;
    case 'text':
      errors.add(address, `${field} must be a number, but the cell holds the text ${quoteForMessage(reading.text)}.`);
      return undefined;
    case 'other':
      errors.add(address, `${field} must be a number, but the cell holds ${reading.description}.`);
      return undefined;
    case 'number': {
      const checked = schema.safeParse(reading.value);
      if (checked.success) return reading.value;
      errors.add(address, lowerFirst(checked.error.issues[0]?.message ?? `${field} is not valid.`));
      return undefined;
    }
  }
}

/** The labels must sit where the layout puts them; otherwise rows or columns were moved. */
function checkLabels(sheet: XlsxPopulate.Sheet, errors: CellErrors): boolean {
  const expected: Array<[string, string]> = [
    [BID_LAYOUT.referenceLabel, BID_LAYOUT.labels.reference],
    [BID_LAYOUT.fixedFeeLabel, BID_LAYOUT.labels.fixedFee],
    [BID_LAYOUT.capacityLabel, BID_LAYOUT.labels.capacity],
    [`${COL.code}${BID_LAYOUT.headerRow}`, BID_LAYOUT.labels.code],
    [`${COL.price}${BID_LAYOUT.headerRow}`, BID_LAYOUT.labels.price],
  ];
  let intact = true;
  for (const [address, label] of expected) {
    const reading = readCell(sheet.cell(address));
    if (reading.kind !== 'text' || !reading.text.startsWith(label)) {
      errors.add(address, `expected the label "${label}" here: rows or columns of the downloaded workbook were moved. Download a fresh workbook and enter the figures again.`);
      intact = false;
    }
  }
  return intact;
}

function readRegionRows(sheet: XlsxPopulate.Sheet, regions: RegionInput[], errors: CellErrors, priceCells: Record<string, string>): Record<string, number> {
  const byCode = new Map(regions.map((r) => [r.code.toUpperCase(), r]));
  const seenAt = new Map<string, number>();
  const prices = recordByCode<number>();
  const first = BID_LAYOUT.firstRegionRow;
  const lastScanned = first + regions.length - 1 + EXTRA_ROWS_SCANNED;

  // Only rows that exist in the file are visited, so a cell far down the sheet costs nothing.
  sheet.forEachExistingRow((row, rowNumber) => {
    if (rowNumber < first || rowNumber > lastScanned) return;
    const codeReading = readCell(row.cell(COL.code));
    const priceAddress = `${COL.price}${rowNumber}`;
    const codeAddress = `${COL.code}${rowNumber}`;
    const priceReading = readCell(row.cell(COL.price));

    if (codeReading.kind === 'blank') {
      if (priceReading.kind !== 'blank') errors.add(priceAddress, 'a unit price is entered on a row without a region code.');
      return;
    }
    if (codeReading.kind === 'formula') {
      errors.add(codeAddress, 'formulas are not accepted; the region code must stay as downloaded.');
      return;
    }
    const code = codeReading.kind === 'number' ? String(codeReading.value) : codeReading.kind === 'text' ? codeReading.text : '';
    const region = byCode.get(code.toUpperCase());
    if (!region) {
      errors.add(codeAddress, `unknown region code ${quoteForMessage(code)}: this tender has no such region. Keep the region rows as downloaded.`);
      return;
    }
    const earlier = seenAt.get(region.code);
    if (earlier !== undefined) {
      errors.add(codeAddress, `region ${region.code} appears twice (also in row ${earlier}); keep one row per region.`);
      return;
    }
    seenAt.set(region.code, rowNumber);

    const price = readNumber(sheet, priceAddress, 'unit price', unitPriceSchema, errors);
    if (typeof price === 'number') {
      prices[region.code] = price;
      priceCells[region.code] = cellRef(priceAddress);
    }
  });

  const missing = regions.filter((r) => !seenAt.has(r.code));
  if (missing.length > 0) {
    const range = `${COL.code}${first}:${COL.code}${first + regions.length - 1}`;
    for (const region of missing) {
      errors.add(range, `the row of region ${region.code} (${region.name}) is missing. Keep every region row of the downloaded workbook; leave the price blank to not offer it.`);
    }
  }
  return prices;
}

function fail(errors: BidCellError[]): BidWorkbookResult {
  if (errors.length <= MAX_REPORTED_ERRORS) return { ok: false, errors };
  const shown = errors.slice(0, MAX_REPORTED_ERRORS);
  shown.push({ cell: BID_LAYOUT.sheet, message: `${BID_LAYOUT.sheet}: ${errors.length - MAX_REPORTED_ERRORS} more problems not listed; correct the ones above first.` });
  return { ok: false, errors: shown };
}

export interface ParseBidOptions {
  /** When given, a workbook downloaded for another tender is refused. */
  reference?: string;
}

/**
 * Reads a vendor's uploaded bid workbook against the tender's regions. Returns the bid figures, or
 * every problem found, each naming its sheet and cell; never a partial bid. The file is checked by
 * content (see xlsx-guard) before it is unzipped, and formulas are refused, never evaluated.
 */
export async function parseBidWorkbook(
  buffer: Buffer, regions: RegionInput[], options: ParseBidOptions = {},
): Promise<BidWorkbookResult> {
  const check = await inspectXlsx(buffer);
  if (!check.ok) return fail([{ cell: '', message: check.message }]);

  let workbook: XlsxPopulate.Workbook;
  try {
    workbook = await XlsxPopulate.fromDataAsync(buffer);
  } catch {
    return fail([{ cell: '', message: 'The workbook could not be read; it may be damaged. Download a fresh workbook and enter the figures again.' }]);
  }

  const sheet = workbook.sheet(BID_LAYOUT.sheet);
  if (!sheet) {
    const found = workbook.sheets().map((s) => `"${s.name()}"`).join(', ');
    return fail([{
      cell: BID_LAYOUT.sheet,
      message: `${BID_LAYOUT.sheet}: the workbook has no sheet named "${BID_LAYOUT.sheet}" (it has ${found}). Keep the sheet names of the downloaded workbook.`,
    }]);
  }

  const errors = new CellErrors();
  if (!checkLabels(sheet, errors)) return fail(errors.list);

  if (options.reference !== undefined) {
    const reading = readCell(sheet.cell(BID_LAYOUT.reference));
    const found = reading.kind === 'text' ? reading.text : reading.kind === 'number' ? String(reading.value) : '';
    if (found !== options.reference) {
      errors.add(BID_LAYOUT.reference, `this workbook belongs to tender ${quoteForMessage(found || '(none)')}, not ${options.reference}. Download the workbook of this tender.`);
      return fail(errors.list);
    }
  }

  const fixedFee = readNumber(sheet, BID_LAYOUT.fixedFee, 'fixed fee', fixedFeeSchema, errors);
  if (fixedFee === null) errors.add(BID_LAYOUT.fixedFee, 'the fixed fee is required; enter 0 if there is none.');
  const capacity = readNumber(sheet, BID_LAYOUT.capacity, 'capacity cap', capacitySchema, errors);
  const priceCells = recordByCode<string>();
  const prices = readRegionRows(sheet, regions, errors, priceCells);

  if (errors.list.length === 0 && Object.keys(prices).length === 0) {
    const last = BID_LAYOUT.firstRegionRow + regions.length - 1;
    errors.add(`${COL.price}${BID_LAYOUT.firstRegionRow}:${COL.price}${last}`, 'no unit price is entered; offer at least one region.');
  }
  if (errors.list.length > 0 || typeof fixedFee !== 'number' || capacity === undefined) return fail(errors.list);
  return { ok: true, bid: { fixedFee, capacity, prices }, priceCells };
}
