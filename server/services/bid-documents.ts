import type { BidFigures } from '@shared/bids';
import { byCode } from '@shared/bids';
import type { BidDocument } from '../entities';
import type { BidDocumentFigures } from '../entities/bid-document.entity';
import { AppError, ValidationError, type FieldError } from '../http/errors';
import { BID_LAYOUT, cellRef } from '../workbooks/bid-layout';
import { cleanWorkbookCopyOffThread } from '../workbooks/workbook-pool';

const shown = (value: number | null | undefined) => (value === null || value === undefined ? 'no figure' : String(value));

/** Every figure where `bid` differs from the workbook's, named by field and workbook cell. */
function differences(figures: BidDocumentFigures, bid: BidFigures): FieldError[] {
  const errors: FieldError[] = [];
  const advice = 'Save the bid without the workbook, or upload a workbook with the same figures.';
  if (figures.fixedFee !== bid.fixedFee) {
    errors.push({ field: 'fixedFee', message: `The uploaded workbook has ${shown(figures.fixedFee)} in ${cellRef(BID_LAYOUT.fixedFee)}, but the bid's fixed fee is ${shown(bid.fixedFee)}. ${advice}` });
  }
  if (figures.capacity !== bid.capacity) {
    errors.push({ field: 'capacity', message: `The uploaded workbook has ${shown(figures.capacity)} in ${cellRef(BID_LAYOUT.capacity)}, but the bid's capacity cap is ${shown(bid.capacity)}. ${advice}` });
  }
  const codes = new Set([...Object.keys(figures.prices), ...Object.keys(bid.prices)]);
  for (const code of codes) {
    const inDocument = byCode(figures.prices, code);
    const inBid = byCode(bid.prices, code);
    if (inDocument === inBid) continue;
    const cell = byCode(figures.priceCells, code) ?? `the row of region ${code}`;
    errors.push({ field: `prices.${code}`, message: `The uploaded workbook has ${shown(inDocument)} in ${cell}, but the bid's unit price for region ${code} is ${inBid === undefined ? 'not given' : inBid}. ${advice}` });
  }
  return errors;
}

/**
 * A bid saved with an uploaded workbook attached must carry the workbook's figures, so the
 * document on record always says what the bid says. Every difference is named by its field and
 * the workbook cell. A workbook stored before its figures were kept is not checked.
 */
export function assertBidMatchesDocument(doc: { figures?: BidDocumentFigures | null }, bid: BidFigures): void {
  const errors = doc.figures ? differences(doc.figures, bid) : [];
  if (errors.length > 0) throw new ValidationError(errors, 'The bid does not match the uploaded workbook attached to it; nothing was saved.');
}

/**
 * A save that names no workbook keeps the one attached earlier only while the figures still are
 * the workbook's; a revision typed into the form detaches it, so the record never shows a workbook
 * that says something else than the bid.
 */
export function keepsDocument(figures: BidDocumentFigures | null, bid: BidFigures): boolean {
  return figures !== null && differences(figures, bid).length === 0;
}

/**
 * What a buyer downloads for a vendor's uploaded workbook: a values-only copy (see clean-copy.ts);
 * the original stays stored as the record.
 */
export async function cleanDocumentContent(doc: BidDocument): Promise<Buffer> {
  const copy = await cleanWorkbookCopyOffThread(doc.content);
  if (!copy.ok) throw new AppError(422, 'Workbook cannot be copied', `The stored workbook cannot be turned into a clean copy: ${copy.message}`);
  return copy.content;
}
