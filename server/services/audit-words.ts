import type { EntityManager } from '@mikro-orm/postgresql';
import { bidVendorNames, organisationNames, runScenarioNames, type NamedRow } from './queries/audit.queries';

/**
 * What an audit entry says, in the buyer's words ("Bid received from Kestrelway Haulage"), for the
 * trail on screen and its CSV. The stored entry keeps its action code and ids (they are what the hash
 * covers); names are looked up when the trail is read. Every action the server writes has a line
 * here: `spec/server/audit-words.spec.ts` scans the server's `audit(...)` calls and fails on one
 * without words.
 */
export interface AuditNames {
  /** Bid id → vendor organisation name; empty while the tender is sealed (who bid is not shown). */
  bidVendors: ReadonlyMap<string, string>;
  /** Run id → scenario name. */
  runScenarios: ReadonlyMap<string, string>;
  /** Organisation id → name. */
  organisations: ReadonlyMap<string, string>;
}

interface Entry {
  action: string;
  subject: string;
  detail: Record<string, unknown>;
}

type Words = (entry: Entry, names: AuditNames) => string;

const str = (value: unknown): string | null => (typeof value === 'string' && value.trim() ? value : null);
const num = (value: unknown): number | null => (typeof value === 'number' && Number.isFinite(value) ? value : null);
/** The id in a subject such as `bid 7f…` or `run 1c…`. */
const subjectId = (entry: Entry, kind: string): string | null =>
  entry.subject.startsWith(`${kind} `) ? entry.subject.slice(kind.length + 1) : null;

function bidVendor(entry: Entry, names: AuditNames): string | null {
  const id = subjectId(entry, 'bid');
  return str(entry.detail['vendor']) ?? (id ? names.bidVendors.get(id) ?? null : null);
}

/** "from Kestrelway Haulage" or nothing while the tender is sealed. */
const fromVendor = (entry: Entry, names: AuditNames) => {
  const vendor = bidVendor(entry, names);
  return vendor ? ` from ${vendor}` : '';
};

const revision = (entry: Entry) => {
  const r = num(entry.detail['revision']);
  return r ? ` (revision ${r})` : '';
};

function scenarioOf(entry: Entry, names: AuditNames): string {
  const id = subjectId(entry, 'run');
  const name = str(entry.detail['scenario']) ?? (id ? names.runScenarios.get(id) ?? null : null);
  return name ? ` of “${name}”` : '';
}

function person(entry: Entry): string {
  const name = str(entry.detail['name']);
  const email = str(entry.detail['email']);
  const org = (entry.detail['vendorOrganisation'] as { name?: unknown } | null | undefined)?.name;
  const who = name && email ? `${name} <${email}>` : name ?? email ?? 'a person';
  return typeof org === 'string' ? `${who}, ${org}` : who;
}

function organisation(value: unknown, names: AuditNames): string {
  if (typeof value === 'string') return names.organisations.get(value) ?? str(value) ?? 'a vendor';
  const name = (value as { name?: unknown } | null | undefined)?.name;
  return typeof name === 'string' ? name : 'a vendor';
}

const withReason = (text: string, entry: Entry) => {
  const reason = str(entry.detail['reason']) ?? str(entry.detail['note']) ?? str(entry.detail['comment']);
  return reason ? `${text}: ${reason}` : text;
};

export const AUDIT_WORDS: Readonly<Record<string, Words>> = {
  // The tender's procedure
  'tender.created': () => 'Tender created as a draft',
  'tender.updated': () => 'Tender details changed',
  'tender.published': () => 'Tender published and opened for bids',
  'tender.amended': (e) => withReason(`Amendment ${num(e.detail['number']) ?? ''} issued`.replace('  ', ' '), e),
  'tender.cancelled': (e) => withReason('Tender cancelled', e),
  'tender.closed': (e) => {
    const bids = num(e.detail['submittedBids']);
    return bids === null ? 'Bidding closed; bids opened' : `Bidding closed; ${bids} ${bids === 1 ? 'bid' : 'bids'} opened`;
  },
  'tender.notified': () => 'Every notice sent: bidders informed of the outcome',
  'tender.closure-days': () => 'Closure days for the standstill changed',
  'tender.contracted': (e) => {
    const n = num(e.detail['contracts']);
    return n === null ? 'Every contract recorded: the procedure is complete' : `Every contract recorded (${n}): the procedure is complete`;
  },
  'contract.recorded': (e, n) => {
    const id = subjectId(e, 'vendor');
    const vendor = id ? n.organisations.get(id) ?? null : null;
    const signed = str(e.detail['signedOn']);
    return `Contract${vendor ? ` with ${vendor}` : ''} recorded${signed ? `, signed on ${signed}` : ''}`;
  },
  'invitations.added': (e) => {
    const vendors = Array.isArray(e.detail['vendors']) ? (e.detail['vendors'] as unknown[]).filter((v) => typeof v === 'string') : [];
    return vendors.length ? `Invited ${vendors.join(', ')}` : 'Vendors invited';
  },
  'invitation.withdrawn': (e, n) => `Invitation of ${organisation(e.detail['vendorOrganisation'], n)} withdrawn`,
  'question.asked': (e) => {
    const org = str(e.detail['vendorOrganisation']);
    return org ? `Clarification question received from ${org}` : 'Clarification question received';
  },
  'question.answered': (e) => `Clarification ${num(e.detail['number']) ?? ''} answered and published to every invited vendor`.replace('  ', ' '),
  // Bids
  'bid.submitted': (e, n) => `Bid received${fromVendor(e, n)}${revision(e)}`,
  'bid.revised': (e, n) => `Revised bid received${fromVendor(e, n)}${revision(e)}`,
  'bid.withdrawn': (e, n) => `Bid withdrawn${fromVendor(e, n)}`,
  'bid.returned-to-draft': (e, n) => {
    const amendment = num(e.detail['amendment']);
    return `Bid${fromVendor(e, n)} returned to draft${amendment ? ` by amendment ${amendment}` : ''}`;
  },
  'bid.compliant': (e, n) => `Bid${fromVendor(e, n)} checked: compliant`,
  'bid.excluded': (e, n) => withReason(`Bid${fromVendor(e, n)} excluded${str(e.detail['ground']) ? ` (${str(e.detail['ground'])})` : ''}`, e),
  'bid.abnormally-low-accepted': (e, n) => withReason(`Explanation of an abnormally low price accepted${fromVendor(e, n)}`, e),
  'bid.abnormally-low-not-accepted': (e, n) => withReason(`Explanation of an abnormally low price not accepted${fromVendor(e, n)}`, e),
  'bid.validity-extended': (e, n) => `Bid validity extended${fromVendor(e, n)}`,
  // Evaluation and decisions
  'scenario.created': (e) => `Award scenario “${e.subject.replace(/^scenario /, '')}” created`,
  'scenario.updated': (e) => `Award scenario “${e.subject.replace(/^scenario /, '')}” changed`,
  'run.queued': (e, n) => `Award calculation${scenarioOf(e, n)} started`,
  'run.resilience-queued': (e, n) => {
    const dropped = e.detail['droppedVendor'];
    return `Drop-out check${scenarioOf(e, n)} started${dropped ? ` without ${organisation(dropped, n)}` : ''}`;
  },
  'run.sensitivity-queued': (e, n) => {
    const change = num(e.detail['forecastChangePercent']);
    const region = str(e.detail['scaledRegion']);
    const what = change === null ? '' : ` at ${change > 0 ? '+' : change < 0 ? '−' : ''}${Math.abs(change)} %${region ? ` for region ${region}` : ''}`;
    return `Forecast check${scenarioOf(e, n)}${what} started`;
  },
  'run.explanation-queued': (e, n) => `Explanation of the award${scenarioOf(e, n)} requested`,
  'run.explained': (e, n) => `Explanation of the award${scenarioOf(e, n)} worked out`,
  'run.debrief-queued': (e, n) => `Debrief of ${organisation(e.detail['vendorOrganisation'], n)} on the award${scenarioOf(e, n)} requested`,
  'run.region-check-queued': (e, n) => `Exact figure for region ${str(e.detail['region']) ?? '?'} of the award${scenarioOf(e, n)} requested`,
  'run.region-checked': (e, n) => `Exact figure for region ${str(e.detail['region']) ?? '?'} of the award${scenarioOf(e, n)} worked out${e.detail['exact'] === false ? ' (still a range: not proven within the time limit)' : ''}`,
  'run.debriefed': (e, n) => `Debrief of ${organisation(e.detail['vendorOrganisation'], n)} on the award${scenarioOf(e, n)} worked out`,
  'run.finished': (e, n) => `Award calculation${scenarioOf(e, n)} finished`,
  'run.cancelled': (e, n) => `Award calculation${scenarioOf(e, n)} cancelled`,
  'recommendation.made': (e) => withReason('Award recommended for approval', { ...e, detail: { reason: e.detail['justification'] } }),
  'recommendation.approved': (e) => withReason('Recommendation approved', e),
  'recommendation.returned': (e) => withReason('Recommendation returned to the buyer', e),
  'notices.queued': (e) => {
    const counts = ['award', 'regret', 'exclusion']
      .map((kind) => [num(e.detail[kind]) ?? 0, kind] as const)
      .filter(([count]) => count > 0)
      .map(([count, word]) => `${count} ${word} ${count === 1 ? 'notice' : 'notices'}`);
    return counts.length ? `Notices queued for sending: ${counts.join(', ')}` : 'Notices queued for sending';
  },
  // People and organisations (the administration trail)
  'person.invited': (e) => `Invited ${person(e)}`,
  'membership.requested': (e) => `Asked the firm to accept ${person(e)}`,
  'membership.approved': (e) => `Firm accepted ${person(e)}`,
  'membership.refused': (e) => `Firm refused ${person(e)}`,
  'invitation.resent': (e) => `Invitation link sent again to ${person(e)}`,
  'password.reset-sent': (e) => `Password reset link sent to ${person(e)}`,
  'password.set': (e) => `Password set by ${person(e)}`,
  'password.reset': (e) => `Password reset by ${person(e)}`,
  'person.deactivated': (e) => `Deactivated ${person(e)}`,
  'person.reactivated': (e) => `Reactivated ${person(e)}`,
  'notification-settings.changed': (e) => `${person(e)} turned closing reminders ${e.detail['closingReminders'] === false ? 'off' : 'on'} and updates on recommendations ${e.detail['decisionUpdates'] === false ? 'off' : 'on'}`,
  'organisation.registered': (e) => `Vendor organisation ${str(e.detail['name']) ?? ''} registered`.replace('  ', ' '),
};

/** The entry in words; an action without words (never expected, see the spec) reads as its code. */
export function describeEntry(entry: Entry, names: AuditNames): string {
  const words = AUDIT_WORDS[entry.action];
  return words ? words(entry, names) : `${entry.action} (${entry.subject})`;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const ids = (entries: readonly Entry[], kind: string) =>
  [...new Set(entries.map((e) => subjectId(e, kind)).filter((id): id is string => !!id && UUID.test(id)))];

/** Looks up the names the entries refer to, in three queries whatever the trail's length. */
export async function auditNames(em: EntityManager, entries: readonly Entry[], sealed: boolean): Promise<AuditNames> {
  const bidIds = sealed ? [] : ids(entries, 'bid');
  const runIds = ids(entries, 'run');
  const orgIds = [...new Set(entries.flatMap((e) => [e.detail['vendorOrganisation'], e.detail['droppedVendor'], subjectId(e, 'vendor')])
    .filter((v): v is string => typeof v === 'string' && UUID.test(v)))];
  const [bids, runs, orgs] = [await bidVendorNames(em, bidIds), await runScenarioNames(em, runIds), await organisationNames(em, orgIds)];
  const map = (rows: readonly NamedRow[]) => new Map(rows.map((r) => [r.id, r.name]));
  return { bidVendors: map(bids), runScenarios: map(runs), organisations: map(orgs) };
}
