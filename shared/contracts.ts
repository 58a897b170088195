import { z } from 'zod';
import { hasAtMostDecimals, MAX_AMOUNT, regionCodeSchema, unitPriceSchema } from './bids';
import { isoDateSchema, type TenderStatus } from './tenders';

/**
 * The contract step: after the standstill, the buyer records each awarded vendor's signed contract
 * (signature date, and the schedule of regions, quantities and unit prices). When every awarded
 * vendor's contract is recorded the tender is `contracted`.
 */
export const contractLineSchema = z.object({
  region: regionCodeSchema,
  quantity: z
    .number({ error: 'Quantity must be a number above 0.' })
    .gt(0, { error: 'Quantity must be a number above 0.' })
    .lt(MAX_AMOUNT, { error: `Quantity must be below ${MAX_AMOUNT.toExponential()}.` })
    .refine((v) => hasAtMostDecimals(v, 4), { error: 'Quantity may have at most 4 decimals (and must not round to 0).' }),
  unitPrice: unitPriceSchema,
});

/** POST /api/tenders/:id/contracts */
export const contractInputSchema = z.object({
  vendorId: z.uuid({ error: 'Must be a valid id.' }),
  /** The date the contract was signed (in the procedure's time zone): after the standstill end, not in the future. */
  signedOn: isoDateSchema,
  lines: z.array(contractLineSchema, { error: 'The schedule must be a list of lines.' }).min(1, { error: 'The schedule needs at least one region.' }).max(5000),
});
export type ContractInput = z.infer<typeof contractInputSchema>;

export interface ContractLineView {
  region: string;
  regionName: string;
  quantity: number;
  unitPrice: number;
}

/** One awarded vendor: the award's schedule (to pre-fill the form) and its recorded contract, if any. */
export interface AwardedContractView {
  vendor: { id: string; name: string };
  awarded: ContractLineView[];
  contract: { id: string; signedOn: string; recordedBy: { id: string; name: string }; recordedAt: string; lines: ContractLineView[] } | null;
}

/** GET /api/tenders/:id/contracts */
export interface ContractsView {
  tenderId: string;
  status: TenderStatus;
  timeZone: string;
  standstillEndsAt: string | null;
  /** The first signature date the server accepts (the day after the standstill's last day, in the procedure's zone). */
  earliestSignedOn: string | null;
  /** Contracts can be recorded now: notices sent and the standstill over. */
  open: boolean;
  /** Why not, in words, when they cannot. */
  waiting: string | null;
  vendors: AwardedContractView[];
}
