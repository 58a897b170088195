import type { EntityManager } from '@mikro-orm/postgresql';
import type { ClientBase } from 'pg';
import { uuidArray } from '../sql';

/** The columns of one stored audit entry, as PostgreSQL sends them (`verifyTrail` rehashes them). */
export interface AuditEntryRow {
  seq: string;
  at: Date;
  tender_id: string | null;
  actor_id: string | null;
  action: string;
  subject: string;
  detail: Record<string, unknown>;
  before_digest: string | null;
  after_digest: string | null;
  prev_hash: string;
  hash: string;
}

/** What `appendAuditEntry` stores: the entry's content with the hash of the one before and its own. */
export type NewAuditEntry = Omit<AuditEntryRow, 'seq'>;

/** An id with the name a trail shows for it (a bid's vendor, a run's scenario, an organisation). */
export interface NamedRow {
  id: string;
  name: string;
}

/**
 * Holds the chain of one tender (or the global chain) until the caller's transaction ends, so two
 * entries written at once cannot both follow the same one.
 */
export async function lockAuditChain(em: EntityManager, key: string): Promise<void> {
  await em.execute(`select pg_advisory_xact_lock(hashtext(?))`, [key]);
}

/** The hash of the chain's last entry, or null for an empty chain. */
export async function lastAuditHash(em: EntityManager, tenderId: string | null): Promise<string | null> {
  const rows = await em.execute<{ hash: string }[]>(
    tenderId
      ? `select hash from audit_entry where tender_id = ? order by seq desc limit 1`
      : `select hash from audit_entry where tender_id is null order by seq desc limit 1`,
    tenderId ? [tenderId] : [],
  );
  return rows[0]?.hash ?? null;
}

export async function appendAuditEntry(em: EntityManager, e: NewAuditEntry): Promise<void> {
  await em.execute(
    `insert into audit_entry (at, tender_id, actor_id, action, subject, detail, before_digest, after_digest, prev_hash, hash)
     values (?, ?, ?, ?, ?, ?::jsonb, ?, ?, ?, ?)`,
    [e.at, e.tender_id, e.actor_id, e.action, e.subject, JSON.stringify(e.detail), e.before_digest, e.after_digest, e.prev_hash, e.hash],
  );
}

/**
 * On a plain pg client (the bid save's appender, audit.service.ts `auditOnPool`), in one statement:
 * waits for the chain's lock (as `lockAuditChain`), taken until the client's transaction ends.
 */
export async function lockAuditChainOn(client: ClientBase, key: string): Promise<void> {
  await client.query({ name: 'audit-lock-chain', text: 'select pg_advisory_xact_lock(hashtext($1))', values: [key] });
}

/** As `lastAuditHash`, on a plain pg client; a statement of its own, so its snapshot is taken under the lock. */
export async function lastAuditHashOn(client: ClientBase, tenderId: string | null): Promise<string | null> {
  // Two texts, so each uses the (tender_id, seq) index.
  const { rows } = await client.query<{ hash: string }>(tenderId
    ? { name: 'audit-last-hash', text: 'select hash from audit_entry where tender_id = $1 order by seq desc limit 1', values: [tenderId] }
    : { name: 'audit-last-hash-global', text: 'select hash from audit_entry where tender_id is null order by seq desc limit 1' });
  return rows[0]?.hash ?? null;
}

/**
 * Several entries of one chain in one statement, on a plain pg client: one row per entry in the
 * order given (a VALUES list is inserted in its order, so `seq` follows the chain).
 */
export async function appendAuditEntriesOn(client: ClientBase, entries: readonly NewAuditEntry[]): Promise<void> {
  if (!entries.length) return;
  const values: unknown[] = [];
  const tuples = entries.map((e) => {
    const at = values.length;
    values.push(e.at, e.tender_id, e.actor_id, e.action, e.subject, JSON.stringify(e.detail), e.before_digest, e.after_digest, e.prev_hash, e.hash);
    return `($${at + 1}::timestamptz, $${at + 2}::uuid, $${at + 3}::uuid, $${at + 4}, $${at + 5}, $${at + 6}::jsonb, $${at + 7}, $${at + 8}, $${at + 9}, $${at + 10})`;
  });
  await client.query(
    `insert into audit_entry (at, tender_id, actor_id, action, subject, detail, before_digest, after_digest, prev_hash, hash) values ${tuples.join(', ')}`,
    values,
  );
}

/** Every stored entry of a tender's chain (or with `null` the global one), in the order written. */
export async function auditEntryRows(em: EntityManager, tenderId: string | null): Promise<AuditEntryRow[]> {
  return em.execute<AuditEntryRow[]>(`select * from audit_entry where tender_id is not distinct from ?::uuid order by seq`, [tenderId]);
}

/** Bid id → the name of the bidding organisation. */
export async function bidVendorNames(em: EntityManager, bidIds: readonly string[]): Promise<NamedRow[]> {
  if (!bidIds.length) return [];
  return em.execute<NamedRow[]>(
    `select b.id, o.name from bid b join vendor_organisation o on o.id = b.vendor_organisation_id where b.id = any(?::uuid[])`, [uuidArray(bidIds)]);
}

/** Run id → the name of its scenario. */
export async function runScenarioNames(em: EntityManager, runIds: readonly string[]): Promise<NamedRow[]> {
  if (!runIds.length) return [];
  return em.execute<NamedRow[]>(`select r.id, s.name from run r join scenario s on s.id = r.scenario_id where r.id = any(?::uuid[])`, [uuidArray(runIds)]);
}

/** Organisation id → its name. */
export async function organisationNames(em: EntityManager, orgIds: readonly string[]): Promise<NamedRow[]> {
  if (!orgIds.length) return [];
  return em.execute<NamedRow[]>(`select id, name from vendor_organisation where id = any(?::uuid[])`, [uuidArray(orgIds)]);
}
