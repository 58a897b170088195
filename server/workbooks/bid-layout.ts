import type { BidFigures, RegionInput } from '@shared/bids';

/**
 * Where everything sits in the bid workbook. Build and parse both read this one object, so a layout
 * change cannot make them disagree. On the `Bid` sheet:
 *
 *   A1      tender reference and title         A2  vendor, closing time (in its zone), currency and unit
 *   B3      tender reference (read back on upload to catch a workbook from another tender)
 *   C4      fixed fee            (input)       D4  currency note
 *   C5      capacity cap         (input)       D5  unit note, "blank = no cap"
 *   row 7   table header: A code · B region · C forecast · D unit · E unit price
 *   row 8…  one row per region in the tender's order; E is the only input column
 */
export const BID_LAYOUT = {
  sheet: 'Bid',
  instructionsSheet: 'Instructions',
  title: 'A1',
  subtitle: 'A2',
  referenceLabel: 'A3',
  reference: 'B3',
  fixedFeeLabel: 'A4',
  fixedFee: 'C4',
  fixedFeeNote: 'D4',
  capacityLabel: 'A5',
  capacity: 'C5',
  capacityNote: 'D5',
  headerRow: 7,
  firstRegionRow: 8,
  columns: { code: 'A', name: 'B', forecast: 'C', unit: 'D', price: 'E' },
  /** Labels read back on upload: if they moved, rows or columns were inserted and no cell can be trusted. */
  labels: {
    reference: 'Tender reference',
    fixedFee: 'Fixed fee',
    capacity: 'Capacity cap',
    code: 'Region code',
    price: 'Unit price',
  },
} as const;

/** Rows scanned below the last expected region row, to find stray or duplicated region rows. */
export const EXTRA_ROWS_SCANNED = 200;

/** Most cell errors reported for one upload; beyond it a summary line says how many more there were. */
export const MAX_REPORTED_ERRORS = 50;

/** `Bid!C4` style address, as used in every error. */
export function cellRef(address: string, sheet: string = BID_LAYOUT.sheet): string {
  return `${sheet}!${address}`;
}

/** What the bid workbook shows: the tender, the vendor, and optionally the bid saved so far. */
export interface BidWorkbookView {
  reference: string;
  title: string;
  /** ISO 4217 code, e.g. EUR. */
  currency: string;
  /** Unit of measure of forecasts and prices, e.g. t. */
  unit: string;
  /** ISO 8601 instant. */
  closesAt: string;
  /** The procedure's IANA time zone: the closing time is written in it, its offset and name shown. */
  timeZone?: string;
  /** The published award basis in words (`describeAwardBasis`), shown on the cover sheet. */
  awardBasis?: string[];
  vendorName: string;
  regions: RegionInput[];
  bid?: BidFigures;
}

export interface BidCellError {
  /** Sheet and cell or range, e.g. `Bid!E9`; a sheet name alone for a sheet problem; empty for the file itself. */
  cell: string;
  /** Complete sentence starting with the cell, ready to show. */
  message: string;
}

export type BidWorkbookResult =
  /** `priceCells`: region code → the cell its unit price was read from (`Bid!E9`). */
  | { ok: true; bid: BidFigures; priceCells: Record<string, string> }
  | { ok: false; errors: BidCellError[] };

