import XlsxPopulate from 'xlsx-populate';
import { byCode, type RegionInput } from '@shared/bids';
import { outputSafeWorkbook } from './spreadsheet-text';
import {
  FORMATS, HEADER_STYLE, NOTE_STYLE, PALETTE, READ_ONLY_STYLE, TITLE_STYLE, columnLetter, quantityFormat, sizeColumns,
} from './workbook-style';

/** One submitted bid as the tabulation shows it (the shape of GET /api/tenders/:id/bids after closing). */
export interface TabulatedBid {
  vendor: { id: string; name: string; sme: boolean };
  fixedFee: number;
  capacity: number | null;
  prices: Record<string, number>;
}

export interface TabulationView {
  reference: string;
  title: string;
  currency: string;
  unit: string;
  regions: RegionInput[];
  bids: TabulatedBid[];
}

/**
 * Cell positions of the tabulation sheet, exported for tests and for anyone reading the file back.
 * Vendors occupy one column each from `firstVendorColumn`, in the order given.
 */
export const TABULATION_LAYOUT = {
  sheet: 'Tabulation',
  title: 'A1',
  units: 'A2',
  legend: 'A3',
  headerRow: 5,
  smeRow: 6,
  firstRegionRow: 7,
  firstVendorColumn: 4,
} as const;

/** Lowest price per region code among the bids that priced it; absent when nobody did. */
export function lowestPrices(regions: RegionInput[], bids: TabulatedBid[]): Map<string, number> {
  const lowest = new Map<string, number>();
  for (const region of regions) {
    for (const bid of bids) {
      const price = byCode(bid.prices, region.code);
      if (price === undefined) continue;
      const best = lowest.get(region.code);
      if (best === undefined || price < best) lowest.set(region.code, price);
    }
  }
  return lowest;
}

const LOWEST_STYLE: XlsxPopulate.StyleMap = { bold: true, fill: PALETTE.highlightFill, border: true, borderColor: PALETTE.inputBorder };

function writeHeader(sheet: XlsxPopulate.Sheet, view: TabulationView): number {
  const L = TABULATION_LAYOUT;
  sheet.cell(L.title).value(`Bid tabulation — ${view.reference}: ${view.title}`).style(TITLE_STYLE);
  sheet.cell(L.units).value(`Unit prices in ${view.currency} per ${view.unit}; forecasts and capacity caps in ${view.unit}; fixed fees in ${view.currency}. A blank price means the region was not bid.`).style(NOTE_STYLE);
  sheet.cell(L.legend)
    .value('Legend: a bold figure on a shaded background, followed by "(lowest)", is the lowest unit price in its region; equal lowest prices are all marked.')
    .style(NOTE_STYLE);

  const h = L.headerRow;
  sheet.cell(h, 1).value('Region code');
  sheet.cell(h, 2).value('Region');
  sheet.cell(h, 3).value(`Forecast (${view.unit})`);
  view.bids.forEach((bid, i) => sheet.cell(h, L.firstVendorColumn + i).value(bid.vendor.name));
  const after = L.firstVendorColumn + view.bids.length;
  sheet.cell(h, after).value(`Lowest unit price (${view.currency})`);
  sheet.cell(h, after + 1).value('Bids received');
  sheet.range(`A${h}:${columnLetter(after + 1)}${h}`).style(HEADER_STYLE);

  sheet.cell(L.smeRow, 3).value('SME').style({ bold: true, horizontalAlignment: 'right' });
  view.bids.forEach((bid, i) => sheet.cell(L.smeRow, L.firstVendorColumn + i).value(bid.vendor.sme ? 'SME' : 'not SME').style(NOTE_STYLE));
  return after;
}

/**
 * Builds the bid tabulation workbook: regions down, vendors across, each region's lowest unit price
 * marked by bold, shading and a "(lowest)" suffix (explained in a legend, so colour is never the only
 * cue), then rows for fixed fees, capacity caps and the number of regions each vendor bid.
 */
export async function buildTabulationWorkbook(view: TabulationView): Promise<Buffer> {
  const L = TABULATION_LAYOUT;
  const workbook = await XlsxPopulate.fromBlankAsync();
  const sheet = workbook.sheet(0);
  if (!sheet) throw new Error('a blank workbook has no sheet');
  sheet.name(L.sheet);

  const lowestColumn = writeHeader(sheet, view);
  const lowest = lowestPrices(view.regions, view.bids);
  const lowestFormat = `${FORMATS.price}" (lowest)"`;

  view.regions.forEach((region, r) => {
    const row = L.firstRegionRow + r;
    sheet.cell(row, 1).value(region.code).style(READ_ONLY_STYLE);
    sheet.cell(row, 2).value(region.name).style(READ_ONLY_STYLE);
    sheet.cell(row, 3).value(region.forecast).style({ ...READ_ONLY_STYLE, numberFormat: quantityFormat(region.forecast) });
    let count = 0;
    view.bids.forEach((bid, i) => {
      const price = byCode(bid.prices, region.code);
      if (price === undefined) return;
      count++;
      const cell = sheet.cell(row, L.firstVendorColumn + i).value(price);
      cell.style(price === lowest.get(region.code) ? { ...LOWEST_STYLE, numberFormat: lowestFormat } : { numberFormat: FORMATS.price });
    });
    const best = lowest.get(region.code);
    if (best !== undefined) sheet.cell(row, lowestColumn).value(best).style({ numberFormat: FORMATS.price });
    else sheet.cell(row, lowestColumn).value('no bid').style(NOTE_STYLE);
    sheet.cell(row, lowestColumn + 1).value(count);
  });

  const feeRow = L.firstRegionRow + view.regions.length + 1;
  sheet.cell(feeRow, 2).value(`Fixed fee (${view.currency})`).style({ bold: true });
  sheet.cell(feeRow + 1, 2).value(`Capacity cap (${view.unit})`).style({ bold: true });
  sheet.cell(feeRow + 2, 2).value('Regions bid').style({ bold: true });
  view.bids.forEach((bid, i) => {
    const column = L.firstVendorColumn + i;
    sheet.cell(feeRow, column).value(bid.fixedFee).style({ numberFormat: FORMATS.money });
    const cap = sheet.cell(feeRow + 1, column);
    if (bid.capacity === null) cap.value('no cap').style(NOTE_STYLE);
    else cap.value(bid.capacity).style({ numberFormat: quantityFormat(bid.capacity) });
    sheet.cell(feeRow + 2, column).value(view.regions.filter((region) => byCode(bid.prices, region.code) !== undefined).length);
  });

  sizeColumns(sheet, [14, 30, 14, ...view.bids.map(() => 20), 20, 10]);
  sheet.row(L.headerRow).height(32);
  sheet.freezePanes(`${columnLetter(L.firstVendorColumn)}${L.firstRegionRow}`);
  return outputSafeWorkbook(workbook);
}
