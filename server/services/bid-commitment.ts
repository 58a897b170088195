import { createHmac, randomBytes } from 'node:crypto';
import type { BidFigures } from '@shared/bids';

/**
 * The receipt of a submitted bid is a commitment to its figures that cannot be derived from them.
 * Recipe (DEVELOPERS.md, "Sealed bids", shows it as a stand-alone snippet for a third party):
 *
 *     message    = JSON.stringify({ tender: reference, vendor: vendorOrganisationId, revision,
 *                                   fixedFee, capacity, prices: [[code, price], …] sorted by code })
 *     commitment = hex(HMAC-SHA256(key = the 32 bytes of the hex nonce, message))
 *
 * The nonce is 256 random bits drawn for each submission (each revision) and kept with the bid,
 * server-side only, until the tender is closed; then it is shown beside the figures so that anyone
 * can recompute the commitment and compare it with the receipt. Without the nonce, guessing the
 * figures does not help: every guess needs the nonce too.
 */
export interface BidContent extends BidFigures {
  /** The tender's reference. */
  tender: string;
  /** The vendor organisation's id. */
  vendor: string;
  revision: number;
}

/** The exact text the commitment is computed over (JSON, no spaces, prices sorted by region code). */
export function bidCommitmentMessage(c: BidContent): string {
  const prices = Object.keys(c.prices).sort().map((code) => [code, c.prices[code]]);
  return JSON.stringify({ tender: c.tender, vendor: c.vendor, revision: c.revision, fixedFee: c.fixedFee, capacity: c.capacity, prices });
}

/** A fresh nonce: 32 random bytes, hex. */
export const newBidNonce = (): string => randomBytes(32).toString('hex');

/** The commitment of a bid's content under `nonce` (hex). */
export function bidCommitment(nonce: string, content: BidContent): string {
  return createHmac('sha256', Buffer.from(nonce, 'hex')).update(bidCommitmentMessage(content)).digest('hex');
}

/** A fresh nonce and the commitment it gives: what a submission stores and its receipt carries. */
export function commitBid(content: BidContent): { nonce: string; digest: string } {
  const nonce = newBidNonce();
  return { nonce, digest: bidCommitment(nonce, content) };
}
