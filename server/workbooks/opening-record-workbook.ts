import XlsxPopulate from 'xlsx-populate';
import type { OpeningRecordView } from '@shared/compliance';
import { formatInZone } from '@shared/time-zone';
import { outputSafeWorkbook } from './spreadsheet-text';
import { HEADER_STYLE, NOTE_STYLE, TITLE_STYLE, sizeColumns } from './workbook-style';

/** Cell positions of the opening record sheet, exported for tests and for anyone reading the file back. */
export const OPENING_RECORD_LAYOUT = {
  sheet: 'Opening record',
  title: 'A1',
  times: 'A2',
  digest: 'A3',
  headerRow: 5,
  firstBidRow: 6,
} as const;

/**
 * The opening record as a workbook: one row per bid received (vendor, time received in the
 * procedure's zone, in the one date-time format (ISO stays in the record's JSON),
 * revision, receipt), then the bids withdrawn before closing, and the record's SHA-256 (of the
 * canonical JSON the API serves, which the audit trail carries).
 */
export async function buildOpeningRecordWorkbook(view: OpeningRecordView, timeZone: string): Promise<Buffer> {
  const when = (iso: string) => formatInZone(iso, timeZone, { named: false, seconds: true });
  const L = OPENING_RECORD_LAYOUT;
  const { record } = view;
  const workbook = await XlsxPopulate.fromBlankAsync();
  const sheet = workbook.sheet(0);
  if (!sheet) throw new Error('a blank workbook has no sheet');
  sheet.name(L.sheet);
  sheet.cell(L.title).value(`Opening record — ${record.tender.reference}: ${record.tender.title}`).style(TITLE_STYLE);
  sheet.cell(L.times).value(`Times in ${timeZone}. Closing time ${when(record.closesAt)}; opened ${when(record.openedAt)}. ${record.bids.length} bids received, ${record.withdrawn.length} withdrawn.`).style(NOTE_STYLE);
  sheet.cell(L.digest).value(`SHA-256 of the record (canonical JSON, as in the audit trail): ${view.digest}`).style(NOTE_STYLE);
  const headers = ['Vendor', `Received (${timeZone})`, 'Revision', 'Receipt (commitment)'];
  headers.forEach((h, i) => sheet.cell(L.headerRow, i + 1).value(h));
  sheet.range(`A${L.headerRow}:D${L.headerRow}`).style(HEADER_STYLE);
  record.bids.forEach((b, i) => {
    const row = L.firstBidRow + i;
    sheet.cell(row, 1).value(b.vendor.name);
    sheet.cell(row, 2).value(when(b.receivedAt));
    sheet.cell(row, 3).value(b.revision);
    sheet.cell(row, 4).value(b.digest);
  });
  const withdrawnHeader = L.firstBidRow + record.bids.length + 1;
  sheet.cell(withdrawnHeader, 1).value('Withdrawn before closing');
  sheet.cell(withdrawnHeader, 2).value(`Withdrawn (${timeZone})`);
  sheet.range(`A${withdrawnHeader}:B${withdrawnHeader}`).style(HEADER_STYLE);
  if (!record.withdrawn.length) sheet.cell(withdrawnHeader + 1, 1).value('none').style(NOTE_STYLE);
  record.withdrawn.forEach((w, i) => {
    sheet.cell(withdrawnHeader + 1 + i, 1).value(w.vendor.name);
    sheet.cell(withdrawnHeader + 1 + i, 2).value(when(w.withdrawnAt));
  });
  sizeColumns(sheet, [36, 28, 10, 68]);
  return outputSafeWorkbook(workbook);
}
