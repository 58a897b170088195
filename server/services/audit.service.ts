import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Pool } from 'pg';
import type { AuditEntryView, AuditVerification } from '@shared/evaluation';
import { ROLE_LABELS, type Role } from '@shared/roles';
import { SEALED_TENDER_STATUSES } from '@shared/tenders';
import { formatInZone } from '@shared/time-zone';
import { AuditEntry, Tender, type User } from '../entities';
import { csvCell } from '../workbooks/spreadsheet-text';
import { auditNames, describeEntry } from './audit-words';
import { inPoolTransaction } from './queries/transaction.queries';
import {
  appendAuditEntriesOn, appendAuditEntry, auditEntryRows, lastAuditHash, lastAuditHashOn, lockAuditChain, lockAuditChainOn, type NewAuditEntry,
} from './queries/audit.queries';

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

/** What an entry records, stamped now; `actorId` rather than a User where no entity is at hand. */
function entryContent(input: AuditInput | PoolAuditInput): EntryContent {
  return {
    at: new Date(),
    tenderId: input.tenderId,
    actorId: 'actorId' in input ? input.actorId : input.actor?.id ?? null,
    action: input.action,
    subject: input.subject,
    detail: input.detail ?? {},
    beforeDigest: input.before === undefined ? null : digestOf(input.before),
    afterDigest: input.after === undefined ? null : digestOf(input.after),
  };
}

/** Entries as stored, each chained to the one before, the first to `prevHash`: the one place a chain is extended. */
function chainEntries(prevHash: string, contents: readonly EntryContent[]): NewAuditEntry[] {
  let prev = prevHash;
  return contents.map((c) => {
    const hash = entryHash(prev, c);
    const entry: NewAuditEntry = {
      at: c.at, tender_id: c.tenderId, actor_id: c.actorId, action: c.action, subject: c.subject,
      detail: c.detail, before_digest: c.beforeDigest, after_digest: c.afterDigest, prev_hash: prev, hash,
    };
    prev = hash;
    return entry;
  });
}

/**
 * Appends an entry to the tender's chain, inside the caller's transaction (so the change and its
 * record commit together). A transaction-scoped advisory lock per tender keeps the chain linear
 * when two changes race.
 */
export async function audit(em: EntityManager, input: AuditInput): Promise<void> {
  await lockAuditChain(em, auditLockKey(input.tenderId));
  const prevHash = (await lastAuditHash(em, input.tenderId)) ?? GENESIS;
  const [entry] = chainEntries(prevHash, [entryContent(input)]);
  await appendAuditEntry(em, entry);
}

/** An entry written by `auditOnPool`: as `AuditInput`, with the actor's id. */
export interface PoolAuditInput extends Omit<AuditInput, 'actor'> {
  actorId: string | null;
}

interface Waiting {
  content: EntryContent;
  done: (error?: Error) => void;
}

/** Per pool (one per database) and chain, the entries waiting for the batch being written to commit (this process only). */
const waitingByPool = new WeakMap<Pool, Map<string, Waiting[]>>();

/** Most entries in one batch (10 parameters each). */
const BATCH_MAX = 500;

/**
 * Appends an entry to a chain in a transaction of its own on the plain pg pool, and resolves once it
 * has committed: for records that follow their change's commit (a bid's, `auditBid` in
 * bids.service.ts). Entries of one chain that arrive while a batch is being written wait and go
 * together in the next one (group commit): one transaction takes the chain's lock, reads the last
 * hash, chains the batch (`chainEntries`, as `audit` does) and inserts it in one statement. At a
 * deadline rush the chain's lock is then taken once per batch rather than once per bid, and held for
 * two statements and the commit. The lock still keeps the chain linear against `audit()` and other
 * processes.
 */
export function auditOnPool(pool: Pool, input: PoolAuditInput): Promise<void> {
  const key = auditLockKey(input.tenderId);
  return new Promise<void>((resolve, reject) => {
    const entry: Waiting = { content: entryContent(input), done: (error) => (error ? reject(error) : resolve()) };
    let chains = waitingByPool.get(pool);
    if (!chains) waitingByPool.set(pool, (chains = new Map<string, Waiting[]>()));
    const waiting = chains.get(key);
    if (waiting) {
      waiting.push(entry);
      return;
    }
    chains.set(key, [entry]);
    void writeBatches(pool, chains, key, input.tenderId);
  });
}

/** Writes the chain's waiting entries batch after batch until none waits. */
async function writeBatches(pool: Pool, chains: Map<string, Waiting[]>, key: string, tenderId: string | null): Promise<void> {
  for (;;) {
    const waiting = chains.get(key)!;
    if (!waiting.length) {
      chains.delete(key);
      return;
    }
    const batch = waiting.splice(0, BATCH_MAX);
    try {
      await appendBatch(pool, key, tenderId, batch.map((w) => w.content));
      for (const w of batch) w.done();
    } catch (error) {
      if (batch.length === 1) batch[0].done(error instanceof Error ? error : new Error('The audit entry was not written.'));
      // One entry PostgreSQL refuses must not fail the others: each is tried again on its own.
      else for (const w of batch) await appendBatch(pool, key, tenderId, [w.content]).then(() => w.done(), (e: unknown) => w.done(e instanceof Error ? e : new Error(String(e))));
    }
  }
}

async function appendBatch(pool: Pool, key: string, tenderId: string | null, contents: readonly EntryContent[]): Promise<void> {
  await inPoolTransaction(pool, async (client) => {
    await lockAuditChainOn(client, key);
    const prevHash = (await lastAuditHashOn(client, tenderId)) ?? GENESIS;
    await appendAuditEntriesOn(client, chainEntries(prevHash, contents));
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
