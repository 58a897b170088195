import { AuditEntry } from '../../server/entities';
import { audit, auditOnPool, verifyTrail } from '../../server/services/audit.service';
import { startTestApp, type TestApp } from '../support/app';

/**
 * `auditOnPool` (audit.service.ts) writes the entries that follow their change's commit (a bid's) in
 * batches per chain on the plain pg pool, while `audit()` writes others inside ORM transactions.
 * Both take the chain's lock and chain with the same hash, so entries written at once by either, in
 * any mix, still form one linear chain that verifies.
 */
let t: TestApp;

beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

test('entries written at once through the pool appender and through audit() form one chain that verifies, each entry once', async () => {
  const before = await t.em().count(AuditEntry, { tender: null });
  const viaPool = Array.from({ length: 60 }, (_, k) => auditOnPool(t.deps.sessionPool, {
    tenderId: null, actorId: null, action: 'bid.submitted', subject: `pool ${k}`, detail: { revision: 1, k },
  }));
  const viaOrm = Array.from({ length: 6 }, (_, k) => t.orm.em.fork().transactional((tx) => audit(tx, {
    tenderId: null, actor: null, action: 'bid.submitted', subject: `orm ${k}`, detail: { revision: 1, k },
  })));
  await Promise.all([...viaPool, ...viaOrm]);
  const entries = await t.em().find(AuditEntry, { tender: null }, { orderBy: { seq: 'asc' } });
  expect(entries).toHaveLength(before + 66);
  const subjects = entries.slice(before).map((e) => e.subject);
  expect(new Set(subjects).size).toBe(66);
  // Entries of one caller keep the order they were asked for.
  const poolOrder = subjects.filter((s) => s.startsWith('pool ')).map((s) => Number(s.slice(5)));
  expect(poolOrder).toEqual(Array.from({ length: 60 }, (_, k) => k));
  // Each entry follows the one before it.
  for (let i = 1; i < entries.length; i++) expect(entries[i].prevHash).toBe(entries[i - 1].hash);
  const verified = await verifyTrail(t.em(), null);
  expect(verified).toMatchObject({ ok: true, entries: before + 66, brokenAt: null });
});

test('an entry PostgreSQL refuses rejects its own caller only: the entries batched with it are written, and the chain verifies', async () => {
  const before = await t.em().count(AuditEntry, { tender: null });
  const entry = (subject: string) => auditOnPool(t.deps.sessionPool, { tenderId: null, actorId: null, action: 'bid.submitted', subject });
  // Asked for at once: the first is written alone, the other three wait and go as one batch.
  const [first, refused, second, third] = await Promise.allSettled([
    entry('first'),
    // A subject longer than its column (varchar 200).
    entry('x'.repeat(201)),
    entry('second'),
    entry('third'),
  ]);
  expect([first.status, second.status, third.status]).toEqual(['fulfilled', 'fulfilled', 'fulfilled']);
  expect(refused.status).toBe('rejected');
  expect(String((refused as PromiseRejectedResult).reason)).toMatch(/too long/);
  const written = await t.em().find(AuditEntry, { tender: null }, { orderBy: { seq: 'asc' } });
  expect(written.slice(before).map((e) => e.subject)).toEqual(['first', 'second', 'third']);
  expect(await verifyTrail(t.em(), null)).toMatchObject({ ok: true, entries: before + 3 });
});
