import { z } from 'zod';
import { regionListSchema } from './bids';
import { plainText } from './text';
import { DEFAULT_TIME_ZONE, formatInZone } from './time-zone';

/**
 * The procedure between publication and closing: vendors' clarification questions and the buyer's
 * answers, numbered amendments of an open tender, and cancellation before closing.
 */

const multiline = (label: string, max: number) =>
  plainText(
    z.string({ error: `${label} is required.` }).trim().min(1, { error: `${label} is required.` }).max(max, { error: `${label} must be at most ${max} characters.` }),
    label,
    true,
  );

/** POST /api/tenders/:id/questions (vendor). */
export const questionInputSchema = z.object({ text: multiline('Question', 4000) });
export type QuestionInput = z.infer<typeof questionInputSchema>;

/** POST /api/questions/:id/answer (buyer). */
export const answerInputSchema = z.object({ text: multiline('Answer', 8000) });
export type AnswerInput = z.infer<typeof answerInputSchema>;

export const questionIdParamSchema = z.object({ id: z.uuid({ error: 'Must be a valid id.' }) });

/** A question as the API gives it. `askedBy` only for buyer, compliance and admin. */
export interface QuestionView {
  id: string;
  /** Published number (1, 2, …) in the order answers were published; null until answered. */
  number: number | null;
  status: 'asked' | 'answered';
  question: string;
  answer: string | null;
  askedAt: string;
  answeredAt: string | null;
  /** Buyer, compliance and admin only: who asked. */
  askedBy?: { organisation: string; name: string };
  /** For a vendor: the question is its own (shown to it while it awaits an answer). */
  mine?: boolean;
}

/** POST /api/tenders/:id/amendments (buyer, open tenders). `regions`: the whole new list. */
export const amendmentInputSchema = z.object({
  reason: multiline('Reason', 2000),
  closesAt: z.iso.datetime({ offset: true, error: 'Closing time must be a date and time (ISO 8601 with a time zone).' }).optional(),
  description: plainText(z.string({ error: 'Description must be text.' }).max(5000, { error: 'Description must be at most 5000 characters.' }), 'Description', true).optional(),
  regions: regionListSchema.optional(),
});
export type AmendmentInput = z.infer<typeof amendmentInputSchema>;

/** What one amendment changed, as stored and listed. */
export interface AmendmentChanges {
  closesAt?: { from: string; to: string };
  description?: { from: string; to: string };
  regionsAdded?: { code: string; name: string; forecast: number }[];
  regionsRemoved?: { code: string; name: string; forecast: number }[];
  regionsChanged?: { code: string; name: string; fromName: string; fromForecast: number; toForecast: number }[];
}

export interface AmendmentView {
  number: number;
  issuedAt: string;
  reason: string;
  changes: AmendmentChanges;
}

/** POST /api/tenders/:id/cancel (buyer, draft or open). */
export const cancelInputSchema = z.object({ reason: multiline('Reason', 2000) });
export type CancelInput = z.infer<typeof cancelInputSchema>;

/** A one-line summary of an amendment's changes, in the buyer's words. */
export function describeChanges(c: AmendmentChanges, unit = '', timeZone = DEFAULT_TIME_ZONE): string[] {
  const lines: string[] = [];
  const u = unit ? ` ${unit}` : '';
  if (c.closesAt) lines.push(`Closing time extended from ${formatInZone(c.closesAt.from, timeZone)} to ${formatInZone(c.closesAt.to, timeZone)}.`);
  for (const r of c.regionsAdded ?? []) lines.push(`Region ${r.code} (${r.name}) added, forecast ${r.forecast}${u}.`);
  for (const r of c.regionsRemoved ?? []) lines.push(`Region ${r.code} (${r.name}) removed.`);
  for (const r of c.regionsChanged ?? []) {
    if (r.fromForecast !== r.toForecast) lines.push(`Region ${r.code} (${r.name}): forecast changed from ${r.fromForecast}${u} to ${r.toForecast}${u}.`);
    if (r.fromName !== r.name) lines.push(`Region ${r.code} renamed from ${r.fromName} to ${r.name}.`);
  }
  if (c.description) lines.push('Description changed.');
  return lines;
}
