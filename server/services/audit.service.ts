import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { AuditEntryView, AuditVerification } from '@shared/evaluation';
import { ROLE_LABELS, type Role } from '@shared/roles';
import { SEALED_TENDER_STATUSES } from '@shared/tenders';
import { formatInZone } from '@shared/time-zone';
import { AuditEntry, Tender, type User } from '../entities';
import { csvCell } from '../workbooks/spreadsheet-text';
import { auditNames, describeEntry } from './audit-words';
import { appendAuditEntry, auditEntryRows, lastAuditHash, lockAuditChain } from './queries/audit.queries';

/** The hash before the first entry of a tender's chain. */
export const GENESIS = '0'.repeat(64);

/** JSON with keys sorted at every level, so equal content always hashes the same. */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value ?? null);
  if (value instanceof Date) return JSON.stringify(value.toISOString());
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
}

export const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

/** The SHA-256 of a value's canonical JSON: how "before" and "after" states are recorded. */
export const digestOf = (value: unknown) => sha256(canonicalJson(value));

interface EntryContent {
  at: Date;
  tenderId: string | null;
  actorId: string | null;
  action: string;
  subject: string;
  detail: Record<string, unknown>;
  beforeDigest: string | null;
  afterDigest: string | null;
}

function entryHash(prevHash: string, c: EntryContent): string {
  return sha256(prevHash + canonicalJson({ ...c, at: c.at.toISOString() }));
}

export interface AuditInput {
  tenderId: string | null;
  actor: User | null;
  action: string;
  subject: string;
  detail?: Record<string, unknown>;
  before?: unknown;
  after?: unknown;
}

/**
 * The key of the transaction-scoped advisory lock that keeps a tender's chain linear (hashed with
 * PostgreSQL's `hashtext`). Every decision takes it last, just before it commits: the race tests hold
 * it from their own connection so that two racing decisions are both inside their transactions.
 */
export const auditLockKey = (tenderId: string | null) => `audit:${tenderId ?? 'global'}`;

/**
 * Appends an entry to the tender's chain, inside the caller's transaction (so the change and its
 * record commit together). A transaction-scoped advisory lock per tender keeps the chain linear
 * when two changes race.
 */
export async function audit(em: EntityManager, input: AuditInput): Promise<void> {
  await lockAuditChain(em, auditLockKey(input.tenderId));
  const prevHash = (await lastAuditHash(em, input.tenderId)) ?? GENESIS;
  const content: EntryContent = {
    at: new Date(),
    tenderId: input.tenderId,
    actorId: input.actor?.id ?? null,
    action: input.action,
    subject: input.subject,
    detail: input.detail ?? {},
    beforeDigest: input.before === undefined ? null : digestOf(input.before),
    afterDigest: input.after === undefined ? null : digestOf(input.after),
  };
  await appendAuditEntry(em, {
    at: content.at, tender_id: content.tenderId, actor_id: content.actorId, action: content.action, subject: content.subject,
    detail: content.detail, before_digest: content.beforeDigest, after_digest: content.afterDigest,
    prev_hash: prevHash, hash: entryHash(prevHash, content),
  });
}

/** A tender's trail, or with `null` the global one (administration: people, organisations, links). */
export async function auditTrail(em: EntityManager, tenderId: string | null): Promise<AuditEntryView[]> {
  const entries = await em.find(AuditEntry, { tender: tenderId }, { populate: ['actor'], orderBy: { seq: 'asc' } });
  const sealed = tenderId !== null && (await em.count(Tender, { id: tenderId, status: { $in: [...SEALED_TENDER_STATUSES] } })) > 0;
  const names = await auditNames(em, entries, sealed);
  return entries.map((e, i) => ({
    number: i + 1,
    seq: Number(e.seq),
    at: e.at.toISOString(),
    actor: e.actor ? { id: e.actor.id, name: e.actor.name, role: e.actor.role } : null,
    action: e.action,
    subject: e.subject,
    description: describeEntry(e, names),
    // Bid entries written before receipts were keyed (migration 20261202170000) carry the bid's
    // unsalted digest, which a reader could test guesses of the figures against: withheld while the
    // tender is sealed. The stored entry is unchanged, so the chain still verifies.
    detail: sealed && e.action.startsWith('bid.') ? withoutDigest(e.detail) : e.detail,
    beforeDigest: e.beforeDigest ?? null,
    afterDigest: e.afterDigest ?? null,
    hash: e.hash,
  }));
}

function withoutDigest(detail: Record<string, unknown>): Record<string, unknown> {
  const { digest: _withheld, ...rest } = detail;
  return rest;
}

/** Recomputes every hash of the tender's chain from the stored content. */
export async function verifyTrail(em: EntityManager, tenderId: string | null): Promise<AuditVerification> {
  const rows = await auditEntryRows(em, tenderId);
  let prev = GENESIS;
  for (const [i, r] of rows.entries()) {
    const expected = entryHash(prev, {
      at: new Date(r.at), tenderId: r.tender_id, actorId: r.actor_id, action: r.action, subject: r.subject,
      detail: r.detail, beforeDigest: r.before_digest, afterDigest: r.after_digest,
    });
    if (r.prev_hash !== prev || r.hash !== expected) {
      return { ok: false, entries: rows.length, brokenAt: i + 1, message: `Entry ${i + 1} does not match its recorded hash: the trail was changed after it was written.` };
    }
    prev = r.hash;
  }
  return { ok: true, entries: rows.length, brokenAt: null, message: `All ${rows.length} entries verify: each hash matches its content and the entry before it.` };
}

/** The trail as a spreadsheet-friendly CSV: readable columns first, the chain's technical fields last. */
export async function auditCsv(em: EntityManager, tenderId: string, timeZone: string): Promise<string> {
  const rows = await auditTrail(em, tenderId);
  const header = ['No.', `Time (${timeZone})`, 'Who', 'Role', 'What happened', 'Details', 'Time (UTC, ISO 8601)', 'Action code', 'Before digest', 'After digest', 'Hash'];
  const lines = [header.map(csvCell).join(',')];
  for (const r of rows) {
    lines.push([
      r.number, formatInZone(r.at, timeZone, { named: false, seconds: true }), r.actor?.name ?? 'System', r.actor ? ROLE_LABELS[r.actor.role as Role] ?? r.actor.role : '',
      r.description, detailText(r.detail), r.at, r.action, r.beforeDigest, r.afterDigest, r.hash,
    ].map(csvCell).join(','));
  }
  // A byte-order mark so spreadsheet programs read the file as UTF-8.
  return `\uFEFF${lines.join('\r\n')}\r\n`;
}

/** `key: value; key: value`, nested values as JSON: readable in a cell, nothing left out. */
function detailText(detail: Record<string, unknown>): string {
  return Object.entries(detail)
    .map(([key, value]) => `${key}: ${typeof value === 'string' ? value : JSON.stringify(value)}`)
    .join('; ');
}
