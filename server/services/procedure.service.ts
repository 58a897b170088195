import type { EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { RegionInput } from '@shared/bids';
import {
  describeChanges, type AmendmentChanges, type AmendmentInput, type AnswerInput, type CancelInput, type QuestionInput, type QuestionView,
} from '@shared/procedure';
import { statusesBefore, type TenderView } from '@shared/tenders';
import { formatInZone } from '@shared/time-zone';
import { Amendment, Question, Region, Tender, type User } from '../entities';
import { ConflictError, NotFoundError, ValidationError } from '../http/errors';
import { QUEUES } from '../jobs/queue';
import { renderMail } from '../mail/templates';
import { audit } from './audit.service';
import { sendAfterCommit } from './people.service';
import { CLOSING_GRACE_MS, findVisibleTender, lockTender } from './tender-access';
import { clarificationsCloseAt, tenderView } from './tenders.service';
import { transition } from './transition';
import { notifyOnce } from './notifications/notify';
import { markSeen } from './worklist.service';
import {
  bidOrganisations, invitedPeopleRows, keepRemovedPrices, lastAmendmentNumber, nextAnswerNumber, returnSubmittedBidsToDraft, setAmendmentNote,
} from './queries/procedure.queries';
import { tenderForShare } from './queries/tender-rows.queries';

/**
 * The procedure between publication and closing (DEVELOPERS.md, "Clarifications, amendments,
 * cancellation"): vendors' questions and the buyer's published answers, numbered amendments of an
 * open tender, and cancellation before closing. Every change holds the tender's lock
 * (`lockTender`, or FOR SHARE for a vendor's question), is audited in its transaction, and e-mails
 * only what it committed: published answers and amendments queue their notices in the transaction,
 * once per person (notifications/notify.ts); the rest after the commit.
 */
export interface ProcedureDeps {
  em: EntityManager;
  boss: PgBoss;
  publicUrl: string;
  /** When the request arrived in full (http/arrival.ts): deadlines are judged by it, as bids are. */
  arrivedAt: Date;
}


/** Every approved, active person of every organisation invited to the tender. */
async function invitedPeople(em: EntityManager, tenderId: string): Promise<{ id: string; email: string; name: string; organisation: string; organisationId: string }[]> {
  const rows = await invitedPeopleRows(em, tenderId);
  return rows.map((r) => ({ id: r.id, email: r.email, name: r.name, organisation: r.organisation, organisationId: r.organisation_id }));
}

// ——— Clarifications ———

function questionView(q: Question, reader: User): QuestionView {
  const view: QuestionView = {
    id: q.id,
    number: q.number ?? null,
    status: q.status,
    question: q.text,
    answer: q.answer ?? null,
    askedAt: q.createdAt.toISOString(),
    answeredAt: q.answeredAt?.toISOString() ?? null,
  };
  if (reader.role === 'vendor') view.mine = q.vendorOrganisation.id === reader.vendorOrganisation?.id;
  else view.askedBy = { organisation: q.vendorOrganisation.name, name: q.askedBy.name };
  return view;
}

/** A vendor's question, before the clarification deadline of an open tender it was invited to. */
export async function askQuestion(deps: ProcedureDeps, user: User, tenderId: string, input: QuestionInput): Promise<QuestionView> {
  const { em } = deps;
  const visible = await findVisibleTender(em, user, tenderId);
  const id = await em.transactional(async (tx) => {
    // FOR SHARE, as a bid: a cancellation or amendment (FOR NO KEY UPDATE) waits for it, and it for them.
    const row = await tenderForShare(tx, tenderId);
    if (!row || row.status !== 'open' || deps.arrivedAt.getTime() >= new Date(row.closes_at).getTime()) {
      throw new ConflictError('Questions can be asked only while the tender is open for bids.');
    }
    const tender = await tx.findOneOrFail(Tender, { id: tenderId });
    const deadline = clarificationsCloseAt(tender);
    if (deps.arrivedAt.getTime() >= deadline.getTime()) {
      throw new ConflictError(`The clarification deadline was ${formatInZone(deadline, tender.timeZone)}: questions can no longer be asked on this tender.`);
    }
    const q = tx.create(Question, { tender: visible.id, vendorOrganisation: user.vendorOrganisation!, askedBy: user, text: input.text });
    await tx.flush();
    await audit(tx, { tenderId, actor: user, action: 'question.asked', subject: `question ${q.id}`, detail: { vendorOrganisation: user.vendorOrganisation!.name } });
    return q.id;
  });
  const saved = await em.fork().findOneOrFail(Question, { id }, { populate: ['vendorOrganisation', 'askedBy', 'tender.createdBy'] });
  // The buyer who owns the tender is told at once (the asker's name is for the buyer only).
  const owner = saved.tender.createdBy;
  if (owner.active) {
    await sendAfterCommit(deps.boss, [{
      to: owner.email,
      ...renderMail('question-asked', `New clarification question on tender ${saved.tender.reference}`, {
        name: owner.name, organisation: saved.vendorOrganisation.name, reference: saved.tender.reference, title: saved.tender.title,
        question: saved.text, link: `${deps.publicUrl}/tenders/${tenderId}`,
      }),
    }]);
  }
  return questionView(saved, user);
}

/**
 * Vendors: the answered questions, numbered, without the asker, and their own organisation's
 * questions that await an answer. Buyer (its own tenders), compliance and admin: all, with the asker.
 */
export async function listQuestions(em: EntityManager, user: User, tenderId: string): Promise<QuestionView[]> {
  const seenAt = new Date();
  const tender = await findVisibleTender(em, user, tenderId);
  // The vendor's worklist counts answers published after this read as new.
  if (user.role === 'vendor') await markSeen(em, user, tender.id, 'clarifications', seenAt);
  const where = user.role === 'vendor'
    ? { tender, $or: [{ status: 'answered' as const }, { vendorOrganisation: user.vendorOrganisation! }] }
    : { tender };
  const questions = await em.find(Question, where, { populate: ['vendorOrganisation', 'askedBy'], orderBy: { number: 'asc nulls last', createdAt: 'asc' } });
  return questions.map((q) => questionView(q, user));
}

/** The buyer answers once; the question and answer are then published, numbered, to every invited vendor. */
export async function answerQuestion(deps: ProcedureDeps, user: User, questionId: string, input: AnswerInput): Promise<QuestionView> {
  const { em } = deps;
  const found = await em.findOne(Question, { id: questionId }, { populate: ['tender'] });
  if (!found) throw new NotFoundError('The question');
  const tenderId = found.tender.id;
  const tender = found.tender;
  await em.transactional(async (tx) => {
    await lockTender(tx, user, tenderId, ['open'], 'Questions can be answered only while the tender is open for bids.');
    const number = await nextAnswerNumber(tx, tenderId);
    await transition(tx, Question, questionId, ['asked'], { status: 'answered', number, answer: input.text, answeredAt: deps.arrivedAt, answeredBy: user.id },
      'This question is already answered; its answer is published.');
    await audit(tx, { tenderId, actor: user, action: 'question.answered', subject: `question ${questionId}`, detail: { number } });
    // A legal notice: every invited vendor, once (notifications/notify.ts), queued with the answer.
    await notifyOnce(tx, deps.boss, {
      kind: 'clarification-answered', subjectId: questionId, tenderId, recipients: await invitedPeople(tx, tenderId),
      render: (p) => renderMail('clarification', `Clarification ${number} on tender ${tender.reference}`, {
        name: p.name, reference: tender.reference, title: tender.title, number,
        question: found.text, answer: input.text, link: `${deps.publicUrl}/tenders/${tenderId}`,
      }),
    });
  });
  const saved = await em.fork().findOneOrFail(Question, { id: questionId }, { populate: ['vendorOrganisation', 'askedBy'] });
  return questionView(saved, user);
}

// ——— Amendments ———

/** What the new region list changes: added, removed (by code) and renamed or re-forecast regions. */
function regionChanges(current: Region[], next: RegionInput[]): Pick<AmendmentChanges, 'regionsAdded' | 'regionsRemoved' | 'regionsChanged'> {
  const byCode = new Map(current.map((r) => [r.code, r]));
  const nextCodes = new Set(next.map((r) => r.code));
  const added = next.filter((r) => !byCode.has(r.code)).map((r) => ({ code: r.code, name: r.name, forecast: r.forecast }));
  const removed = current.filter((r) => !nextCodes.has(r.code)).map((r) => ({ code: r.code, name: r.name, forecast: r.forecast }));
  const changed = next.flatMap((r) => {
    const was = byCode.get(r.code);
    return was && (was.name !== r.name || was.forecast !== r.forecast)
      ? [{ code: r.code, name: r.name, fromName: was.name, fromForecast: was.forecast, toForecast: r.forecast }]
      : [];
  });
  return {
    ...(added.length ? { regionsAdded: added } : {}),
    ...(removed.length ? { regionsRemoved: removed } : {}),
    ...(changed.length ? { regionsChanged: changed } : {}),
  };
}

/** `value` is a whole multiple of `step` (to 1e-9 of a step: forecasts have at most 4 decimals). */
function isWholeMultiple(value: number, step: number): boolean {
  const ratio = value / step;
  return Math.abs(ratio - Math.round(ratio)) < 1e-9;
}

const names = (regions: { code: string; name: string }[]) => regions.map((r) => `${r.code} (${r.name})`).join(', ');

/**
 * Amendment N of an open tender: extends the closing time (never shortens it), changes the
 * description, forecasts, or adds and removes regions. Bids:
 * - a region added: every submitted bid lacks its price, so it returns to draft with a note, and
 *   its vendor is e-mailed to price it and submit again (declining the region stays allowed);
 * - a region removed: its price is moved to `bid_removed_line` (kept with the receipt that commits
 *   to it, shown apart in the tabulation, never evaluated); the bid stays submitted, with a note.
 */
export async function issueAmendment(deps: ProcedureDeps, user: User, tenderId: string, input: AmendmentInput): Promise<{ number: number }> {
  const { em } = deps;
  const result = await em.transactional(async (tx) => {
    await lockTender(tx, user, tenderId, ['open'], 'Amendments can be issued only while the tender is open for bids.');
    const t = await tx.findOneOrFail(Tender, { id: tenderId }, { populate: ['regions'] });
    if (deps.arrivedAt.getTime() >= t.closesAt.getTime()) {
      throw new ConflictError(`Bidding closed at ${formatInZone(t.closesAt, t.timeZone)}: the tender can no longer be amended.`);
    }
    const changes: AmendmentChanges = {};
    if (input.closesAt !== undefined) {
      const closesAt = new Date(input.closesAt);
      if (closesAt.getTime() <= t.closesAt.getTime()) {
        throw new ValidationError([{ field: 'closesAt', message: `An amendment can only extend the closing time: choose a time after ${formatInZone(t.closesAt, t.timeZone)}.` }]);
      }
      changes.closesAt = { from: t.closesAt.toISOString(), to: closesAt.toISOString() };
    }
    if (input.description !== undefined && input.description !== t.description) changes.description = { from: t.description, to: input.description };
    const regions = t.regions.getItems();
    const increment = t.awardBasis.awardIncrement;
    if (input.regions && increment) {
      // The published award increment stays: every forecast must remain a whole multiple of it.
      const off = input.regions.flatMap((r, i) => (isWholeMultiple(r.forecast, increment) ? [] : [{
        field: `regions[${i}].forecast`, message: `Forecast must be a whole multiple of the award increment (${increment} ${t.unit}).`,
      }]));
      if (off.length) throw new ValidationError(off);
    }
    if (input.regions) Object.assign(changes, regionChanges(regions, input.regions));
    if (!Object.keys(changes).length) {
      throw new ValidationError([{ field: 'changes', message: 'This amendment changes nothing: extend the closing time, change the description or change the regions.' }]);
    }
    const number = (await lastAmendmentNumber(tx, tenderId)) + 1;
    const before = { closesAt: t.closesAt.toISOString(), description: t.description, regions: regions.map((r) => ({ code: r.code, name: r.name, forecast: r.forecast })) };

    const notes = new Map<string, string>();
    const returned: string[] = [];
    if (changes.regionsRemoved) {
      const removed = regions.filter((r) => changes.regionsRemoved!.some((x) => x.code === r.code));
      // Every price given for a removed region is kept, with its code and name, before the region
      // (and by cascade its bid lines) goes: a receipt commits to it (DEVELOPERS.md, "Sealed bids").
      const priced = await keepRemovedPrices(tx, number, removed.map((r) => r.id));
      for (const p of priced.filter((x) => x.status === 'submitted' || x.status === 'revised')) {
        const gone = changes.regionsRemoved.filter((r) => p.codes.includes(r.code));
        notes.set(p.bid_id, `Amendment ${number} removed ${gone.length === 1 ? 'region' : 'regions'} ${names(gone)}: your ${gone.length === 1 ? 'price for it is' : 'prices for them are'} kept with your receipt and will not be evaluated. Your bid stays submitted.`);
      }
      await tx.nativeDelete(Region, { id: { $in: removed.map((r) => r.id) } });
      if (t.awardBasis.soleRegions?.some((code) => removed.some((r) => r.code === code))) {
        t.awardBasis = { ...t.awardBasis, soleRegions: t.awardBasis.soleRegions.filter((code) => !removed.some((r) => r.code === code)) };
      }
    }
    if (changes.regionsAdded) {
      const added = changes.regionsAdded;
      const note = `Amendment ${number} added ${added.length === 1 ? 'region' : 'regions'} ${names(added)}: add your ${added.length === 1 ? 'price' : 'prices'} (or leave ${added.length === 1 ? 'it' : 'them'} unpriced to decline) and submit again. Until you do, your bid is a draft and will not be opened.`;
      // Guarded by the tender's lock: a bid being saved holds it FOR SHARE, so none is in flight.
      const rows = await returnSubmittedBidsToDraft(tx, tenderId);
      for (const r of rows) {
        // As every bid entry: which bid and its revision, never its vendor or figures (the trail is read before closing).
        await audit(tx, { tenderId, actor: user, action: 'bid.returned-to-draft', subject: `bid ${r.id}`, detail: { revision: r.revision, amendment: number } });
        returned.push(r.id);
        notes.set(r.id, notes.has(r.id) ? `${note} ${notes.get(r.id)!.replace(' Your bid stays submitted.', '')}` : note);
      }
    }
    for (const [bidId, note] of notes) await setAmendmentNote(tx, bidId, note);

    if (input.regions) {
      const kept = new Map(regions.filter((r) => !changes.regionsRemoved?.some((x) => x.code === r.code)).map((r) => [r.code, r]));
      input.regions.forEach((r, position) => {
        const existing = kept.get(r.code);
        if (existing) tx.assign(existing, { name: r.name, forecast: r.forecast, position });
        else tx.create(Region, { tender: t, code: r.code, name: r.name, forecast: r.forecast, position });
      });
    }
    if (changes.closesAt) t.closesAt = new Date(changes.closesAt.to);
    if (changes.description) t.description = changes.description.to;
    const amendment = tx.create(Amendment, { tender: t, number, reason: input.reason, changes, issuedBy: user });
    await tx.flush();
    const after = { closesAt: t.closesAt.toISOString(), description: t.description, regions: input.regions ?? before.regions };
    await audit(tx, {
      tenderId, actor: user, action: 'tender.amended', subject: 'tender',
      detail: { number, reason: input.reason, changes, bidsReturnedToDraft: returned.length }, before, after,
    });
    await notifyAmendment(deps, tx, { tenderId, amendmentId: amendment.id, number, reason: input.reason, tender: t, changes, returned });
    return { number, tender: t, changes };
  });

  const { number, tender, changes } = result;
  if (changes.closesAt) {
    // Closing decides by the stored closing time (tender-access.ts): the job queued at publication
    // finds the tender not yet due and leaves it open; this one, for the new time, closes it.
    await deps.boss.send(QUEUES.tenderClose, { tenderId }, { startAfter: new Date(tender.closesAt.getTime() + CLOSING_GRACE_MS), singletonKey: `close-${tenderId}-amendment-${number}` });
  }
  return { number };
}

/**
 * The amendment's legal notices, in its transaction, once each (notifications/notify.ts): every
 * invited vendor gets the amendment; the people of each organisation whose bid it returned to
 * draft are also asked to submit again.
 */
async function notifyAmendment(
  deps: ProcedureDeps, tx: EntityManager,
  a: { tenderId: string; amendmentId: string; number: number; reason: string; tender: Tender; changes: AmendmentChanges; returned: string[] },
): Promise<void> {
  const { tender, number } = a;
  const lines = describeChanges(a.changes, tender.unit, tender.timeZone);
  const people = await invitedPeople(tx, a.tenderId);
  const byId = new Map(people.map((p) => [p.id, p]));
  const link = `${deps.publicUrl}/tenders/${a.tenderId}`;
  await notifyOnce(tx, deps.boss, {
    kind: 'amendment-issued', subjectId: a.amendmentId, tenderId: a.tenderId, recipients: people,
    render: (r) => renderMail('amendment', `Amendment ${number} to tender ${tender.reference}`, {
      name: r.name, organisation: byId.get(r.id)!.organisation, reference: tender.reference, title: tender.title, number,
      reason: a.reason, changes: lines, closesAt: tender.closesAt, timeZone: tender.timeZone, link,
    }),
  });
  if (!a.returned.length) return;
  const affected = new Set(await bidOrganisations(tx, a.returned));
  await notifyOnce(tx, deps.boss, {
    kind: 'bid-resubmit', subjectId: a.amendmentId, tenderId: a.tenderId, recipients: people.filter((x) => affected.has(x.organisationId)),
    render: (r) => renderMail('bid-resubmit', `Submit your bid on ${tender.reference} again: amendment ${number}`, {
      name: r.name, organisation: byId.get(r.id)!.organisation, reference: tender.reference, title: tender.title, number,
      added: names(a.changes.regionsAdded ?? []), closesAt: tender.closesAt, timeZone: tender.timeZone, link,
    }),
  });
}

// ——— Cancellation ———

/**
 * Ends the procedure before closing (draft or open): status `cancelled`, with the reason. The close
 * job only ever closes an open tender, so it never opens a cancelled one, and bids stay sealed
 * (bids.service: `isSealed`). Invited vendors of a published tender are told why.
 */
export async function cancelTender(deps: ProcedureDeps, user: User, tenderId: string, input: CancelInput): Promise<TenderView> {
  const { em } = deps;
  const conflict = 'Only a draft or open tender can be cancelled; this one has closed.';
  const was = await em.transactional(async (tx) => {
    const locked = await lockTender(tx, user, tenderId, statusesBefore('cancelled'), conflict);
    const t = await tx.findOneOrFail(Tender, { id: tenderId });
    if (locked.status === 'open' && deps.arrivedAt.getTime() >= t.closesAt.getTime()) {
      throw new ConflictError(`Bidding closed at ${formatInZone(t.closesAt, t.timeZone)}: the tender can no longer be cancelled.`);
    }
    await transition(tx, Tender, tenderId, [locked.status], { status: 'cancelled', cancelledAt: deps.arrivedAt, cancellationReason: input.reason }, conflict);
    await audit(tx, {
      tenderId, actor: user, action: 'tender.cancelled', subject: 'tender',
      detail: { reason: input.reason }, before: { status: locked.status }, after: { status: 'cancelled' },
    });
    return { status: locked.status, reference: t.reference, title: t.title };
  });
  if (was.status === 'open') {
    const people = await invitedPeople(em, tenderId);
    await sendAfterCommit(deps.boss, people.map((p) => ({
      to: p.email,
      ...renderMail('tender-cancelled', `Tender ${was.reference} is cancelled`, {
        name: p.name, organisation: p.organisation, reference: was.reference, title: was.title, reason: input.reason,
        link: `${deps.publicUrl}/tenders/${tenderId}`,
      }),
    })));
  }
  return tenderView(em.fork(), user, tenderId);
}

